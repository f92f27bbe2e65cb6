import type { Lineout, Peak } from '../types.ts';
import { type Candidate, detectCandidates } from './detect.ts';
import { fitGaussians } from './gauss-fit.ts';
import { type PeakOptions, resolvePeakOptions } from './options.ts';
import { spatialWidthPx } from './spatial-width.ts';

export type { PeakOptions } from './options.ts';
export { fitGaussians, type GaussFitInput, type GaussFitResult } from './gauss-fit.ts';

const FWHM_PER_SIGMA = 2 * Math.sqrt(2 * Math.LN2);
/** Neighbouring maxima fitted jointly with a peak, at most (nearest first). */
const MAX_NEIGHBOURS = 4;

interface FitOutcome {
  peak: Peak;
}

function fitCandidate(
  lineout: Lineout,
  weight: Float64Array,
  baseline: Float64Array,
  candidates: Candidate[],
  index: number,
  windowFwhm: number,
): FitOutcome | null {
  const { counts } = lineout;
  const n = counts.length;
  const c = candidates[index];
  const fwhm0 = Math.min(Math.max(c.fwhmPx, 1), 60);
  const hw = Math.max(3, Math.ceil(windowFwhm * fwhm0));
  const lo = Math.max(0, c.pixel - hw);
  const hi = Math.min(n - 1, c.pixel + hw);
  // Blended neighbours: maxima whose line reaches into the window are fitted jointly.
  const neighbours = candidates
    .filter((q, j) => j !== index && q.pixel >= lo - Math.max(q.fwhmPx, 1) && q.pixel <= hi + Math.max(q.fwhmPx, 1))
    .sort((a, b) => Math.abs(a.pixel - c.pixel) - Math.abs(b.pixel - c.pixel))
    .slice(0, MAX_NEIGHBOURS);
  const lines = [c, ...neighbours];
  const count = lines.length;
  const m = hi - lo + 1;
  if (m < 3 * count + 3) return null;
  const x = new Float64Array(m);
  const y = new Float64Array(m);
  const w = new Float64Array(m);
  for (let i = 0; i < m; i++) {
    x[i] = lo + i;
    y[i] = counts[lo + i];
    w[i] = weight[lo + i];
  }
  const nParams = 3 * count + 2;
  const initial = new Float64Array(nParams);
  const lower = new Float64Array(nParams);
  const upper = new Float64Array(nParams);
  lines.forEach((q, k) => {
    const f = Math.min(Math.max(q.fwhmPx, 1), 60);
    initial[3 * k] = Math.max(q.height, 1e-6);
    initial[3 * k + 1] = q.pixel;
    initial[3 * k + 2] = f / FWHM_PER_SIGMA;
    lower[3 * k] = 0;
    upper[3 * k] = Infinity;
    const reach = k === 0 ? hw : Math.max(2, f / 2);
    lower[3 * k + 1] = k === 0 ? lo : q.pixel - reach;
    upper[3 * k + 1] = k === 0 ? hi : q.pixel + reach;
    lower[3 * k + 2] = 0.3;
    upper[3 * k + 2] = 2 * m;
  });
  initial[3 * count] = baseline[c.pixel];
  lower[3 * count] = -Infinity;
  upper[3 * count] = Infinity;
  lower[3 * count + 1] = -Infinity;
  upper[3 * count + 1] = Infinity;
  const fit = fitGaussians({ x, y, weight: w, count, initial, lower, upper, xRef: c.pixel });
  if (!fit) return null;
  const [amplitude, pixel, sigma] = fit.params;
  const cov = fit.covariance;
  const scale = fit.degreesOfFreedom > 0 ? Math.max(1, fit.chiSquare / fit.degreesOfFreedom) : 1;
  const varA = cov[0] * scale;
  const varMu = cov[nParams + 1] * scale;
  const varS = cov[2 * nParams + 2] * scale;
  const covAS = cov[2] * scale;
  // Garbage guard: a centre pinned to the window edge, a width at its bounds or a non-positive
  // amplitude means the window held no resolvable line.
  if (!Number.isFinite(pixel) || !(amplitude > 0) || !(varMu > 0) || !Number.isFinite(varMu)) return null;
  if (pixel <= lo || pixel >= hi || !(sigma > 0.3) || sigma >= 2 * m) return null;
  const fwhmPx = FWHM_PER_SIGMA * sigma;
  const pixelSigma = Math.sqrt(varMu);
  if (pixelSigma > fwhmPx) return null;
  const area = amplitude * sigma * Math.sqrt(2 * Math.PI);
  const areaVar = 2 * Math.PI * (sigma * sigma * varA + amplitude * amplitude * varS + 2 * amplitude * sigma * covAS);
  const areaSigma = Math.sqrt(Math.max(areaVar, 0));
  const snr = areaSigma > 0 ? area / areaSigma : Infinity;
  let saturated = false;
  if (lineout.saturated) {
    for (let p = Math.max(0, Math.round(pixel - fwhmPx)); p <= Math.min(n - 1, Math.round(pixel + fwhmPx)); p++) {
      if (lineout.saturated[p]) saturated = true;
    }
  }
  const spatial = lineout.band && lineout.bandRows > 0 ? spatialWidthPx(lineout.band, lineout.bandRows, n, pixel, fwhmPx, lineout.bandBinRows ?? 1) : Number.NaN;
  return { peak: { pixel, pixelSigma, fwhmPx, amplitude, area, areaSigma, snr, spatialWidthPx: spatial, saturated } };
}

/**
 * Finds the peaks of a lineout: detection on the smoothed, baseline-removed lineout against its
 * noise (from `variance`), then a weighted Gaussian + linear-baseline fit over ±`fitWindowFwhm`
 * FWHM per peak (neighbours that reach into the window fitted jointly) for the sub-pixel centre.
 *
 * `pixelSigma` and `areaSigma` come from the fit covariance (JᵀWJ)⁻¹, scaled by the reduced chi²
 * when that exceeds 1. `snr` is area / areaSigma. Peaks whose fit fails, leaves the window or has
 * an uncertainty larger than its width are dropped, as are peaks below `minSnr` after the fit.
 * Returns [] when there is no peak (the caller decides whether that is an error), sorted by pixel.
 *
 * @throws EngineError 'invalid_input' for a malformed lineout or options.
 */
export function findPeaks(lineout: Lineout, options?: PeakOptions): Peak[] {
  const opts = resolvePeakOptions(lineout, options);
  const { counts, variance } = lineout;
  const n = counts.length;
  if (n < 5) return [];
  // Weights 1/variance; a zero variance (noise-free data) gets the smallest positive one.
  let minPositive = Infinity;
  for (let i = 0; i < n; i++) if (variance[i] > 0 && variance[i] < minPositive) minPositive = variance[i];
  if (!Number.isFinite(minPositive)) minPositive = 1;
  const weight = new Float64Array(n);
  const safeVariance = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const v = variance[i] > 0 && Number.isFinite(variance[i]) ? variance[i] : minPositive;
    safeVariance[i] = v;
    weight[i] = 1 / v;
  }
  const { candidates, baseline } = detectCandidates(counts, safeVariance, opts);
  const fitted: Peak[] = [];
  for (let i = 0; i < candidates.length; i++) {
    const outcome = fitCandidate(lineout, weight, baseline, candidates, i, opts.fitWindowFwhm);
    if (outcome && outcome.peak.snr >= opts.minSnr) fitted.push(outcome.peak);
  }
  // Two maxima of one line (noise on a broad top) converge to the same centre: keep the stronger.
  fitted.sort((a, b) => b.snr - a.snr);
  const kept: Peak[] = [];
  for (const p of fitted) {
    if (kept.every((k) => Math.abs(k.pixel - p.pixel) >= 0.5 * Math.max(k.fwhmPx, p.fwhmPx))) kept.push(p);
    if (kept.length >= opts.maxPeaks) break;
  }
  return kept.sort((a, b) => a.pixel - b.pixel);
}
