import { EngineError } from '../errors.ts';
import type { SpatialBand } from '../types.ts';
import { madSigmaInPlace, median, runningMedian } from './robust.ts';

/** The signal must rise this many profile-noise sigmas above the profile's median to count. */
const SIGNAL_MIN_SIGMA = 6;
/** The band spans the rows where the profile exceeds this fraction of its peak height… */
const BAND_FRACTION = 0.1;
/** …padded by this fraction of its width (plus two rows) so that the spatial wings are kept. */
const BAND_PAD_FRACTION = 0.2;

/** Robust noise of a profile from its first differences (insensitive to smooth structure). */
function differenceSigma(profile: Float64Array): number {
  const diffs = new Float64Array(profile.length);
  let n = 0;
  for (let i = 1; i < profile.length; i++) {
    const d = profile[i] - profile[i - 1];
    if (Number.isFinite(d)) diffs[n++] = d;
  }
  return n > 2 ? madSigmaInPlace(diffs, n) / Math.SQRT2 : 0;
}

/**
 * Finds the signal band from the spatial profile (mean along the spectral axis of each spatial
 * row). A 5-row running median removes 1-2-row spikes (cosmic tracks, hot rows) before the peak
 * is taken; the band is where the profile stays above a fraction of the peak height, padded.
 * Throws EngineError('no_signal') when the peak does not stand out of the noise.
 */
export function findSignalBand(profile: Float64Array): SpatialBand {
  const S = profile.length;
  const filtered = runningMedian(profile, 2);
  const baseline = median(profile);
  const noise = differenceSigma(profile);
  let peak = -1;
  let height = -Infinity;
  for (let s = 0; s < S; s++) {
    const h = filtered[s] - baseline;
    if (h > height) {
      height = h;
      peak = s;
    }
  }
  if (!(height > 0) || !(height > SIGNAL_MIN_SIGMA * noise)) {
    throw new EngineError(
      'no_signal',
      `No signal band found: the brightest spatial row stands ${Number.isFinite(height) ? height.toPrecision(3) : 'no'} counts above the median, against a profile noise of ${noise.toPrecision(3)} counts (needs ${SIGNAL_MIN_SIGMA} sigma). Mark the signal band by hand or check the exposure.`,
      { heightCounts: height, noiseCounts: noise },
    );
  }
  const threshold = Math.max(BAND_FRACTION * height, 1.5 * noise);
  let lo = peak;
  let hi = peak;
  while (lo > 0 && filtered[lo - 1] - baseline > threshold) lo--;
  while (hi < S - 1 && filtered[hi + 1] - baseline > threshold) hi++;
  const pad = 2 + Math.ceil(BAND_PAD_FRACTION * (hi - lo + 1));
  return { start: Math.max(0, lo - pad), end: Math.min(S, hi + 1 + pad) };
}

/**
 * Background bands either side of the signal band, separated from it by a gap (a quarter of the
 * band width, at least two rows) so the spatial wings of the lines stay out; each as wide as the
 * signal band, between 8 and 64 rows, cut at the frame edge. Returns [] when there is no room.
 */
export function autoBackgroundBands(signal: SpatialBand, spatialLength: number): SpatialBand[] {
  const width = signal.end - signal.start;
  const gap = Math.max(2, Math.ceil(0.25 * width));
  const size = Math.min(64, Math.max(8, width));
  const bands: SpatialBand[] = [];
  const belowEnd = signal.start - gap;
  const belowStart = Math.max(0, belowEnd - size);
  if (belowEnd - belowStart >= 2) bands.push({ start: belowStart, end: belowEnd });
  const aboveStart = signal.end + gap;
  const aboveEnd = Math.min(spatialLength, aboveStart + size);
  if (aboveEnd - aboveStart >= 2) bands.push({ start: aboveStart, end: aboveEnd });
  return bands;
}
