import { useState, type ReactNode } from 'react';
import { QueryClientProvider, type QueryClient } from '@tanstack/react-query';
import { setCsrfTokenProvider } from '@/lib/api-client';
import { createQueryClient } from '@/lib/query-client';
import { sessionQueryOptions } from '@/features/auth/api/get-session';

/**
 * Ties the api client's CSRF header to the session query, so the token has one home: the
 * cache. A refresh (after a `csrf` refusal) refetches the session.
 */
export function connectCsrf(queryClient: QueryClient): void {
  setCsrfTokenProvider(async ({ refresh }) => {
    if (refresh) await queryClient.invalidateQueries({ queryKey: sessionQueryOptions().queryKey });
    const session = await queryClient.ensureQueryData(sessionQueryOptions());
    return session.csrfToken;
  });
}

/** The app's providers: one QueryClient for the page's life. */
export function AppProvider({ children, queryClient }: { children: ReactNode; queryClient?: QueryClient }) {
  const [client] = useState(() => {
    const qc = queryClient ?? createQueryClient();
    connectCsrf(qc);
    return qc;
  });
  return <QueryClientProvider client={client}>{children}</QueryClientProvider>;
}
