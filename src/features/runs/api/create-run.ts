import { useMutation, useQueryClient } from '@tanstack/react-query';
import { paths } from '../../../../shared/api/paths.ts';
import type { CreateRunInput, Run } from '../../../../shared/api/runs.ts';
import { api } from '@/lib/api-client';
import { queryKeys } from '@/lib/query-keys';

/** POST /api/instruments/:instrumentId/runs — frames by id, or every signal frame of a scan variable. */
export function createRun(instrumentId: string, input: CreateRunInput): Promise<Run> {
  return api.post<Run>(paths.instrumentRuns(instrumentId), input);
}

/** Starts a run; its detail is seeded so the run page shows at once. */
export function useCreateRun(instrumentId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: CreateRunInput) => createRun(instrumentId, input),
    onSuccess: (run) => queryClient.setQueryData(queryKeys.runs.detail(run.id), run),
  });
}
