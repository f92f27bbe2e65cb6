import { useMutation, useQueryClient } from '@tanstack/react-query';
import { paths } from '../../../../shared/api/paths.ts';
import type { Role } from '../../../../shared/api/members.ts';
import { api } from '@/lib/api-client';
import { queryKeys } from '@/lib/query-keys';

/** PATCH /api/instruments/:instrumentId/members/:userId */
export function updateMemberRole(instrumentId: string, userId: string, role: Role): Promise<unknown> {
  return api.patch(paths.member(instrumentId, userId), { role });
}

/** Changes a member's role; members, the instrument and the session (own role may change) refetch. */
export function useUpdateMemberRole(instrumentId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ userId, role }: { userId: string; role: Role }) => updateMemberRole(instrumentId, userId, role),
    onSuccess: async () => {
      await Promise.all([
        queryClient.invalidateQueries({ queryKey: queryKeys.instruments.detail(instrumentId) }),
        queryClient.invalidateQueries({ queryKey: queryKeys.session.all }),
      ]);
    },
  });
}
