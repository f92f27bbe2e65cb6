import { fitGaussians } from './gauss-fit.ts';

/** Spatial samples fitted, at most: beyond this the fit costs time without sharpening σ. */
const MAX_FIT_POINTS = 128;

/**
 * RMS width across the band rows (spatial axis) of a line at `pixel` with width `fwhmPx`: the
 * band is summed over the line's spectral window (±1 FWHM), the flanks (2-3 FWHM out, per row)
 * are subtracted as local continuum, and a Gaussian plus constant is fitted to the resulting
 * spatial profile; its sigma is the RMS width. A fit is used rather than the second moment
 * because noise in the far rows dominates a raw second moment. NaN when the fit fails.
 *
 * Rows may come binned (`rowsPerBin` band rows summed per row of `band`, as reduce keeps tall
 * bands), and a tall profile is fitted in coarser bins still: at most {@link MAX_FIT_POINTS} of
 * them and never wider than a quarter of the moment estimate of the width. Summing W unit-spaced
 * rows convolves the profile with a W-point box, whose variance (W² − 1)/12 is taken off the
 * fitted σ². The bins' statistics are the rows' (counts add); the fit is ~W× cheaper.
 * Returns the width in band rows.
 */
export function spatialWidthPx(band: Float32Array, bandRows: number, spectralLength: number, pixel: number, fwhmPx: number, rowsPerBin = 1): number {
  if (bandRows < 4 || band.length !== bandRows * spectralLength) return Number.NaN;
  const L = spectralLength;
  const lo = Math.max(0, Math.round(pixel - fwhmPx));
  const hi = Math.min(L - 1, Math.round(pixel + fwhmPx));
  const inner = hi - lo + 1;
  const flank: number[] = [];
  for (let p = Math.round(pixel - 3 * fwhmPx); p <= Math.round(pixel - 2 * fwhmPx); p++) if (p >= 0 && p < L) flank.push(p);
  for (let p = Math.round(pixel + 2 * fwhmPx); p <= Math.round(pixel + 3 * fwhmPx); p++) if (p >= 0 && p < L) flank.push(p);
  // x: the mean band row of each stored row.
  const x = new Float64Array(bandRows);
  const y = new Float64Array(bandRows);
  for (let s = 0; s < bandRows; s++) {
    const row = s * L;
    let sum = 0;
    for (let p = lo; p <= hi; p++) sum += band[row + p];
    if (flank.length > 0) {
      let f = 0;
      for (const p of flank) f += band[row + p];
      sum -= (f / flank.length) * inner;
    }
    x[s] = s * rowsPerBin + 0.5 * (rowsPerBin - 1);
    y[s] = sum;
  }
  let total = 0;
  let first = 0;
  for (let s = 0; s < bandRows; s++) {
    const v = Math.max(y[s], 0);
    total += v;
    first += v * x[s];
  }
  if (!(total > 0)) return Number.NaN;
  const mean = first / total;
  let second = 0;
  for (let s = 0; s < bandRows; s++) second += Math.max(y[s], 0) * (x[s] - mean) ** 2;
  const spanRows = bandRows * rowsPerBin;
  const sigma0 = Math.min(Math.max(Math.sqrt(second / total), 0.5), spanRows / 2);
  const merge = Math.max(1, Math.min(Math.ceil(bandRows / MAX_FIT_POINTS), Math.floor(sigma0 / (4 * rowsPerBin))));
  const binned = merge > 1 ? binProfile(x, y, merge) : { x, y };
  const boxRows = rowsPerBin * merge;
  const boxVariance = (boxRows * boxRows - 1) / 12;
  const points = binned.x.length;
  let peakBin = 0;
  for (let i = 1; i < points; i++) if (binned.y[i] > binned.y[peakBin]) peakBin = i;
  const fit = fitGaussians({
    x: binned.x,
    y: binned.y,
    weight: new Float64Array(points).fill(1),
    count: 1,
    initial: Float64Array.from([binned.y[peakBin], mean, Math.sqrt(sigma0 * sigma0 + boxVariance), 0, 0]),
    lower: Float64Array.from([0, -0.5, 0.3, -Infinity, -Infinity]),
    upper: Float64Array.from([Infinity, spanRows - 0.5, spanRows, Infinity, Infinity]),
    xRef: 0.5 * (spanRows - 1),
  });
  if (!fit) return Number.NaN;
  const fittedSigma = fit.params[2];
  if (!(fit.params[0] > 0) || !(fittedSigma * fittedSigma > boxVariance) || fittedSigma >= spanRows) return Number.NaN;
  const sigma = Math.sqrt(fittedSigma * fittedSigma - boxVariance);
  if (!(sigma > 0.3)) return Number.NaN;
  return sigma;
}

/**
 * Sums of `merge` consecutive samples, at their mean position; a last partial bin is dropped,
 * so every bin sums the same number of rows (equal weights stay equal).
 */
function binProfile(x: Float64Array, y: Float64Array, merge: number): { x: Float64Array; y: Float64Array } {
  const bins = Math.floor(y.length / merge);
  const bx = new Float64Array(bins);
  const by = new Float64Array(bins);
  for (let b = 0; b < bins; b++) {
    let sum = 0;
    let position = 0;
    for (let s = b * merge; s < (b + 1) * merge; s++) {
      sum += y[s];
      position += x[s];
    }
    bx[b] = position / merge;
    by[b] = sum;
  }
  return { x: bx, y: by };
}
