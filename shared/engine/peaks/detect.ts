import { runningMedian } from '../reduce/robust.ts';

/** A local maximum of the smoothed lineout that passed the threshold. */
export interface Candidate {
  pixel: number;
  /** Smoothed, baseline-removed height, counts. */
  height: number;
  snr: number;
  /** First FWHM estimate from the half-height crossings, pixels. */
  fwhmPx: number;
}

export interface Detection {
  candidates: Candidate[];
  /** Running-median baseline of the smoothed lineout, counts. */
  baseline: Float64Array;
}

/**
 * Smooths the lineout with a Gaussian kernel (variance through the squared kernel), removes a
 * running-median baseline, and returns the local maxima whose height over the smoothed noise
 * reaches `minSnr`, thinned to `minSeparationPx` keeping the higher ones.
 */
export function detectCandidates(
  counts: Float64Array,
  variance: Float64Array,
  settings: { minSnr: number; minSeparationPx: number; smoothingPx: number; baselineHalfWidthPx: number },
): Detection {
  const n = counts.length;
  const half = Math.max(1, Math.ceil(3 * settings.smoothingPx));
  const kernel = new Float64Array(2 * half + 1);
  let norm = 0;
  for (let j = -half; j <= half; j++) {
    const v = Math.exp(-0.5 * (j / settings.smoothingPx) ** 2);
    kernel[j + half] = v;
    norm += v;
  }
  for (let j = 0; j < kernel.length; j++) kernel[j] /= norm;
  const smooth = new Float64Array(n);
  const smoothVar = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    let s = 0;
    let v = 0;
    let wsum = 0;
    for (let j = -half; j <= half; j++) {
      const k = i + j;
      if (k < 0 || k >= n) continue;
      const w = kernel[j + half];
      s += w * counts[k];
      v += w * w * variance[k];
      wsum += w;
    }
    // Renormalise at the ends so the edge pixels are not dimmed.
    smooth[i] = s / wsum;
    smoothVar[i] = v / (wsum * wsum);
  }
  const baseline = runningMedian(smooth, settings.baselineHalfWidthPx);
  const residual = new Float64Array(n);
  for (let i = 0; i < n; i++) residual[i] = smooth[i] - baseline[i];
  const found: Candidate[] = [];
  for (let i = 1; i < n - 1; i++) {
    const h = residual[i];
    if (!(h > 0) || h < residual[i - 1] || h <= residual[i + 1]) continue;
    const snr = h / Math.sqrt(Math.max(smoothVar[i], 1e-300));
    if (snr < settings.minSnr) continue;
    // Half-height crossings, linearly interpolated, for the first width estimate.
    let l = i;
    while (l > 0 && residual[l - 1] > 0.5 * h) l--;
    let r = i;
    while (r < n - 1 && residual[r + 1] > 0.5 * h) r++;
    const left = l > 0 ? l - (residual[l] - 0.5 * h) / (residual[l] - residual[l - 1]) : l;
    const right = r < n - 1 ? r + (residual[r] - 0.5 * h) / (residual[r] - residual[r + 1]) : r;
    // Undo the smoothing broadening (FWHM² adds for Gaussians).
    const smoothFwhm = 2.3548 * settings.smoothingPx;
    const observed = Math.max(right - left, 1);
    const fwhmPx = Math.sqrt(Math.max(observed * observed - smoothFwhm * smoothFwhm, 1));
    found.push({ pixel: i, height: h, snr, fwhmPx });
  }
  found.sort((a, b) => b.height - a.height);
  const kept: Candidate[] = [];
  for (const c of found) {
    if (kept.every((k) => Math.abs(k.pixel - c.pixel) >= settings.minSeparationPx)) kept.push(c);
  }
  kept.sort((a, b) => a.pixel - b.pixel);
  return { candidates: kept, baseline };
}
