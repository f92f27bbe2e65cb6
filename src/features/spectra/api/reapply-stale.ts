import { useMutation, useQueryClient } from '@tanstack/react-query';
import { paths } from '../../../../shared/api/paths.ts';
import type { Run } from '../../../../shared/api/runs.ts';
import { api } from '@/lib/api-client';
import { queryKeys } from '@/lib/query-keys';

/** POST /api/instruments/:instrumentId/spectra/reapply — one run over every frame with a stale spectrum. */
export function reapplyStale(instrumentId: string): Promise<Run> {
  return api.post<Run>(paths.instrumentReapply(instrumentId));
}

/** Re-applies the stale spectra of an instrument; spectra and drift refetch once the run is queued. */
export function useReapplyStale(instrumentId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: () => reapplyStale(instrumentId),
    onSuccess: (run) => {
      queryClient.setQueryData(queryKeys.runs.detail(run.id), run);
      return queryClient.invalidateQueries({ queryKey: queryKeys.spectra.all });
    },
  });
}
