/**
 * Spectra: a frame with the calibration valid at its time applied (issue 5). The body of
 * `GET /api/frames/:frameId/spectrum` is exactly the `orderly apply --json` object plus
 * `calibration` (the version used) and `drift` (the frame's shift against that calibration).
 */
import { z } from 'zod';
import type { AppliedSpectrum } from '../engine/apply.ts';
import type { DriftThreshold } from '../analysis/drift.ts';

export const driftThresholdSchema = z.object({
  sigma: z.number({ error: 'driftThreshold.sigma must be a number' }).positive({ message: 'driftThreshold.sigma must be > 0' }).max(1000),
  px: z.number({ error: 'driftThreshold.px must be a number' }).min(0, { message: 'driftThreshold.px must be ≥ 0' }).max(10_000),
});

/** `?version=N` picks a version by number instead of the one valid at the frame's time. */
export const spectrumQuerySchema = z.object({
  version: z.coerce.number({ error: 'version must be a whole number' }).int({ message: 'version must be a whole number' }).min(1, { message: 'version must be ≥ 1' }).optional(),
  /** Divide by the transmission of the calibration's filters (computed on request, not stored). */
  filterCorrection: z.enum(['true', 'false'], { error: 'filterCorrection must be true or false' }).optional().transform((v) => v === 'true'),
});
export type SpectrumQuery = z.infer<typeof spectrumQuerySchema>;

export interface SpectrumCalibrationRef {
  instrumentId: string;
  version: number;
  versionId: string;
  state: string;
  /** True when the version was superseded or withdrawn after this spectrum was made. */
  stale: boolean;
}

export interface SpectrumDrift {
  shiftPx: number | null;
  shiftPxSigma: number | null;
  shiftMeV: number | null;
  shiftMeVSigma: number | null;
  flagged: boolean;
  matchedPeaks: number;
  threshold: DriftThreshold;
}

/** Where the signal/background bands came from. */
export type RegionsSource = 'frame' | 'instrument' | 'calibration';

export type SpectrumResponse = AppliedSpectrum & {
  calibration: SpectrumCalibrationRef;
  drift: SpectrumDrift;
};

/** One point of `GET /api/instruments/:instrumentId/drift`. */
export interface DriftPoint {
  spectrumId: string;
  frameId: string;
  takenAt: string;
  version: number;
  shiftPx: number;
  shiftPxSigma: number;
  shiftMeV: number | null;
  flagged: boolean;
  matchedPeaks: number;
}

export const driftQuerySchema = z.object({
  from: z.iso.datetime({ offset: true, message: 'from must be an ISO 8601 time' }).optional(),
  to: z.iso.datetime({ offset: true, message: 'to must be an ISO 8601 time' }).optional(),
});

export interface DriftSeries {
  instrumentId: string;
  threshold: DriftThreshold;
  /** Ordered by frame time. */
  points: DriftPoint[];
  /** Flagged episodes: first flagged frame to the first frame back within threshold. */
  episodes: Array<{ id: string; openedAt: string; closedAt: string | null; firstFrameId: string }>;
}
