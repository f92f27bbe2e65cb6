import { Link, useNavigate, useParams } from 'react-router-dom';
import { useSession } from '@/features/auth/api/get-session';
import { useSignOut } from '@/features/auth/api/sign-out';
import { Button } from '@/components/button';
import { useInvitation } from '@/features/members/api/get-invitation';
import { AcceptInvitationForm } from '@/features/members/components/accept-invitation-form';
import { Loading } from '@/components/page';
import { Alert, ErrorAlert } from '@/components/alert';

/** /invite/:token: the page an invitation mail links to. */
export function AcceptInvitationRoute() {
  const { token = '' } = useParams();
  const session = useSession();
  const invitation = useInvitation(token);
  const signOut = useSignOut();
  const navigate = useNavigate();

  if (invitation.isPending || session.isPending) return <Loading what="Reading the invitation" />;
  if (invitation.isError) {
    return (
      <div className="mx-auto mt-8 max-w-md">
        <ErrorAlert error={invitation.error} title="This invitation cannot be used" />
      </div>
    );
  }
  const inv = invitation.data;
  const user = session.data?.user ?? null;
  const mustSignIn = inv.accountExists && !user;
  // Someone else is signed in on this browser (often the admin who sent the invitation).
  const otherUser = user && user.email.toLowerCase() !== inv.email.toLowerCase() ? user : null;

  return (
    <div className="mx-auto mt-8 max-w-md">
      <h1 className="text-2xl font-semibold tracking-tight text-slate-900">Join {inv.instrumentName}</h1>
      <p className="mt-1 mb-6 text-sm text-slate-600">
        {inv.invitedByName} invited <strong>{inv.email}</strong> as <strong>{inv.role}</strong>. The link is valid until{' '}
        {new Date(inv.expiresAt).toLocaleDateString()}.
      </p>
      <div className="rounded-lg border border-slate-200 bg-white p-6 shadow-xs">
        {otherUser ? (
          <div className="flex flex-col gap-4">
            <Alert tone="info" title={`You are signed in as ${otherUser.email}`}>
              This invitation is for {inv.email}. Sign out to accept it.
            </Alert>
            <Button variant="secondary" pending={signOut.isPending} onClick={() => signOut.mutate()}>
              Sign out
            </Button>
          </div>
        ) : mustSignIn ? (
          <Alert tone="info" title="You already have an account">
            <Link className="font-medium text-accent-700 hover:underline" to={`/sign-in?next=${encodeURIComponent(`/invite/${token}`)}`}>
              Sign in as {inv.email}
            </Link>{' '}
            and come back to this link to join.
          </Alert>
        ) : (
          <AcceptInvitationForm
            token={token}
            invitation={inv}
            signedIn={Boolean(user)}
            onAccepted={() => navigate(`/instruments/${inv.instrumentId}`, { replace: true })}
          />
        )}
      </div>
    </div>
  );
}
