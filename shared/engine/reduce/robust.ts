/**
 * Small robust statistics on typed arrays. Selection (not sorting) keeps them O(n) so the
 * reduction stays fast on full frames.
 */

/** Scale factor turning a median absolute deviation into a Gaussian sigma (common practice). */
export const MAD_TO_SIGMA = 1.4826;

/**
 * k-th smallest value (0-based) of `values[0..n)`, rearranging `values` in place (Hoare
 * quickselect). The caller passes a scratch copy.
 */
export function selectInPlace(values: Float64Array | Float32Array, k: number, n = values.length): number {
  let lo = 0;
  let hi = n - 1;
  while (hi > lo) {
    const pivot = values[(lo + hi) >> 1];
    let i = lo;
    let j = hi;
    while (i <= j) {
      while (values[i] < pivot) i++;
      while (values[j] > pivot) j--;
      if (i <= j) {
        const t = values[i];
        values[i] = values[j];
        values[j] = t;
        i++;
        j--;
      }
    }
    if (k <= j) hi = j;
    else if (k >= i) lo = i;
    else return values[k];
  }
  return values[k];
}

/** Median of the finite entries of `values` (NaN when there are none); does not modify the input. */
export function median(values: ArrayLike<number>): number {
  const scratch = new Float64Array(values.length);
  let n = 0;
  for (let i = 0; i < values.length; i++) {
    const v = values[i];
    if (Number.isFinite(v)) scratch[n++] = v;
  }
  return medianInPlace(scratch, n);
}

/** Median of `scratch[0..n)`, rearranging it; NaN when n is 0. */
export function medianInPlace(scratch: Float64Array | Float32Array, n: number): number {
  if (n === 0) return Number.NaN;
  const upper = selectInPlace(scratch, n >> 1, n);
  if (n % 2 === 1) return upper;
  // The lower middle is the largest value left of the upper one after selection.
  let lower = -Infinity;
  for (let i = 0; i < n >> 1; i++) if (scratch[i] > lower) lower = scratch[i];
  return 0.5 * (lower + upper);
}

/** Robust sigma of `scratch[0..n)` around its median (1.4826 · MAD), rearranging it. */
export function madSigmaInPlace(scratch: Float64Array | Float32Array, n: number): number {
  const m = medianInPlace(scratch, n);
  for (let i = 0; i < n; i++) scratch[i] = Math.abs(scratch[i] - m);
  return MAD_TO_SIGMA * medianInPlace(scratch, n);
}

/** Running median of `values` over a window of `2·half + 1` samples, shrunk at the ends. */
export function runningMedian(values: ArrayLike<number>, half: number): Float64Array {
  const n = values.length;
  const out = new Float64Array(n);
  const scratch = new Float64Array(2 * half + 1);
  for (let i = 0; i < n; i++) {
    const lo = Math.max(0, i - half);
    const hi = Math.min(n - 1, i + half);
    let m = 0;
    for (let j = lo; j <= hi; j++) {
      const v = values[j];
      if (Number.isFinite(v)) scratch[m++] = v;
    }
    out[i] = medianInPlace(scratch, m);
  }
  return out;
}
