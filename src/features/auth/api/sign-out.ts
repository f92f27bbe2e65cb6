import { useMutation, useQueryClient } from '@tanstack/react-query';
import { paths } from '../../../../shared/api/paths.ts';
import { api } from '@/lib/api-client';
import { queryKeys } from '@/lib/query-keys';

/** DELETE /api/session. */
export function signOut(): Promise<void> {
  return api.delete(paths.session());
}

/** Signs out and forgets every cached answer, then refetches the (now anonymous) session. */
export function useSignOut() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: signOut,
    onSettled: async () => {
      queryClient.removeQueries({ predicate: (q) => q.queryKey[0] !== queryKeys.session.all[0] });
      await queryClient.invalidateQueries({ queryKey: queryKeys.session.all });
    },
  });
}
