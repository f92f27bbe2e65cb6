import { Link } from 'react-router-dom';
import { useSession } from '@/features/auth/api/get-session';
import { useInstruments } from '@/features/instruments/api/get-instruments';
import { InstrumentsTable } from '@/features/instruments/components/instruments-table';
import { EmptyState, Loading, PageHeader } from '@/components/page';
import { ErrorAlert } from '@/components/alert';

/** /instruments: the instruments you can see, and "New instrument". */
export function InstrumentsRoute() {
  const session = useSession();
  const instruments = useInstruments();
  const isAdmin = Boolean(session.data?.user?.isAdmin);

  return (
    <>
      <PageHeader
        title="Instruments"
        subtitle="Each instrument is one spectrometer and camera configuration with its nominal profile."
        actions={
          <Link to="/instruments/new" className="rounded-md bg-accent-700 px-3.5 py-2 text-sm font-medium text-white shadow-xs hover:bg-accent-800">
            New instrument
          </Link>
        }
      />
      {instruments.isPending ? (
        <Loading what="Loading instruments" />
      ) : instruments.isError ? (
        <ErrorAlert error={instruments.error} title="Could not load the instruments" />
      ) : instruments.data.length === 0 ? (
        <EmptyState>No instruments yet. Create one, or ask an owner to invite you to theirs.</EmptyState>
      ) : (
        <InstrumentsTable instruments={instruments.data} isAdmin={isAdmin} />
      )}
    </>
  );
}
