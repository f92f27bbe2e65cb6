import { queryOptions, useQuery } from '@tanstack/react-query';
import { paths } from '../../../../shared/api/paths.ts';
import type { RunSummary } from '../../../../shared/api/runs.ts';
import { api } from '@/lib/api-client';
import { queryKeys } from '@/lib/query-keys';
import { RUN_POLL_MS, runIsActive } from './get-run';

/** GET /api/instruments/:instrumentId/runs?limit=N — newest first. */
export function getInstrumentRuns(instrumentId: string, limit: number, signal?: AbortSignal): Promise<RunSummary[]> {
  return api.get<RunSummary[]>(paths.instrumentRunsList(instrumentId, limit), signal);
}

/** Polled while any listed run is queued or running, so its progress moves on the page. */
export const instrumentRunsQueryOptions = (instrumentId: string, limit: number) =>
  queryOptions({
    queryKey: queryKeys.runs.list(instrumentId, limit),
    queryFn: ({ signal }) => getInstrumentRuns(instrumentId, limit, signal),
    refetchInterval: (query) => (query.state.data?.some(runIsActive) ? RUN_POLL_MS : false),
  });

export function useInstrumentRuns(instrumentId: string, limit = 5) {
  return useQuery({ ...instrumentRunsQueryOptions(instrumentId, limit), enabled: Boolean(instrumentId) });
}
