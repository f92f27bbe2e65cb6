import { useMutation, useQueryClient } from '@tanstack/react-query';
import { paths } from '../../../../shared/api/paths.ts';
import type { RegionsInput } from '../../../../shared/api/frames.ts';
import type { Instrument } from '../../../../shared/api/instruments.ts';
import { api } from '@/lib/api-client';
import { queryKeys } from '@/lib/query-keys';

/** PUT /api/instruments/:instrumentId/regions — the instrument's default regions. */
export function saveInstrumentRegions(instrumentId: string, regions: RegionsInput): Promise<Instrument> {
  return api.put<Instrument>(paths.instrumentRegions(instrumentId), regions);
}

/** Saves the default regions; the instrument refetches. */
export function useSaveInstrumentRegions(instrumentId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (regions: RegionsInput) => saveInstrumentRegions(instrumentId, regions),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: queryKeys.instruments.detail(instrumentId) }),
  });
}
