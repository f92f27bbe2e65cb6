import { queryOptions, useQuery } from '@tanstack/react-query';
import { paths } from '../../../../shared/api/paths.ts';
import type { Instrument } from '../../../../shared/api/instruments.ts';
import { api } from '@/lib/api-client';
import { queryKeys } from '@/lib/query-keys';

/** GET /api/instruments: the instruments the user is a member of (all of them for a site admin). */
export function getInstruments(signal?: AbortSignal): Promise<Instrument[]> {
  return api.get<Instrument[]>(paths.instruments(), signal);
}

export const instrumentsQueryOptions = () =>
  queryOptions({
    queryKey: queryKeys.instruments.list(),
    queryFn: ({ signal }) => getInstruments(signal),
  });

/** The instrument list. */
export function useInstruments() {
  return useQuery(instrumentsQueryOptions());
}
