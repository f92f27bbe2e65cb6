import { useMutation, useQueryClient } from '@tanstack/react-query';
import { paths } from '../../../../shared/api/paths.ts';
import { api } from '@/lib/api-client';
import { queryKeys } from '@/lib/query-keys';

/** DELETE /api/instruments/:instrumentId/members/:userId */
export function removeMember(instrumentId: string, userId: string): Promise<void> {
  return api.delete(paths.member(instrumentId, userId));
}

/** Removes a member; members, the instrument and the session refetch. */
export function useRemoveMember(instrumentId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (userId: string) => removeMember(instrumentId, userId),
    onSuccess: async () => {
      await Promise.all([
        queryClient.invalidateQueries({ queryKey: queryKeys.instruments.detail(instrumentId) }),
        queryClient.invalidateQueries({ queryKey: queryKeys.session.all }),
      ]);
    },
  });
}
