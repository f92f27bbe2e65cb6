import { Link } from 'react-router-dom';

/** Any path the client does not know. */
export function NotFoundRoute() {
  return (
    <div className="mx-auto mt-12 max-w-md text-center">
      <h1 className="text-2xl font-semibold text-slate-900">Page not found</h1>
      <p className="mt-2 text-sm text-slate-600">There is nothing at this address.</p>
      <Link to="/instruments" className="mt-4 inline-block text-sm font-medium text-accent-700 hover:underline">
        Go to instruments
      </Link>
    </div>
  );
}
