import { queryOptions, useQuery } from '@tanstack/react-query';
import { paths } from '../../../shared/api/paths.ts';
import { ApiError } from '@/lib/api-client';
import { queryKeys } from '@/lib/query-keys';
import { decodeInWorker } from './frame-worker-client.ts';
import type { DecodedFrame } from './protocol.ts';

/** GET /api/frames/:frameId/file as bytes (the stored file; immutable, cached by the browser). */
async function fetchFrameFile(frameId: string, signal?: AbortSignal): Promise<ArrayBuffer> {
  const response = await fetch(paths.frameFile(frameId), { credentials: 'same-origin', signal });
  if (!response.ok) {
    let message = `The server answered ${response.status} ${response.statusText}.`;
    let code = 'http_error';
    try {
      const body = (await response.json()) as { error?: { code?: string; message?: string } };
      if (body.error?.message) message = body.error.message;
      if (body.error?.code) code = body.error.code;
    } catch {
      // not JSON: keep the status line
    }
    throw new ApiError(response.status, code, message);
  }
  return response.arrayBuffer();
}

/** The frame's file fetched and decoded (one page) in the worker, kept for the session. */
export const decodedFrameQueryOptions = (frameId: string, page: number) =>
  queryOptions<DecodedFrame>({
    queryKey: queryKeys.frames.decoded(frameId, page),
    queryFn: async ({ signal }) => decodeInWorker(`${frameId}:${page}`, await fetchFrameFile(frameId, signal), page),
    staleTime: Infinity,
    gcTime: 5 * 60_000,
  });

/** A decoded frame for the viewer or the workbench. */
export function useDecodedFrame(frameId: string | null, page: number) {
  return useQuery({ ...decodedFrameQueryOptions(frameId ?? '', page), enabled: Boolean(frameId) });
}
