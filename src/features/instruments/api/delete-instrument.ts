import { useMutation, useQueryClient } from '@tanstack/react-query';
import { paths } from '../../../../shared/api/paths.ts';
import { api } from '@/lib/api-client';
import { queryKeys } from '@/lib/query-keys';

/** DELETE /api/instruments/:instrumentId */
export function deleteInstrument(instrumentId: string): Promise<void> {
  return api.delete(paths.instrument(instrumentId));
}

/** Deletes an instrument; every instrument query and the session's memberships refetch. */
export function useDeleteInstrument() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: deleteInstrument,
    onSuccess: async (_data, instrumentId) => {
      queryClient.removeQueries({ queryKey: queryKeys.instruments.detail(instrumentId) });
      await Promise.all([
        queryClient.invalidateQueries({ queryKey: queryKeys.instruments.list() }),
        queryClient.invalidateQueries({ queryKey: queryKeys.session.all }),
      ]);
    },
  });
}
