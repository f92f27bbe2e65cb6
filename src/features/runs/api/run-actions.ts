import { useMutation, useQueryClient } from '@tanstack/react-query';
import { paths } from '../../../../shared/api/paths.ts';
import type { Run } from '../../../../shared/api/runs.ts';
import { api } from '@/lib/api-client';
import { queryKeys } from '@/lib/query-keys';

/** POST /api/runs/:runId/cancel — queued items are cancelled, running ones finish. */
export function cancelRun(runId: string): Promise<Run> {
  return api.post<Run>(paths.runCancel(runId));
}

/** POST /api/runs/:runId/retry — the failed items only, each with a new job. */
export function retryRun(runId: string): Promise<Run> {
  return api.post<Run>(paths.runRetry(runId));
}

function useRunAction(runId: string, action: (runId: string) => Promise<Run>) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: () => action(runId),
    onSuccess: (run) => {
      queryClient.setQueryData(queryKeys.runs.detail(runId), run);
      return queryClient.invalidateQueries({ queryKey: [...queryKeys.runs.all, 'scan', runId] });
    },
  });
}

export const useCancelRun = (runId: string) => useRunAction(runId, cancelRun);
export const useRetryRun = (runId: string) => useRunAction(runId, retryRun);
