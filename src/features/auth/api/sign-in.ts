import { useMutation, useQueryClient } from '@tanstack/react-query';
import { paths } from '../../../../shared/api/paths.ts';
import type { SessionInfo, SignInInput } from '../../../../shared/api/session.ts';
import { api } from '@/lib/api-client';
import { queryKeys } from '@/lib/query-keys';
import { sessionQueryOptions } from './get-session';

/** POST /api/session. The answer is the new session (sign-in regenerates it, with a new CSRF token). */
export function signIn(input: SignInInput): Promise<SessionInfo> {
  return api.post<SessionInfo>(paths.session(), input);
}

/** Signs in; on success the new session replaces the cached one and every other query starts over. */
export function useSignIn() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: signIn,
    onSuccess: async (session) => {
      // Data fetched as someone else (or as nobody) must not survive a change of user.
      queryClient.removeQueries({ predicate: (q) => q.queryKey[0] !== queryKeys.session.all[0] });
      if (session && typeof session === 'object' && 'csrfToken' in session) {
        queryClient.setQueryData(sessionQueryOptions().queryKey, session);
      }
      await queryClient.invalidateQueries({ queryKey: queryKeys.session.all });
    },
  });
}
