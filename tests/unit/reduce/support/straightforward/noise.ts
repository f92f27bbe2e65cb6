import { madSigmaInPlace } from '../../../../../shared/engine/reduce/robust.ts';
import type { Strip } from './strip.ts';

/** Keep the MAD cheap on big bands: a strided sample of this many differences is plenty. */
const MAX_DIFFERENCES = 20_000;

/**
 * Per-pixel noise floor (counts rms) from row-to-row differences inside the given strip rows:
 * σ = 1.4826 · MAD(x[s+1,p] − x[s,p]) / √2. Differences of neighbouring rows cancel the smooth
 * background and any bias pattern along the spectral axis; the MAD ignores cosmic hits and lines.
 * Returns NaN when fewer than two rows are available.
 */
export function noiseFloorFromRows(strips: { strip: Strip; rowStart: number; rowEnd: number }[]): number {
  let total = 0;
  for (const { strip, rowStart, rowEnd } of strips) {
    if (rowEnd - rowStart >= 2) total += (rowEnd - rowStart - 1) * strip.spectralLength;
  }
  if (total === 0) return Number.NaN;
  const step = Math.max(1, Math.floor(total / MAX_DIFFERENCES));
  const diffs = new Float64Array(Math.ceil(total / step) + strips.length);
  let n = 0;
  for (const { strip, rowStart, rowEnd } of strips) {
    const L = strip.spectralLength;
    const v = strip.values;
    // Strided walk over the flat index: every step-th difference of vertically adjacent pixels.
    for (let i = rowStart * L; i < (rowEnd - 1) * L && n < diffs.length; i += step) {
      const d = v[i + L] - v[i];
      if (d === d) diffs[n++] = d;
    }
  }
  return n > 2 ? madSigmaInPlace(diffs, n) / Math.SQRT2 : Number.NaN;
}
