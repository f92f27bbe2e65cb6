import { useOutbox } from '@/features/outbox/api/get-outbox';
import { OutboxView } from '@/features/outbox/components/outbox-view';
import { Loading, PageHeader } from '@/components/page';
import { ErrorAlert } from '@/components/alert';

/** /outbox (site admin): mails the built-in sink captured instead of delivering. */
export function OutboxRoute() {
  const outbox = useOutbox();
  return (
    <>
      <PageHeader title="Outbox" subtitle="Mail the server sent while the built-in mail sink is on. Nothing here left the machine." />
      {outbox.isPending ? (
        <Loading what="Loading mail" />
      ) : outbox.isError ? (
        <ErrorAlert error={outbox.error} title="Could not load the outbox" />
      ) : (
        <OutboxView mails={outbox.data} />
      )}
    </>
  );
}
