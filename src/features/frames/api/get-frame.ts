import { queryOptions, useQuery } from '@tanstack/react-query';
import { paths } from '../../../../shared/api/paths.ts';
import type { Frame } from '../../../../shared/api/frames.ts';
import { api } from '@/lib/api-client';
import { queryKeys } from '@/lib/query-keys';

/** GET /api/frames/:frameId */
export function getFrame(frameId: string, signal?: AbortSignal): Promise<Frame> {
  return api.get<Frame>(paths.frame(frameId), signal);
}

export const frameQueryOptions = (frameId: string) =>
  queryOptions({ queryKey: queryKeys.frames.detail(frameId), queryFn: ({ signal }) => getFrame(frameId, signal) });

/** One frame's metadata and saved regions (idle while `frameId` is empty). */
export function useFrame(frameId: string) {
  return useQuery({ ...frameQueryOptions(frameId), enabled: Boolean(frameId) });
}
