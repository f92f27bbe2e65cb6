import { useMutation, useQueryClient } from '@tanstack/react-query';
import { paths } from '../../../../shared/api/paths.ts';
import type { Instrument, UpdateInstrumentInput } from '../../../../shared/api/instruments.ts';
import { api } from '@/lib/api-client';
import { queryKeys } from '@/lib/query-keys';

/** PATCH /api/instruments/:instrumentId (a given `profile` replaces the whole profile). */
export function updateInstrument(instrumentId: string, input: UpdateInstrumentInput): Promise<Instrument> {
  return api.patch<Instrument>(paths.instrument(instrumentId), input);
}

/** Edits one instrument; its detail and the list refetch. */
export function useUpdateInstrument(instrumentId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: UpdateInstrumentInput) => updateInstrument(instrumentId, input),
    onSuccess: async (instrument) => {
      if (instrument && typeof instrument === 'object' && 'id' in instrument) {
        queryClient.setQueryData(queryKeys.instruments.detail(instrumentId), instrument);
      }
      await queryClient.invalidateQueries({ queryKey: queryKeys.instruments.all });
    },
  });
}
