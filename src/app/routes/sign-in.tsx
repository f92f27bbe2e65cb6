import { Navigate, useNavigate, useSearchParams } from 'react-router-dom';
import { useSession } from '@/features/auth/api/get-session';
import { SignInForm } from '@/features/auth/components/sign-in-form';
import { Loading } from '@/components/page';

/** Only same-site paths are followed after sign-in ("//evil.example" is not a path). */
export function safeNext(next: string | null): string {
  return next && next.startsWith('/') && !next.startsWith('//') ? next : '/instruments';
}

/** /sign-in */
export function SignInRoute() {
  const session = useSession();
  const [params] = useSearchParams();
  const navigate = useNavigate();
  const next = safeNext(params.get('next'));

  if (session.isPending) return <Loading />;
  if (session.data?.user) return <Navigate to={next} replace />;

  return (
    <div className="mx-auto mt-8 max-w-sm">
      <h1 className="text-2xl font-semibold tracking-tight text-slate-900">Sign in to Orderly</h1>
      <p className="mt-1 mb-6 text-sm text-slate-600">Calibrated, order-labelled spectra for your spectrometers.</p>
      <div className="rounded-lg border border-slate-200 bg-white p-6 shadow-xs">
        <SignInForm onSignedIn={() => navigate(next, { replace: true })} />
      </div>
      <p className="mt-4 text-xs text-slate-500">New here? Ask an instrument owner for an invitation.</p>
    </div>
  );
}
