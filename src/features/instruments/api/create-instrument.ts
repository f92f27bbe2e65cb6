import { useMutation, useQueryClient } from '@tanstack/react-query';
import { paths } from '../../../../shared/api/paths.ts';
import type { CreateInstrumentInput, Instrument } from '../../../../shared/api/instruments.ts';
import { api } from '@/lib/api-client';
import { queryKeys } from '@/lib/query-keys';

/** POST /api/instruments → 201 with the new instrument. */
export function createInstrument(input: CreateInstrumentInput): Promise<Instrument> {
  return api.post<Instrument>(paths.instruments(), input);
}

/** Creates an instrument; the list and the session (the creator may become owner) refetch. */
export function useCreateInstrument() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: createInstrument,
    onSuccess: async () => {
      await Promise.all([
        queryClient.invalidateQueries({ queryKey: queryKeys.instruments.list() }),
        queryClient.invalidateQueries({ queryKey: queryKeys.session.all }),
      ]);
    },
  });
}
