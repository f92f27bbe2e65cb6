import { queryOptions, useQuery } from '@tanstack/react-query';
import { paths } from '../../../../shared/api/paths.ts';
import type { Instrument } from '../../../../shared/api/instruments.ts';
import { api } from '@/lib/api-client';
import { queryKeys } from '@/lib/query-keys';

/** GET /api/instruments/:instrumentId */
export function getInstrument(instrumentId: string, signal?: AbortSignal): Promise<Instrument> {
  return api.get<Instrument>(paths.instrument(instrumentId), signal);
}

export const instrumentQueryOptions = (instrumentId: string) =>
  queryOptions({
    queryKey: queryKeys.instruments.detail(instrumentId),
    queryFn: ({ signal }) => getInstrument(instrumentId, signal),
  });

/** One instrument with its profile and the user's role on it. */
export function useInstrument(instrumentId: string) {
  return useQuery(instrumentQueryOptions(instrumentId));
}
