import { useMutation, useQueryClient } from '@tanstack/react-query';
import { paths } from '../../../../shared/api/paths.ts';
import type { BulkUpdateFramesInput, BulkUpdateFramesResponse } from '../../../../shared/api/frames.ts';
import { api } from '@/lib/api-client';
import { queryKeys } from '@/lib/query-keys';

/** POST /api/frames/bulk-update — all or nothing. */
export function bulkUpdateFrames(input: BulkUpdateFramesInput): Promise<BulkUpdateFramesResponse> {
  return api.post<BulkUpdateFramesResponse>(paths.framesBulkUpdate(), input);
}

/** Sets the same metadata on many frames; frame lists and details refetch. */
export function useBulkUpdateFrames() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: bulkUpdateFrames,
    onSuccess: () => queryClient.invalidateQueries({ queryKey: queryKeys.frames.all, predicate: (q) => q.queryKey[1] !== 'decoded' }),
  });
}
