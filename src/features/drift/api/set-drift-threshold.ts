import { useMutation, useQueryClient } from '@tanstack/react-query';
import { paths } from '../../../../shared/api/paths.ts';
import type { Instrument } from '../../../../shared/api/instruments.ts';
import type { DriftThreshold } from '../../../../shared/analysis/drift.ts';
import { api } from '@/lib/api-client';
import { queryKeys } from '@/lib/query-keys';

/** PATCH /api/instruments/:instrumentId with `settings.driftThreshold` (the server merges settings; owners only). */
export function setDriftThreshold(instrumentId: string, threshold: DriftThreshold): Promise<Instrument> {
  return api.patch<Instrument>(paths.instrument(instrumentId), { settings: { driftThreshold: threshold } });
}

/** Saves the threshold; the instrument and its drift series (flags use the threshold) refetch. */
export function useSetDriftThreshold(instrumentId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (threshold: DriftThreshold) => setDriftThreshold(instrumentId, threshold),
    onSuccess: () =>
      Promise.all([
        queryClient.invalidateQueries({ queryKey: queryKeys.instruments.detail(instrumentId) }),
        queryClient.invalidateQueries({ queryKey: queryKeys.drift.series(instrumentId) }),
      ]),
  });
}
