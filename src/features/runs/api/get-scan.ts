import { queryOptions, useQuery } from '@tanstack/react-query';
import { paths } from '../../../../shared/api/paths.ts';
import type { ScanResponse } from '../../../../shared/api/runs.ts';
import { ApiError, api } from '@/lib/api-client';
import { queryKeys } from '@/lib/query-keys';

/** GET /api/runs/:runId/scan[?period=…] — map, yield curves, modulation and cutoff fits. */
export function getScan(runId: string, period: number | 'detect' | undefined, signal?: AbortSignal): Promise<ScanResponse> {
  return api.get<ScanResponse>(paths.runScan(runId, period), signal);
}

export const scanQueryOptions = (runId: string, period: number | 'detect' | undefined) =>
  queryOptions({
    queryKey: queryKeys.runs.scan(runId, period),
    queryFn: ({ signal }) => getScan(runId, period, signal),
    retry: (count, error) => !(error instanceof ApiError && error.status < 500) && count < 2,
  });

/** The scan analysis of a run; `enabled` waits until the run has finished. */
export function useScan(runId: string, period: number | 'detect' | undefined, enabled: boolean) {
  return useQuery({ ...scanQueryOptions(runId, period), enabled: Boolean(runId) && enabled });
}
