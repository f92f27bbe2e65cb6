/**
 * Display scaling of frame counts to a colour-map position in [0, 1], and the contrast limits
 * from percentiles. Pure functions: no DOM, no React, so the worker and the tests use them alike.
 */

/** How counts between the contrast limits map onto the colour map. */
export type DisplayScaling = 'linear' | 'log' | 'asinh';

/** Steepness of the log stretch: y = log10(a·x + 1) / log10(a + 1) (common practice in astronomy viewers). */
export const LOG_STRETCH_A = 1000;
/** Softening of the asinh stretch: y = asinh(x/β) / asinh(1/β) (Lupton, Gunn & Szalay 1999, AJ 118, 1406). */
export const ASINH_SOFTENING = 0.05;

/**
 * Position in [0, 1] on the colour map of a count value, for limits `loCounts` < `hiCounts`.
 * Values outside the limits clamp; NaN stays NaN (drawn transparent).
 */
export function scaleCounts(value: number, loCounts: number, hiCounts: number, scaling: DisplayScaling): number {
  if (Number.isNaN(value)) return Number.NaN;
  const span = hiCounts - loCounts;
  const x = span > 0 ? Math.min(1, Math.max(0, (value - loCounts) / span)) : value >= hiCounts ? 1 : 0;
  if (scaling === 'linear') return x;
  if (scaling === 'log') return Math.log10(LOG_STRETCH_A * x + 1) / Math.log10(LOG_STRETCH_A + 1);
  return Math.asinh(x / ASINH_SOFTENING) / Math.asinh(1 / ASINH_SOFTENING);
}

/**
 * The value at `percent` (0..100) of an ascending sorted sample, linearly interpolated between
 * ranks (the "linear" method of Hyndman & Fan 1996, definition 7; numpy's default).
 */
export function percentileOfSorted(sorted: ArrayLike<number>, percent: number): number {
  const n = sorted.length;
  if (n === 0) return Number.NaN;
  const p = Math.min(100, Math.max(0, percent)) / 100;
  const h = (n - 1) * p;
  const lo = Math.floor(h);
  const hi = Math.min(n - 1, lo + 1);
  return sorted[lo] + (h - lo) * (sorted[hi] - sorted[lo]);
}

/**
 * An ascending, NaN-free sample of at most `maxSamples` pixels taken at a regular stride, for
 * percentiles and the histogram (a full sort of 4 million pixels is not needed for contrast).
 */
export function sortedSample(data: ArrayLike<number>, maxSamples = 262_144): Float32Array {
  const stride = Math.max(1, Math.ceil(data.length / maxSamples));
  const out = new Float32Array(Math.ceil(data.length / stride));
  let k = 0;
  for (let i = 0; i < data.length; i += stride) {
    const v = data[i];
    if (!Number.isNaN(v)) out[k++] = v;
  }
  return out.subarray(0, k).sort();
}

/** Counts per bin of a sorted sample over [loCounts, hiCounts] in `bins` equal bins (values outside are left out). */
export function histogramOfSorted(sorted: ArrayLike<number>, loCounts: number, hiCounts: number, bins: number): { edgesCounts: Float64Array; counts: Float64Array } {
  const edgesCounts = new Float64Array(bins + 1);
  const counts = new Float64Array(bins);
  const span = hiCounts - loCounts || 1;
  for (let b = 0; b <= bins; b++) edgesCounts[b] = loCounts + (span * b) / bins;
  for (let i = 0; i < sorted.length; i++) {
    const v = sorted[i];
    if (v < loCounts || v > hiCounts) continue;
    counts[Math.min(bins - 1, Math.floor(((v - loCounts) / span) * bins))] += 1;
  }
  return { edgesCounts, counts };
}
