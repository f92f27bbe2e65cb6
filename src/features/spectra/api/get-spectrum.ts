import { queryOptions, useQuery } from '@tanstack/react-query';
import { paths } from '../../../../shared/api/paths.ts';
import type { SpectrumResponse } from '../../../../shared/api/spectra.ts';
import { ApiError, api } from '@/lib/api-client';
import { queryKeys } from '@/lib/query-keys';

/**
 * GET /api/frames/:frameId/spectrum[?version=N] — the calibration valid at the frame's time (or
 * version N) applied; the server stores it once per (frame, version).
 */
export function getSpectrum(frameId: string, version: number | undefined, filterCorrection: boolean, signal?: AbortSignal): Promise<SpectrumResponse> {
  return api.get<SpectrumResponse>(paths.frameSpectrum(frameId, version, filterCorrection), signal);
}

export const spectrumQueryOptions = (frameId: string, version: number | undefined, filterCorrection = false) =>
  queryOptions({
    queryKey: queryKeys.spectra.detail(frameId, version, filterCorrection),
    queryFn: ({ signal }) => getSpectrum(frameId, version, filterCorrection, signal),
    // 409 no_calibration and 4xx refusals are answers, not hiccups: do not retry them.
    retry: (count, error) => !(error instanceof ApiError && error.status < 500) && count < 2,
  });

/** A frame's spectrum (idle while `frameId` is empty). */
export function useSpectrum(frameId: string, version?: number, filterCorrection = false) {
  return useQuery({ ...spectrumQueryOptions(frameId, version, filterCorrection), enabled: Boolean(frameId) });
}

/** True for the server's "no approved calibration covers this frame" answer. */
export function isNoCalibration(error: unknown): boolean {
  return error instanceof ApiError && error.status === 409 && error.code === 'no_calibration';
}
