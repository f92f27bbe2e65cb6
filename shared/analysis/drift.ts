/**
 * Drift of one frame against the calibration applied to it: where the comb lines sit on this
 * frame versus where the calibration puts them. A camera or grating that moved shifts every line
 * by about the same number of pixels, so the estimate is a weighted mean of per-line offsets.
 *
 * Matching is our own, wider than the labelling in `applyCalibration` (which refuses lines farther
 * than ~3σ): each predicted line takes the nearest detected peak within 0.45 of the local line
 * spacing, then offsets farther than max(0.5 px, 3·1.4826·MAD) from their median are dropped, so a
 * stray peak does not pull the mean. A move larger than half a line spacing aliases onto the
 * neighbouring harmonic and cannot be seen this way (the labels would be wrong too).
 *
 * Uncertainty: the peaks' centroid σ only, inflated by the Birge ratio √(χ²/(n−1)) when the lines
 * scatter more than their σ say. The calibration's own band is the same for every frame it is
 * applied to, so it does not enter a frame-to-frame check.
 */
import { HC_EV_NM } from '../engine/constants.ts';
import { calibrationDispersionNmPerPixel, evaluateCalibration } from '../engine/dispersion/evaluate.ts';
import type { Calibration } from '../engine/types.ts';

export interface DriftThreshold {
  /** Flag only when |shift| exceeds this many of its own σ… */
  sigma: number;
  /** …and exceeds this many pixels. */
  px: number;
}

/**
 * Default: 3σ keeps false alarms from noise near 0.3 % of frames (two-sided normal tail; common
 * practice), and 1 px is the move where labelled energies are off by a whole pixel's dispersion
 * and the labelling window (3σ, at most 0.3 of the line spacing) starts to miss lines.
 */
export const DEFAULT_DRIFT_THRESHOLD: DriftThreshold = { sigma: 3, px: 1 };

/** The flag rule: |shift| above `sigma` of its σ and above `px` pixels. */
export function exceedsThreshold(shiftPx: number | null, shiftPxSigma: number | null, threshold: DriftThreshold): boolean {
  if (shiftPx === null || shiftPxSigma === null) return false;
  return Math.abs(shiftPx) > threshold.px && Math.abs(shiftPx) > threshold.sigma * shiftPxSigma;
}

/** Centroid σ below this (px) is floored, so one very bright line does not take all the weight. */
const MIN_PIXEL_SIGMA = 0.01;

export interface DriftLine {
  harmonic: number;
  diffractionOrder: number;
  predictedPixel: number;
  observedPixel: number;
  offsetPx: number;
  offsetPxSigma: number;
  offsetMeV: number;
  used: boolean;
}

export interface Drift {
  /** Weighted mean of observed − predicted pixel over the lines used; null with no line matched. */
  shiftPx: number | null;
  shiftPxSigma: number | null;
  /** Weighted mean of (calibrated − true) photon energy of the lines, meV. */
  shiftMeV: number | null;
  shiftMeVSigma: number | null;
  /** Lines used in the mean. */
  matchedPeaks: number;
  /** χ²/(n−1) of the offsets about their mean; null with fewer than 2 lines. */
  reducedChiSquare: number | null;
  flagged: boolean;
  threshold: DriftThreshold;
  lines: DriftLine[];
}

export interface DriftInput {
  /** Predicted lines: the orders `applyCalibration` reported (every first-order line in range, higher orders when seen). */
  orders: ReadonlyArray<{ harmonic: number; diffractionOrder: number; predictedPixel: number }>;
  /** All detected peaks of the lineout. */
  peaks: ReadonlyArray<{ pixel: number; pixelSigma: number }>;
  calibration: Calibration;
}

function median(values: number[]): number {
  const s = [...values].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
}

function weightedMean(values: number[], sigmas: number[]) {
  let sw = 0;
  let swx = 0;
  values.forEach((v, i) => {
    const w = 1 / sigmas[i] ** 2;
    sw += w;
    swx += w * v;
  });
  const mean = swx / sw;
  let chi = 0;
  values.forEach((v, i) => (chi += ((v - mean) / sigmas[i]) ** 2));
  const reduced = values.length > 1 ? chi / (values.length - 1) : null;
  const sigma = Math.sqrt(1 / sw) * Math.max(1, Math.sqrt(reduced ?? 1));
  return { mean, sigma, reduced };
}

/** Drift of one applied frame, flagged against `threshold` (default {@link DEFAULT_DRIFT_THRESHOLD}). */
export function computeDrift(input: DriftInput, threshold: DriftThreshold = DEFAULT_DRIFT_THRESHOLD): Drift {
  const cal = input.calibration;
  const predicted = [...input.orders].sort((a, b) => a.predictedPixel - b.predictedPixel);
  const firstOrder = predicted.filter((o) => o.diffractionOrder === 1).map((o) => o.predictedPixel);
  const spacingAt = (pixel: number): number => {
    let best = Number.POSITIVE_INFINITY;
    for (const p of firstOrder) if (p !== pixel) best = Math.min(best, Math.abs(p - pixel));
    return Number.isFinite(best) ? best : cal.pixelCount;
  };
  const used = new Set<number>();
  const lines: DriftLine[] = [];
  const pixelsForSlope: number[] = [];
  const meVPerPx: number[] = [];
  for (const order of predicted) {
    const window = 0.45 * spacingAt(order.predictedPixel);
    let bestIndex = -1;
    let bestDistance = window;
    input.peaks.forEach((peak, index) => {
      const d = Math.abs(peak.pixel - order.predictedPixel);
      if (d <= bestDistance && !used.has(index)) {
        bestDistance = d;
        bestIndex = index;
      }
    });
    if (bestIndex < 0) continue;
    used.add(bestIndex);
    const peak = input.peaks[bestIndex];
    lines.push({
      harmonic: order.harmonic,
      diffractionOrder: order.diffractionOrder,
      predictedPixel: order.predictedPixel,
      observedPixel: peak.pixel,
      offsetPx: peak.pixel - order.predictedPixel,
      offsetPxSigma: Math.max(MIN_PIXEL_SIGMA, Number.isFinite(peak.pixelSigma) ? peak.pixelSigma : 1),
      offsetMeV: 0,
      used: false,
    });
    pixelsForSlope.push(order.predictedPixel);
  }
  if (lines.length > 0) {
    // dE/dp of order m at pixel p: E = m·hc/λ₁(p) → dE/dp = −m·hc/λ₁²·dλ₁/dp (eV per px).
    const { wavelengthNm } = evaluateCalibration(cal, pixelsForSlope);
    const slope = calibrationDispersionNmPerPixel(cal, pixelsForSlope);
    lines.forEach((line, i) => {
      const evPerPx = (-line.diffractionOrder * HC_EV_NM * slope[i]) / (wavelengthNm[i] * wavelengthNm[i]);
      line.offsetMeV = 1000 * evPerPx * line.offsetPx;
      meVPerPx.push(1000 * Math.abs(evPerPx));
    });
    const m = median(lines.map((l) => l.offsetPx));
    const mad = median(lines.map((l) => Math.abs(l.offsetPx - m)));
    const keep = Math.max(0.5, 3 * 1.4826 * mad);
    for (const line of lines) line.used = Math.abs(line.offsetPx - m) <= keep;
  }
  const usedIndex = lines.flatMap((l, i) => (l.used ? [i] : []));
  const usedLines = usedIndex.map((i) => lines[i]);
  const base = { matchedPeaks: usedLines.length, threshold, lines };
  if (usedLines.length === 0) return { shiftPx: null, shiftPxSigma: null, shiftMeV: null, shiftMeVSigma: null, reducedChiSquare: null, flagged: false, ...base };
  const px = weightedMean(
    usedLines.map((l) => l.offsetPx),
    usedLines.map((l) => l.offsetPxSigma),
  );
  const mev = weightedMean(
    usedLines.map((l) => l.offsetMeV),
    usedIndex.map((i) => lines[i].offsetPxSigma * meVPerPx[i]),
  );
  const flagged = exceedsThreshold(px.mean, px.sigma, threshold);
  return { shiftPx: px.mean, shiftPxSigma: px.sigma, shiftMeV: mev.mean, shiftMeVSigma: mev.sigma, reducedChiSquare: px.reduced, flagged, ...base };
}
