import { useMutation, useQueryClient } from '@tanstack/react-query';
import { paths } from '../../../../shared/api/paths.ts';
import type { UploadFramesResponse } from '../../../../shared/api/frames.ts';
import { api } from '@/lib/api-client';
import { queryKeys } from '@/lib/query-keys';

/** The metadata fields sent with an upload, as the multipart form carries them (text). */
export type UploadFieldValues = Partial<Record<'takenAt' | 'kind' | 'exposureS' | 'accumulations' | 'target' | 'pressureMbar' | 'driverNm' | 'parity' | 'filters' | 'scanVariable' | 'scanValue' | 'tags' | 'notes', string>>;

/**
 * POST /api/instruments/:instrumentId/frames — every file in a `file` field, one frame each (a
 * TIFF stack gives one frame per page). All or nothing: one refused file stores none.
 */
export function uploadFrames(instrumentId: string, files: File[], fields: UploadFieldValues): Promise<UploadFramesResponse> {
  const form = new FormData();
  for (const [key, value] of Object.entries(fields)) if (value !== undefined && value.trim() !== '') form.append(key, value.trim());
  for (const file of files) form.append('file', file, file.name);
  return api.upload<UploadFramesResponse>(paths.instrumentFrames(instrumentId), form);
}

/** Uploads frames; every frame list refetches. */
export function useUploadFrames(instrumentId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ files, fields }: { files: File[]; fields: UploadFieldValues }) => uploadFrames(instrumentId, files, fields),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: queryKeys.frames.all }),
  });
}
