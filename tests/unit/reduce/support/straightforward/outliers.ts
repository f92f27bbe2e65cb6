import { medianInPlace } from '../../../../../shared/engine/reduce/robust.ts';
import type { Strip } from './strip.ts';

/** Median of up to four finite values in `buf[0..n)`; NaN when n is 0. */
function smallMedian(buf: Float64Array, n: number): number {
  // Insertion sort: n ≤ 4.
  for (let i = 1; i < n; i++) {
    const v = buf[i];
    let j = i - 1;
    while (j >= 0 && buf[j] > v) {
      buf[j + 1] = buf[j];
      j--;
    }
    buf[j + 1] = v;
  }
  if (n === 0) return Number.NaN;
  return n % 2 === 1 ? buf[n >> 1] : 0.5 * (buf[(n >> 1) - 1] + buf[n >> 1]);
}

/** Settings of {@link rejectOutliers}. */
export interface OutlierSettings {
  /** Strip rows [rowStart, rowEnd) to clean; the rows around them serve only as neighbours. */
  rowStart: number;
  rowEnd: number;
  gain: number;
  /** Noise floor variance per pixel (read noise and background shot noise), counts². */
  floorVariance: number;
  /** Pedestal under the pixel values (bias or diffuse background), so shot noise uses value − pedestal. */
  pedestal: number;
  sigmas: number;
  /** When false only NaN pixels are replaced. */
  rejectHot: boolean;
}

/**
 * Replaces NaN pixels and hot/cosmic pixels in place and returns how many were replaced.
 *
 * A pixel is an outlier when it stands more than `sigmas` noise sigmas AND more than its own
 * reference level above both the median of its 4 spatial neighbours (rows ±1, ±2) and the median
 * of its 4 spectral neighbours (pixels ±1, ±2); the reference is the larger of the two medians.
 * Harmonic lines are several pixels wide spectrally and extended spatially, so at least one of
 * the two medians follows the line and the line survives; a hit of 1-2 pixels has background in
 * both medians. The replacement is the spatial median, which keeps the spectral line profile of
 * the neighbouring rows. A replaced saturated pixel no longer flags saturation.
 */
export function rejectOutliers(strip: Strip, settings: OutlierSettings): number {
  const { rows, spectralLength: L } = strip;
  const source = strip.values.slice();
  const out = strip.values;
  const buf = new Float64Array(4);
  const { gain, floorVariance, pedestal } = settings;
  const k2 = settings.sigmas * settings.sigmas;
  let replaced = 0;
  for (let r = settings.rowStart; r < settings.rowEnd; r++) {
    const interior = r >= 2 && r + 2 < rows;
    const row = r * L;
    for (let p = 0; p < L; p++) {
      const i = row + p;
      const v = source[i];
      const isNan = v !== v;
      if (!isNan && interior) {
        if (!settings.rejectHot) continue;
        // Fast exit, valid because the reference is at least the smallest spatial neighbour and
        // the threshold grows with the reference: not an outlier even against that minimum.
        // (A NaN neighbour makes every comparison false and falls through to the full test.)
        let mn = source[i - 2 * L];
        const b = source[i - L];
        const c = source[i + L];
        const d = source[i + 2 * L];
        if (b < mn) mn = b;
        if (c < mn) mn = c;
        if (d < mn) mn = d;
        const excess = v - mn;
        const level = mn - pedestal > 0 ? mn - pedestal : 0;
        if (excess <= level || excess * excess <= k2 * (gain * level + floorVariance)) continue;
      } else if (!isNan && !settings.rejectHot) {
        continue;
      }
      let n = 0;
      for (let dr = -2; dr <= 2; dr++) {
        if (dr === 0) continue;
        const rr = r + dr;
        if (rr < 0 || rr >= rows) continue;
        const u = source[rr * L + p];
        if (u === u) buf[n++] = u;
      }
      const refSpatial = smallMedian(buf, n);
      let m = 0;
      for (let dp = -2; dp <= 2; dp++) {
        if (dp === 0) continue;
        const pp = p + dp;
        if (pp < 0 || pp >= L) continue;
        const u = source[row + pp];
        if (u === u) buf[m++] = u;
      }
      const refSpectral = smallMedian(buf, m);
      if (isNan) {
        out[i] = refSpatial === refSpatial ? refSpatial : refSpectral === refSpectral ? refSpectral : pedestal;
        replaced++;
        continue;
      }
      const ref = Math.max(refSpatial === refSpatial ? refSpatial : -Infinity, refSpectral === refSpectral ? refSpectral : -Infinity);
      if (!Number.isFinite(ref)) continue;
      const level = Math.max(ref - pedestal, 0);
      const excess = v - ref;
      if (excess > level && excess * excess > k2 * (gain * level + floorVariance)) {
        out[i] = refSpatial === refSpatial ? refSpatial : ref;
        strip.saturated[i] = 0;
        replaced++;
      }
    }
  }
  return replaced;
}

/** Median of a strided subsample of the finite strip values in rows [rowStart, rowEnd). */
export function stripPedestal(strip: Strip, rowStart: number, rowEnd: number): number {
  const L = strip.spectralLength;
  const total = (rowEnd - rowStart) * L;
  const step = Math.max(1, Math.floor(total / 20000));
  const scratch = new Float64Array(Math.ceil(total / step));
  let n = 0;
  for (let i = rowStart * L; i < rowEnd * L; i += step) {
    const v = strip.values[i];
    if (v === v) scratch[n++] = v;
  }
  return n > 0 ? medianInPlace(scratch, n) : 0;
}
