import { NavLink, Outlet, useNavigate } from 'react-router-dom';
import { useSession } from '@/features/auth/api/get-session';
import { useSignOut } from '@/features/auth/api/sign-out';

const navClass = ({ isActive }: { isActive: boolean }) =>
  `rounded-md px-3 py-1.5 text-sm font-medium ${
    isActive ? 'bg-slate-800 text-white shadow-[inset_0_-2px_0] shadow-accent-500' : 'text-slate-300 hover:bg-slate-800 hover:text-white'
  }`;

/** The frame of every page: dark slate header with the product name, navigation and the user. */
export function AppLayout() {
  const session = useSession();
  const signOut = useSignOut();
  const navigate = useNavigate();
  const user = session.data?.user ?? null;

  return (
    <div className="flex min-h-screen flex-col">
      <header className="bg-slate-900 text-white">
        <div className="mx-auto flex h-14 max-w-7xl items-center gap-6 px-4 sm:px-6">
          <NavLink to={user ? '/instruments' : '/sign-in'} className="flex items-center gap-2 text-lg font-semibold tracking-tight">
            <span aria-hidden className="inline-block size-3 rounded-sm bg-accent-500" />
            Orderly
          </NavLink>
          {user ? (
            <>
              <nav aria-label="Main" className="flex items-center gap-1">
                <NavLink to="/instruments" className={navClass}>
                  Instruments
                </NavLink>
                <NavLink to="/frames" className={navClass}>
                  Frames
                </NavLink>
                {user.isAdmin ? (
                  <NavLink to="/outbox" className={navClass}>
                    Outbox
                  </NavLink>
                ) : null}
                <NavLink to="/account" className={navClass}>
                  Account
                </NavLink>
              </nav>
              <div className="ml-auto flex items-center gap-3 text-sm">
                <span className="hidden text-slate-300 sm:inline" data-testid="signed-in-user">
                  {user.name || user.email}
                  {user.isAdmin ? <span className="ml-1.5 rounded bg-slate-700 px-1.5 py-0.5 text-xs text-slate-200">admin</span> : null}
                </span>
                <button
                  type="button"
                  className="rounded-md px-2.5 py-1.5 text-slate-300 ring-1 ring-slate-700 hover:bg-slate-800 hover:text-white"
                  disabled={signOut.isPending}
                  onClick={() => signOut.mutate(undefined, { onSettled: () => navigate('/sign-in') })}
                >
                  Sign out
                </button>
              </div>
            </>
          ) : null}
        </div>
      </header>
      <main className="mx-auto w-full max-w-7xl flex-1 px-4 py-8 sm:px-6">
        <Outlet />
      </main>
      <footer className="border-t border-slate-200 py-4 text-center text-xs text-slate-500">
        Orderly — calibrated, order-labelled XUV/VUV spectra
      </footer>
    </div>
  );
}
