import { Link, useParams } from 'react-router-dom';
import { canManageInstrument, useSession } from '@/features/auth/api/get-session';
import { useInstrument } from '@/features/instruments/api/get-instrument';
import { useMembers } from '@/features/members/api/get-members';
import { MembersTable } from '@/features/members/components/members-table';
import { InviteForm } from '@/features/members/components/invite-form';
import { PendingInvitations } from '@/features/members/components/pending-invitations';
import { Loading, PageHeader, Panel } from '@/components/page';
import { ErrorAlert } from '@/components/alert';

/** /instruments/:instrumentId/members: who has which role; owners and admins invite and manage. */
export function MembersRoute() {
  const { instrumentId = '' } = useParams();
  const session = useSession();
  const instrument = useInstrument(instrumentId);
  const members = useMembers(instrumentId);
  const canManage = canManageInstrument(session.data, instrumentId);

  return (
    <>
      <PageHeader
        title={instrument.data ? `Members of ${instrument.data.name}` : 'Members'}
        subtitle={
          <Link to={`/instruments/${instrumentId}`} className="text-accent-700 hover:underline">
            ← Back to the instrument
          </Link>
        }
      />
      <div className="flex flex-col gap-6">
        {canManage ? (
          <Panel title="Invite someone">
            <InviteForm instrumentId={instrumentId} />
          </Panel>
        ) : null}
        <Panel title="Members">
          {members.isPending ? (
            <Loading what="Loading members" />
          ) : members.isError ? (
            <ErrorAlert error={members.error} title="Could not load the members" />
          ) : (
            <MembersTable instrumentId={instrumentId} members={members.data.members} canManage={canManage} currentUserId={session.data?.user?.id} />
          )}
        </Panel>
        {members.data && members.data.invitations.length > 0 ? (
          <Panel title="Invitations waiting">
            <PendingInvitations invitations={members.data.invitations} />
          </Panel>
        ) : null}
      </div>
    </>
  );
}
