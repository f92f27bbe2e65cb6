import { queryOptions, useQuery } from '@tanstack/react-query';
import { paths } from '../../../../shared/api/paths.ts';
import type { Version } from '../../../../shared/api/versions.ts';
import { api } from '@/lib/api-client';
import { queryKeys } from '@/lib/query-keys';

/** GET /api/instruments/:instrumentId/versions — newest first. */
export function getVersions(instrumentId: string, signal?: AbortSignal): Promise<Version[]> {
  return api.get<Version[]>(paths.instrumentVersions(instrumentId), signal);
}

export const versionsQueryOptions = (instrumentId: string) =>
  queryOptions({ queryKey: queryKeys.versions.list(instrumentId), queryFn: ({ signal }) => getVersions(instrumentId, signal) });

/** Every calibration version of an instrument. */
export function useVersions(instrumentId: string) {
  return useQuery(versionsQueryOptions(instrumentId));
}
