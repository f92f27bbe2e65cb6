import { queryOptions, useQuery } from '@tanstack/react-query';
import { paths } from '../../../../shared/api/paths.ts';
import type { SpectrumList } from '../../../../shared/api/spectra-list.ts';
import { api } from '@/lib/api-client';
import { queryKeys } from '@/lib/query-keys';

/** GET /api/instruments/:instrumentId/spectra[?stale=…] */
export function getInstrumentSpectra(instrumentId: string, stale: boolean | undefined, signal?: AbortSignal): Promise<SpectrumList> {
  return api.get<SpectrumList>(paths.instrumentSpectra(instrumentId, stale), signal);
}

export const instrumentSpectraQueryOptions = (instrumentId: string, stale: boolean | undefined) =>
  queryOptions({ queryKey: queryKeys.spectra.list(instrumentId, stale), queryFn: ({ signal }) => getInstrumentSpectra(instrumentId, stale, signal) });

export function useInstrumentSpectra(instrumentId: string, stale?: boolean) {
  return useQuery({ ...instrumentSpectraQueryOptions(instrumentId, stale), enabled: Boolean(instrumentId) });
}
