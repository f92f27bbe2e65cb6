import { keepPreviousData, queryOptions, useQuery } from '@tanstack/react-query';
import { paths } from '../../../../shared/api/paths.ts';
import type { FrameList, ListFramesQuery } from '../../../../shared/api/frames.ts';
import { api } from '@/lib/api-client';
import { queryKeys } from '@/lib/query-keys';

/** GET /api/frames — filtered, sorted and paged on the server. */
export function getFrames(query: ListFramesQuery, signal?: AbortSignal): Promise<FrameList> {
  return api.get<FrameList>(paths.frames(query as Record<string, string | number | undefined>), signal);
}

export const framesQueryOptions = (query: ListFramesQuery) =>
  queryOptions({
    queryKey: queryKeys.frames.list(query as Record<string, string | number | undefined>),
    queryFn: ({ signal }) => getFrames(query, signal),
    placeholderData: keepPreviousData,
  });

/** One page of frames; the previous page stays on screen while the next loads. */
export function useFrames(query: ListFramesQuery) {
  return useQuery(framesQueryOptions(query));
}
