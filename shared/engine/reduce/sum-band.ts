import type { LineShape, SpatialBand } from '../types.ts';
import type { RowCleaner } from './outliers.ts';

/** Inputs of {@link sumBand}. */
export interface SumBandInput {
  /** Gives each cleaned signal row in turn. */
  cleaner: RowCleaner;
  signal: SpatialBand;
  lineShape: LineShape;
  /** Background per spectral pixel, subtracted from every band row. */
  background: Float64Array;
  /** Variance of the background estimate per spectral pixel. */
  backgroundVariance: Float64Array;
  /** Noise floor variance per spectral pixel (read noise, plus background shot noise). */
  floorVariance: Float64Array;
  gain: number;
  /** Raw value at or above which a pixel counts as saturated. */
  saturationLevel: number;
}

export interface SumBandResult {
  counts: Float64Array;
  variance: Float64Array;
  saturated: Uint8Array;
  band: Float32Array;
  bandRows: number;
  /** Pixels the cleaner replaced in the signal band. */
  rejected: number;
}

/**
 * One unshifted band row: the cleaner's first screen inline (see RowCleaner), the pixels it
 * clears background-subtracted, stored in the band and summed; the others written to
 * `candidates` (their count returned) for the exact tests. A function of its own, called once
 * per row, so that V8 optimises it as a whole.
 */
function fusedRow(
  cur: Float32Array,
  rawRow: Float32Array,
  a: Float32Array,
  b: Float32Array,
  c: Float32Array,
  screen: number,
  background: Float64Array,
  floorVariance: Float64Array,
  gain: number,
  level: number,
  band: Float32Array,
  out: number,
  counts: Float64Array,
  variance: Float64Array,
  saturated: Uint8Array,
  candidates: Int32Array,
): number {
  const L = cur.length;
  let n = 0;
  for (let p = 0; p < L; p++) {
    const v = cur[p];
    const t = v - screen;
    if (t <= b[p] && t <= c[p] && t <= a[p]) {
      const d = v - background[p];
      band[out + p] = d;
      counts[p] += d;
      // max(d, 0) without a branch: d sits on both sides of 0 in the background, which would
      // make a branch unpredictable; d + |d| is exact.
      variance[p] += gain * 0.5 * (d + Math.abs(d)) + floorVariance[p];
      if (rawRow[p] >= level) saturated[p] = 1;
    } else {
      candidates[n++] = p;
    }
  }
  return n;
}

/**
 * Background subtraction, tilt/curvature correction and summation of the signal band, in one
 * pass over its rows (each row is cleaned, then folded into the sums while it is in cache).
 *
 * Row r sits at spatial offset o = row − centre; a line there is displaced by
 * shift = tilt·o + curvature·o², so the corrected row at pixel p is the original sampled at
 * p + shift (linear interpolation, clamped at the ends). Pixel variance g·max(x − b, 0) + floor
 * goes through the same interpolation with squared weights; the background estimate is the same
 * for every row, so its variance enters the sum n² times (it is fully correlated across rows).
 * Saturation flags follow the interpolation: a corrected pixel is flagged when either source is.
 */
export function sumBand(input: SumBandInput): SumBandResult {
  const { cleaner, signal, lineShape, background, backgroundVariance, floorVariance, gain, saturationLevel } = input;
  const L = background.length;
  const nRows = signal.end - signal.start;
  const centre = 0.5 * (signal.start + signal.end - 1);
  const counts = new Float64Array(L);
  const variance = new Float64Array(L);
  const saturated = new Uint8Array(L);
  const band = new Float32Array(nRows * L);
  const rowData = new Float64Array(L);
  const rowVar = new Float64Array(L);
  const values = cleaner.values;
  const sat = cleaner.saturated;
  const candidates = new Int32Array(L);
  const level = saturationLevel;
  let rejected = 0;
  for (let r = 0; r < nRows; r++) {
    const o = signal.start + r - centre;
    const shift = lineShape.tiltPxPerPx * o + lineShape.curvaturePxPerPx2 * o * o;
    const out = r * L;
    if (shift === 0 && cleaner.load(signal.start + r)) {
      // The common row, in one pass: the cleaner's first screen inline, pixels it clears summed
      // at once, the rest resolved afterwards. Each pixel still gets one addition per row, in
      // row order, so the sums are the same as cleaning the row first.
      const { cur, rawRow, screenThreshold: screen } = cleaner;
      const [a, b, c] = cleaner.neighbours as Float32Array[];
      const n = fusedRow(cur, rawRow, a, b, c, screen, background, floorVariance, gain, level, band, out, counts, variance, saturated, candidates);
      for (let k = 0; k < n; k++) {
        const p = candidates[k];
        const d = cleaner.resolve(p) - background[p];
        if (cleaner.wasReplaced) rejected++;
        band[out + p] = d;
        counts[p] += d;
        variance[p] += gain * 0.5 * (d + Math.abs(d)) + floorVariance[p];
        if (rawRow[p] >= level && !cleaner.wasHot) saturated[p] = 1;
      }
      continue;
    }
    rejected += cleaner.clean(signal.start + r);
    if (shift === 0) {
      for (let p = 0; p < L; p++) {
        const d = values[p] - background[p];
        band[out + p] = d;
        counts[p] += d;
        variance[p] += gain * 0.5 * (d + Math.abs(d)) + floorVariance[p];
      }
      if (cleaner.anySaturated) for (let p = 0; p < L; p++) saturated[p] |= sat[p];
      continue;
    }
    for (let p = 0; p < L; p++) {
      const d = values[p] - background[p];
      rowData[p] = d;
      rowVar[p] = gain * 0.5 * (d + Math.abs(d)) + floorVariance[p];
    }
    const whole = Math.floor(shift);
    const f = shift - whole;
    const w0 = 1 - f;
    const w0sq = w0 * w0;
    const w1sq = f * f;
    const anySat = cleaner.anySaturated;
    for (let p = 0; p < L; p++) {
      let i0 = p + whole;
      let i1 = i0 + 1;
      if (i0 < 0) i0 = 0;
      else if (i0 > L - 1) i0 = L - 1;
      if (i1 < 0) i1 = 0;
      else if (i1 > L - 1) i1 = L - 1;
      const d = w0 * rowData[i0] + f * rowData[i1];
      band[out + p] = d;
      counts[p] += d;
      variance[p] += w0sq * rowVar[i0] + w1sq * rowVar[i1];
      if (anySat && ((w0 > 0 && sat[i0]) || (f > 0 && sat[i1]))) saturated[p] = 1;
    }
  }
  const n2 = nRows * nRows;
  for (let p = 0; p < L; p++) variance[p] += n2 * backgroundVariance[p];
  return { counts, variance, saturated, band, bandRows: nRows, rejected };
}
