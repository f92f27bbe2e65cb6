import { useSession } from '@/features/auth/api/get-session';
import { TokensPanel } from '@/features/tokens/components/tokens-panel';
import { PageHeader, Panel } from '@/components/page';

/** /account: who you are and your personal API tokens. */
export function AccountRoute() {
  const session = useSession();
  const user = session.data?.user;
  return (
    <>
      <PageHeader title="Account" subtitle={user ? `${user.name} · ${user.email}${user.isAdmin ? ' · site admin' : ''}` : undefined} />
      <Panel title="API tokens">
        <TokensPanel />
      </Panel>
    </>
  );
}
