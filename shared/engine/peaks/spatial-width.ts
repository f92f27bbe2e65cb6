import { fitGaussians } from './gauss-fit.ts';

/**
 * RMS width across the band rows (spatial axis) of a line at `pixel` with width `fwhmPx`: the
 * band is summed over the line's spectral window (±1 FWHM), the flanks (2-3 FWHM out, per row)
 * are subtracted as local continuum, and a Gaussian plus constant is fitted to the resulting
 * spatial profile; its sigma is the RMS width. A fit is used rather than the second moment
 * because noise in the far rows dominates a raw second moment. NaN when the fit fails.
 */
export function spatialWidthPx(band: Float32Array, bandRows: number, spectralLength: number, pixel: number, fwhmPx: number): number {
  if (bandRows < 4 || band.length !== bandRows * spectralLength) return Number.NaN;
  const L = spectralLength;
  const lo = Math.max(0, Math.round(pixel - fwhmPx));
  const hi = Math.min(L - 1, Math.round(pixel + fwhmPx));
  const inner = hi - lo + 1;
  const flank: number[] = [];
  for (let p = Math.round(pixel - 3 * fwhmPx); p <= Math.round(pixel - 2 * fwhmPx); p++) if (p >= 0 && p < L) flank.push(p);
  for (let p = Math.round(pixel + 2 * fwhmPx); p <= Math.round(pixel + 3 * fwhmPx); p++) if (p >= 0 && p < L) flank.push(p);
  const x = new Float64Array(bandRows);
  const y = new Float64Array(bandRows);
  let peakRow = 0;
  for (let s = 0; s < bandRows; s++) {
    const row = s * L;
    let sum = 0;
    for (let p = lo; p <= hi; p++) sum += band[row + p];
    if (flank.length > 0) {
      let f = 0;
      for (const p of flank) f += band[row + p];
      sum -= (f / flank.length) * inner;
    }
    x[s] = s;
    y[s] = sum;
    if (sum > y[peakRow]) peakRow = s;
  }
  let total = 0;
  let first = 0;
  for (let s = 0; s < bandRows; s++) {
    const v = Math.max(y[s], 0);
    total += v;
    first += v * s;
  }
  if (!(total > 0)) return Number.NaN;
  const mean = first / total;
  let second = 0;
  for (let s = 0; s < bandRows; s++) second += Math.max(y[s], 0) * (s - mean) ** 2;
  const sigma0 = Math.min(Math.max(Math.sqrt(second / total), 0.5), bandRows / 2);
  const fit = fitGaussians({
    x,
    y,
    weight: new Float64Array(bandRows).fill(1),
    count: 1,
    initial: Float64Array.from([y[peakRow], mean, sigma0, 0, 0]),
    lower: Float64Array.from([0, -0.5, 0.3, -Infinity, -Infinity]),
    upper: Float64Array.from([Infinity, bandRows - 0.5, bandRows, Infinity, Infinity]),
    xRef: 0.5 * (bandRows - 1),
  });
  if (!fit) return Number.NaN;
  const sigma = fit.params[2];
  if (!(fit.params[0] > 0) || !(sigma > 0.3) || sigma >= bandRows) return Number.NaN;
  return sigma;
}
