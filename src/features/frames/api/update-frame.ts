import { useMutation, useQueryClient } from '@tanstack/react-query';
import { paths } from '../../../../shared/api/paths.ts';
import type { Frame, UpdateFrameInput } from '../../../../shared/api/frames.ts';
import { api } from '@/lib/api-client';
import { queryKeys } from '@/lib/query-keys';

/** PATCH /api/frames/:frameId — metadata and/or regions. */
export function updateFrame(frameId: string, input: UpdateFrameInput): Promise<Frame> {
  return api.patch<Frame>(paths.frame(frameId), input);
}

/** Edits one frame (e.g. saves its regions); the frame and the lists refetch. */
export function useUpdateFrame(frameId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: UpdateFrameInput) => updateFrame(frameId, input),
    onSuccess: (frame) => {
      queryClient.setQueryData(queryKeys.frames.detail(frameId), frame);
      return queryClient.invalidateQueries({ queryKey: queryKeys.frames.all, predicate: (q) => q.queryKey[1] === 'list' });
    },
  });
}
