import { EngineError } from '../errors.ts';
import type { Lineout } from '../types.ts';

/** Options of {@link findPeaks}. */
export interface PeakOptions {
  /**
   * Detection threshold: smoothed, baseline-removed counts over their noise (from the lineout
   * variance), and the fitted area over its uncertainty. A lower threshold finds weaker lines at
   * the price of more false peaks; the order assigner tolerates false peaks better than missing
   * lines, hence the modest default.
   * @default 3
   */
  minSnr?: number;
  /** Keep only this many peaks (highest snr). @default no limit */
  maxPeaks?: number;
  /** Minimum distance between detected maxima, pixels. @default 3 */
  minSeparationPx?: number;
  /** Gaussian smoothing sigma for detection, pixels (about the line sigma is best). @default 1 */
  smoothingPx?: number;
  /** Half width of the running median that sets the local baseline for detection, pixels. @default 25 */
  baselineHalfWidthPx?: number;
  /** Fit window half width in FWHM of the first width estimate (at least 3 pixels). @default 2 */
  fitWindowFwhm?: number;
}

export interface ResolvedPeakOptions {
  minSnr: number;
  maxPeaks: number;
  minSeparationPx: number;
  smoothingPx: number;
  baselineHalfWidthPx: number;
  fitWindowFwhm: number;
}

function positive(name: string, value: number): number {
  if (!(value > 0) || !Number.isFinite(value)) {
    throw new EngineError('invalid_input', `${name} must be a positive number, got ${value}.`);
  }
  return value;
}

/** Checks the lineout and fills in defaults; throws EngineError('invalid_input'). */
export function resolvePeakOptions(lineout: Lineout, options: PeakOptions = {}): ResolvedPeakOptions {
  const n = lineout.counts?.length ?? 0;
  if (!(lineout.counts instanceof Float64Array) || !(lineout.variance instanceof Float64Array) || lineout.variance.length !== n) {
    throw new EngineError('invalid_input', 'The lineout needs Float64Array counts and variance of the same length.');
  }
  if (lineout.saturated && lineout.saturated.length !== n) {
    throw new EngineError('invalid_input', `The lineout has ${n} counts but ${lineout.saturated.length} saturation flags.`);
  }
  const maxPeaks = options.maxPeaks ?? Infinity;
  if (!(maxPeaks >= 1)) throw new EngineError('invalid_input', `maxPeaks must be at least 1, got ${maxPeaks}.`);
  return {
    minSnr: positive('minSnr', options.minSnr ?? 3),
    maxPeaks,
    minSeparationPx: positive('minSeparationPx', options.minSeparationPx ?? 3),
    smoothingPx: positive('smoothingPx', options.smoothingPx ?? 1),
    baselineHalfWidthPx: Math.round(positive('baselineHalfWidthPx', options.baselineHalfWidthPx ?? 25)),
    fitWindowFwhm: positive('fitWindowFwhm', options.fitWindowFwhm ?? 2),
  };
}
