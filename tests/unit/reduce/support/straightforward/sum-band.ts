import type { LineShape, SpatialBand } from '../../../../../shared/engine/types.ts';
import type { Strip } from './strip.ts';

/** Inputs of {@link sumBand}. */
export interface SumBandInput {
  strip: Strip;
  /** Strip row of the signal band's first row. */
  rowOffset: number;
  signal: SpatialBand;
  lineShape: LineShape;
  /** Background per spectral pixel, subtracted from every band row. */
  background: Float64Array;
  /** Variance of the background estimate per spectral pixel. */
  backgroundVariance: Float64Array;
  /** Noise floor variance per spectral pixel (read noise, plus background shot noise). */
  floorVariance: Float64Array;
  gain: number;
}

export interface SumBandResult {
  counts: Float64Array;
  variance: Float64Array;
  saturated: Uint8Array;
  band: Float32Array;
  bandRows: number;
  bandBinRows: number;
}

/** Bands of at least this many rows are kept in bins of four rows (the last partial bin dropped). */
const TALL_BAND_ROWS = 256;
const BIN_ROWS = 4;

/**
 * Background subtraction, tilt/curvature correction and summation of the signal band.
 *
 * Row r sits at spatial offset o = row − centre; a line there is displaced by
 * shift = tilt·o + curvature·o², so the corrected row at pixel p is the original sampled at
 * p + shift (linear interpolation, clamped at the ends). Pixel variance g·max(x − b, 0) + floor
 * goes through the same interpolation with squared weights; the background estimate is the same
 * for every row, so its variance enters the sum n² times (it is fully correlated across rows).
 * Saturation flags follow the interpolation: a corrected pixel is flagged when either source is.
 */
export function sumBand(input: SumBandInput): SumBandResult {
  const { strip, rowOffset, signal, lineShape, background, backgroundVariance, floorVariance, gain } = input;
  const L = strip.spectralLength;
  const nRows = signal.end - signal.start;
  const centre = 0.5 * (signal.start + signal.end - 1);
  const counts = new Float64Array(L);
  const variance = new Float64Array(L);
  const saturated = new Uint8Array(L);
  const binRows = nRows >= TALL_BAND_ROWS ? BIN_ROWS : 1;
  const bins = Math.floor(nRows / binRows);
  const band = new Float32Array(bins * L);
  // Each bin's sum, in row order, started from its first row.
  const binSum = new Float64Array(L);
  const keep = (r: number, p: number, d: number) => {
    if (Math.floor(r / binRows) >= bins) return;
    binSum[p] = r % binRows === 0 ? d : binSum[p] + d;
    if (r % binRows === binRows - 1) band[Math.floor(r / binRows) * L + p] = binSum[p];
  };
  const rowData = new Float64Array(L);
  const rowVar = new Float64Array(L);
  const values = strip.values;
  const sat = strip.saturated;
  for (let r = 0; r < nRows; r++) {
    const base = (rowOffset + r) * L;
    for (let p = 0; p < L; p++) {
      const d = values[base + p] - background[p];
      rowData[p] = d;
      rowVar[p] = gain * (d > 0 ? d : 0) + floorVariance[p];
    }
    const o = signal.start + r - centre;
    const shift = lineShape.tiltPxPerPx * o + lineShape.curvaturePxPerPx2 * o * o;
    if (shift === 0) {
      for (let p = 0; p < L; p++) {
        const d = rowData[p];
        keep(r, p, d);
        counts[p] += d;
        variance[p] += rowVar[p];
        if (sat[base + p]) saturated[p] = 1;
      }
      continue;
    }
    const whole = Math.floor(shift);
    const f = shift - whole;
    const w0 = 1 - f;
    const w0sq = w0 * w0;
    const w1sq = f * f;
    for (let p = 0; p < L; p++) {
      let i0 = p + whole;
      let i1 = i0 + 1;
      if (i0 < 0) i0 = 0;
      else if (i0 > L - 1) i0 = L - 1;
      if (i1 < 0) i1 = 0;
      else if (i1 > L - 1) i1 = L - 1;
      const d = w0 * rowData[i0] + f * rowData[i1];
      keep(r, p, d);
      counts[p] += d;
      variance[p] += w0sq * rowVar[i0] + w1sq * rowVar[i1];
      if ((w0 > 0 && sat[base + i0]) || (f > 0 && sat[base + i1])) saturated[p] = 1;
    }
  }
  const n2 = nRows * nRows;
  for (let p = 0; p < L; p++) variance[p] += n2 * backgroundVariance[p];
  return { counts, variance, saturated, band, bandRows: bins, bandBinRows: binRows };
}
