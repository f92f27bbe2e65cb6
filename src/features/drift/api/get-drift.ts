import { queryOptions, useQuery } from '@tanstack/react-query';
import { paths } from '../../../../shared/api/paths.ts';
import type { DriftSeries } from '../../../../shared/api/spectra.ts';
import { api } from '@/lib/api-client';
import { queryKeys } from '@/lib/query-keys';

/** GET /api/instruments/:instrumentId/drift — one point per frame with a fresh spectrum, by frame time. */
export function getDrift(instrumentId: string, signal?: AbortSignal): Promise<DriftSeries> {
  return api.get<DriftSeries>(paths.instrumentDrift(instrumentId), signal);
}

export const driftQueryOptions = (instrumentId: string) =>
  queryOptions({ queryKey: queryKeys.drift.series(instrumentId), queryFn: ({ signal }) => getDrift(instrumentId, signal) });

export function useDrift(instrumentId: string) {
  return useQuery({ ...driftQueryOptions(instrumentId), enabled: Boolean(instrumentId) });
}
