import { useEffect, useRef } from 'react';
import { queryOptions, useQuery, useQueryClient } from '@tanstack/react-query';
import { paths } from '../../../../shared/api/paths.ts';
import type { Run } from '../../../../shared/api/runs.ts';
import { api } from '@/lib/api-client';
import { queryKeys } from '@/lib/query-keys';

/** How often a queued or running run is polled (ms); the queue itself polls every 0.5 s or more. */
export const RUN_POLL_MS = 1000;

/** GET /api/runs/:runId */
export function getRun(runId: string, signal?: AbortSignal): Promise<Run> {
  return api.get<Run>(paths.run(runId), signal);
}

/** True while the run may still change on its own. */
export function runIsActive(run: Pick<Run, 'state'> | undefined): boolean {
  return run?.state === 'queued' || run?.state === 'running';
}

export const runQueryOptions = (runId: string) =>
  queryOptions({
    queryKey: queryKeys.runs.detail(runId),
    queryFn: ({ signal }) => getRun(runId, signal),
    refetchInterval: (query) => (runIsActive(query.state.data) ? RUN_POLL_MS : false),
  });

/**
 * One run with its items, polled while queued or running. When a run this page watched finishes,
 * cached spectra, spectra lists and drift are refetched: the run has just changed them.
 */
export function useRun(runId: string) {
  const query = useQuery({ ...runQueryOptions(runId), enabled: Boolean(runId) });
  const queryClient = useQueryClient();
  const wasActive = useRef(false);
  const active = runIsActive(query.data);
  useEffect(() => {
    if (wasActive.current && !active && query.data) {
      void queryClient.invalidateQueries({ queryKey: queryKeys.spectra.all });
      void queryClient.invalidateQueries({ queryKey: queryKeys.drift.all });
    }
    wasActive.current = active;
  }, [active, query.data, queryClient]);
  return query;
}
