import { Navigate, Outlet, useLocation } from 'react-router-dom';
import { useSession } from '@/features/auth/api/get-session';
import { ErrorAlert } from '@/components/alert';
import { Loading } from '@/components/page';

/**
 * Routes below need a signed-in user; `adminOnly` also needs a site admin. This only steers the
 * browser: every API call is checked by the server.
 */
export function RequireAuth({ adminOnly = false }: { adminOnly?: boolean }) {
  const session = useSession();
  const location = useLocation();
  if (session.isPending) return <Loading />;
  if (session.isError) return <ErrorAlert error={session.error} title="Could not read the session" />;
  if (!session.data.user) {
    const next = encodeURIComponent(location.pathname + location.search);
    return <Navigate to={`/sign-in?next=${next}`} replace />;
  }
  if (adminOnly && !session.data.user.isAdmin) return <Navigate to="/instruments" replace />;
  return <Outlet />;
}
