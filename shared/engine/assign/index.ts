/**
 * Order assignment: decide the harmonic order q (and diffraction order m) of every peak, or say
 * honestly that the data cannot decide.
 *
 * Method (see ENGINE-NOTES.md): hypotheses are seeded from pairs of strong clean peaks (the
 * neighbours of the strongest, and every pair among the five strongest, so that m = 2 lines or
 * false peaks between two first-order lines do not block a seed), placed by a linear solve of
 * centre and distance (no iterative fit), pruned by the realignment ranges, ranked by how many
 * peaks they put on predicted lines, de-duplicated (seeds that differ by a uniform shift of their
 * harmonics are one pattern; a few seeds that explain more strong peaks once their m = 2 lines
 * count are grown too, for frames whose bright m = 2 lines outnumber the m = 1 comb), then grown
 * outward with the physical grating model (grating.ts), every nuisance parameter (centre,
 * distance, incidence, tilt, λ0) free inside soft walls (search.ts). Leftover peaks are tested
 * as m = 2 lines (position, and a narrower spatial profile when measured; never when the m = 1
 * partner should be on the detector and is not seen) and kept only if the whole labelling scores
 * better with them. The slips of the leading labelling (every first-order label ±1 and ±2 parity
 * steps) are then fitted in earnest from several starts, because they are exactly the rivals
 * that make a confident answer wrong. Labellings are compared by −2 ln L (score.ts); `unique`
 * only when every contradicting labelling trails by ≥ 16 (≈ 4σ).
 *
 * Trust: a peak within 1.5 FWHM of the detector edge (a possibly truncated line) has its position
 * uncertainty raised to 0.15 FWHM and seeds no hypothesis; a saturated peak ranks as bright
 * whatever its fitted SNR and is not held to the "m = 2 is fainter than m = 1" test.
 *
 * Assumptions, stated in the result's notes:
 * - the effective driver wavelength lies in [nominal·(1 − tol), nominal] (ionisation blue-shifts
 *   harmonics; it does not red-shift them);
 * - without a known-wavelength anchor the absolute scale is known only to the driver tolerance:
 *   λ0 moves freely inside its wall while labellings are compared (the geometry can absorb it),
 *   is reported at the middle of that interval, and `scaleSigmaRelative` is chosen so that
 *   ±2σ is the central 95 % of the uniform prior (0.95 · tol / 4). A pin fixes an order, not the
 *   scale: pins do not make a calibration anchored.
 */
import { EngineError } from '../errors.ts';
import { pixelToWavelengthNm, wavelengthToPixel } from '../grating.ts';
import type { Peak } from '../types.ts';
import { stackTransmission } from './filters.ts';
import { buildPriors, DEFAULT_BLUE_SHIFT_PCT, DEFAULT_DRIVER_SIGMA_PCT, DEFAULT_RANGES, driverPriorMoments, driverSpanNm } from './priors.ts';
import {
  geometryOf,
  predictPixel,
  P_ANGLE,
  P_CENTER,
  P_DISTANCE,
  P_DRIVER,
  P_INCIDENCE,
  P_TILT,
  PARAMETER_COUNT,
  PARAMETER_NAMES,
  type ModelContext,
  type ModelFit,
  type ModelPoint,
  type Wall,
} from './model.ts';
import { rawScore, SECOND_ORDER_COST, spuriousCost, totalScore, type RawScore } from './score.ts';
import {
  allowedHarmonic,
  grow,
  harmonicEnergyEv,
  harmonicStep,
  linearSeed,
  localSpacing,
  nearestLine,
  opaqueTransmission,
  predictLines,
  refit,
  seedStart,
  type SearchContext,
  type SearchPeak,
} from './search.ts';
import type { AssignInput, AssignResult, Hypothesis, PeakLabel } from './types.ts';
import { decideVerdict, FIT_FLOOR_PX } from './verdict.ts';

export type { AssignInput, AssignResult, Hypothesis, PeakLabel, RealignmentRanges, FilterSpec, VerdictGate } from './types.ts';

export { DEFAULT_RANGES, unanchoredScaleSigma } from './priors.ts';

/** Margin in −2 ln L for `unique` (≈ 4σ). */
export const UNIQUE_MARGIN = 16;
/** Smallest centroid uncertainty believed, px (sub-0.005 px claims are numerical, not physical). */
const SIGMA_FLOOR_PX = 0.005;
const MAX_GROWN_SEEDS = 12;
/** Slips of one seed pattern grown at most (the most plausible geometry of a pattern need not be the true slip when the walls are wide). */
const MAX_GROWN_PER_PATTERN = 3;
/** Extra seeds grown because they explain more strong peaks once m = 2 lines count (see searchCandidates). */
const MAX_SECOND_ORDER_SEEDS = 2;
/** A one-step slip trailing by this many unique margins makes the two-step slip in that direction pointless to fit. */
const HOPELESS_SLIP_MARGINS = 50;
/** A peak whose centre lies within this many FWHM of the detector edge counts as an edge peak. */
const EDGE_FWHM = 1.5;
/** Position uncertainty of an edge peak, in FWHM (a truncated line's centre can be off by a fair part of its width). */
const EDGE_SIGMA_FWHM = 0.15;
/**
 * Largest spatial width of an m = 2 line relative to the m = 1 lines beside it: with its m = 1
 * partner seen, and without (divergence ∝ roughly 1/√q, so the m = 2 line of q beside the m = 1
 * line of q/2 is about 1/√2 as wide; common practice).
 */
const PARTNERED_WIDTH_RATIO = 0.95;
const UNPARTNERED_WIDTH_RATIO = 0.8;
/** Position uncertainty floor of a saturated peak, in FWHM. */
const SATURATED_SIGMA_FWHM = 0.01;

function failed(message: string, notes: string[] = []): AssignResult {
  return {
    status: 'failed',
    message,
    gates: [],
    priorSigma: {},
    hypotheses: [],
    best: null,
    anchored: false,
    driverNm: Number.NaN,
    driverSigmaNm: Number.NaN,
    scaleSigmaRelative: Number.NaN,
    reducedChiSquare: Number.NaN,
    notes,
  };
}

interface Prepared {
  ctx: SearchContext;
  /** usable index → index in the caller's peak array. */
  original: number[];
  notes: string[];
}

function prepare(peaks: Peak[], input: AssignInput): Prepared | string {
  const { profile, pixelCount, driverNm, parity } = input;
  const sigmaPct = input.driverTolerancePct ?? DEFAULT_DRIVER_SIGMA_PCT;
  const blueShiftPct = input.blueShiftPct ?? DEFAULT_BLUE_SHIFT_PCT;
  if (!Number.isFinite(driverNm) || driverNm <= 0) return 'The driver wavelength must be a positive number of nm.';
  if (!Number.isFinite(sigmaPct) || sigmaPct < 0 || sigmaPct >= 10) return 'The driver tolerance (1σ) must be a percentage from 0 to 10.';
  if (!Number.isFinite(blueShiftPct) || blueShiftPct < 0 || blueShiftPct >= 10) return 'The blue-shift allowance must be a percentage from 0 to 10.';
  if (!Number.isInteger(pixelCount) || pixelCount < 8) return 'The spectral pixel count must be an integer of at least 8.';
  if (parity !== 'odd' && parity !== 'all') return "Parity must be 'odd' or 'all'.";
  for (const key of ['grooveDensityPerMm', 'detectorDistanceMm', 'pixelPitchUm'] as const) {
    if (!(Number.isFinite(profile[key]) && profile[key] > 0)) return `The instrument profile's ${key} must be a positive number.`;
  }
  if (!(Number.isFinite(profile.incidenceAngleDeg) && Math.abs(profile.incidenceAngleDeg) < 90)) return "The instrument profile's incidenceAngleDeg must lie between −90° and 90°.";
  if (profile.detectorTiltDeg !== undefined && !(Number.isFinite(profile.detectorTiltDeg) && Math.abs(profile.detectorTiltDeg) < 45)) return "The instrument profile's detectorTiltDeg must lie between −45° and 45°.";
  const ranges = { ...DEFAULT_RANGES, ...(input.ranges ?? {}) };
  const driver = { nominalNm: driverNm, sigmaRelative: sigmaPct / 100, blueShiftRelative: blueShiftPct / 100 };
  const priors = buildPriors(profile, pixelCount, driver, ranges);
  const centralAngleKnown = priors.centralAngleKnown;
  let transmission: (e: number) => number;
  try {
    transmission = input.transmission ?? stackTransmission(input.filters ?? []);
  } catch (error) {
    return error instanceof Error ? error.message : String(error);
  }

  const usable: { peak: Peak; index: number }[] = [];
  peaks.forEach((peak, index) => {
    if (Number.isFinite(peak.pixel) && peak.pixel > -0.5 && peak.pixel < pixelCount - 0.5) usable.push({ peak, index });
  });
  usable.sort((a, b) => a.peak.pixel - b.peak.pixel);
  const searchPeaks: SearchPeak[] = usable.map(({ peak }) => {
    const fwhmPx = Number.isFinite(peak.fwhmPx) && peak.fwhmPx > 0 ? peak.fwhmPx : 3;
    const edgeDistancePx = Math.min(peak.pixel + 0.5, pixelCount - 0.5 - peak.pixel);
    // A line within EDGE_FWHM widths of the detector edge is cut by it: its fitted centre is pulled
    // inward and its area is short, so its position is trusted only to a fraction of its width.
    const edge = edgeDistancePx < EDGE_FWHM * fwhmPx;
    let sigmaPx = Math.max(Number.isFinite(peak.pixelSigma) && peak.pixelSigma > 0 ? peak.pixelSigma : 0.5, SIGMA_FLOOR_PX);
    if (edge) sigmaPx = Math.max(sigmaPx, EDGE_SIGMA_FWHM * fwhmPx);
    // A clipped (saturated) line's centre is fitted on its flanks only; its area is a lower bound.
    if (peak.saturated) sigmaPx = Math.max(sigmaPx, SATURATED_SIGMA_FWHM * fwhmPx);
    return {
      pixel: peak.pixel,
      sigmaPx,
      snr: Number.isFinite(peak.snr) ? peak.snr : 1,
      area: Number.isFinite(peak.area) && peak.area > 0 ? peak.area : Math.max(peak.amplitude * peak.fwhmPx, 1e-12),
      spatialWidthPx: peak.spatialWidthPx,
      fwhmPx,
      edge,
      saturated: peak.saturated === true,
    };
  });

  const { nominal, walls } = priors;
  const L = nominal[P_DISTANCE];
  const steps = Float64Array.from([1e-3, 1e-6, 1e-6, 1e-5 * L, 1e-7 * driverNm, 1e-5]);
  const model: ModelContext = {
    grooveDensityPerMm: profile.grooveDensityPerMm,
    pixelPitchUm: profile.pixelPitchUm,
    wavelengthIncreasesWithPixel: profile.wavelengthIncreasesWithPixel,
    pixelCount,
    nominal,
    walls,
    steps,
  };

  const knownPoints: ModelPoint[] = [];
  // Peaks that are known lines: in the fit as fixed-wavelength points, kept out of the harmonic search.
  const knownPeaks = new Map<number, string>();
  for (const k of input.knownLines ?? []) {
    if (!(Number.isFinite(k.wavelengthNm) && k.wavelengthNm > 0)) return 'A known line needs a positive wavelength in nm.';
    if (k.pixel !== undefined && Number.isFinite(k.pixel)) {
      knownPoints.push({ pixel: k.pixel, sigmaPx: Math.max(k.pixelSigma ?? 0.5, SIGMA_FLOOR_PX), scale: 0, fixedNm: k.wavelengthNm });
      let nearest = -1;
      searchPeaks.forEach((pk, i) => {
        if (Math.abs(pk.pixel - (k.pixel as number)) <= Math.max(1.5, pk.fwhmPx) && (nearest < 0 || Math.abs(pk.pixel - (k.pixel as number)) < Math.abs(searchPeaks[nearest].pixel - (k.pixel as number)))) nearest = i;
      });
      if (nearest >= 0) knownPeaks.set(nearest, k.label ?? `known line ${k.wavelengthNm.toFixed(4)} nm`);
    }
  }
  const pins = new Map<number, number>();
  for (const pin of input.pins ?? []) {
    if (!Number.isInteger(pin.harmonic) || pin.harmonic < 1) return `A pin needs a positive integer harmonic (got ${pin.harmonic}).`;
    if (!allowedHarmonic(parity, pin.harmonic)) return `Pin harmonic ${pin.harmonic} is even, but parity is 'odd'; set parity 'all' or correct the pin.`;
    let bestIndex = -1;
    let bestDistance = Infinity;
    searchPeaks.forEach((pk, i) => {
      const d = Math.abs(pk.pixel - pin.pixel);
      if (d < bestDistance) {
        bestDistance = d;
        bestIndex = i;
      }
    });
    if (bestIndex < 0 || bestDistance > Math.max(3, 3 * (peaks[usable[bestIndex].index].fwhmPx || 0))) {
      return `No peak near the pinned pixel ${pin.pixel}.`;
    }
    if (pins.has(bestIndex) && pins.get(bestIndex) !== pin.harmonic) return `Two pins disagree about the peak at pixel ${searchPeaks[bestIndex].pixel.toFixed(2)}.`;
    pins.set(bestIndex, pin.harmonic);
  }
  const notes: string[] = [...priors.notes];
  const ctx: SearchContext = {
    driver,
    model,
    peaks: searchPeaks,
    parity,
    angleKnown: centralAngleKnown,
    anchored: knownPoints.length > 0,
    knownPoints,
    knownPeaks,
    transmission,
    pins,
    opaqueTransmission: opaqueTransmission(searchPeaks.reduce((m, p) => Math.max(m, p.snr), 0)),
  };
  return { ctx, original: usable.map((u) => u.index), notes };
}

/** Whether the nonzero labels run strictly one way along the pixels (down when wavelength increases with pixel). */
function monotonicLabels(harmonic: Int32Array, wavelengthIncreasesWithPixel: boolean): boolean {
  let previous = 0;
  for (let i = 0; i < harmonic.length; i++) {
    const q = harmonic[i];
    if (q <= 0) continue;
    if (previous > 0 && (wavelengthIncreasesWithPixel ? q >= previous : q <= previous)) return false;
    previous = q;
  }
  return true;
}

/** Harmonics that peak `i` can be, given the walls of every parameter (for the seeds). */
function candidateHarmonics(ctx: SearchContext, i: number): [number, number] {
  const [lambda0Lo, lambda0Hi] = driverSpanNm(ctx.driver);
  if (!ctx.angleKnown) return [1, Math.max(1, Math.min(400, Math.floor(lambda0Hi / 1)))];
  let lo = Infinity;
  let hi = -Infinity;
  const p = Float64Array.from(ctx.model.nominal);
  const w = ctx.model.walls;
  const varied = [P_CENTER, P_ANGLE, P_INCIDENCE, P_DISTANCE, P_TILT];
  for (let corner = 0; corner < 1 << varied.length; corner++) {
    varied.forEach((k, bit) => {
      const wk = w[k] as Wall;
      p[k] = corner & (1 << bit) ? wk.hi : wk.lo;
    });
    const lambda = pixelToWavelengthNm(geometryOf(ctx.model, p), ctx.peaks[i].pixel, 1);
    if (lambda > 0) {
      lo = Math.min(lo, lambda);
      hi = Math.max(hi, lambda);
    }
  }
  if (!Number.isFinite(lo)) return [1, 0];
  return [Math.max(1, Math.floor(lambda0Lo / hi) - 1), Math.ceil(lambda0Hi / lo) + 1];
}

interface Candidate {
  harmonic: Int32Array;
  order: Int8Array;
  fit: ModelFit;
  points: ModelPoint[];
  raw: RawScore;
  blends: Map<number, { harmonic: number; diffractionOrder: number }[]>;
}

/** Pixel uncertainty of a prediction from the fit covariance (scaled by the fit's own reduced χ²). */
function predictionSigma(ctx: SearchContext, fit: ModelFit, lambda1: number, s2: number): number {
  if (!fit.covariance) return 0.3;
  const f = fit.freeIndices;
  const base = predictPixel(ctx.model, fit.parameters, lambda1);
  const grad = new Float64Array(f.length);
  const p = Float64Array.from(fit.parameters);
  for (let j = 0; j < f.length; j++) {
    const h = ctx.model.steps[f[j]] * 10;
    p[f[j]] += h;
    const lam = f[j] === P_DRIVER ? lambda1 * (p[P_DRIVER] / fit.parameters[P_DRIVER]) : lambda1;
    grad[j] = (predictPixel(ctx.model, p, lam) - base) / h;
    p[f[j]] = fit.parameters[f[j]];
  }
  let v = 0;
  for (let a = 0; a < f.length; a++) for (let b = 0; b < f.length; b++) v += grad[a] * fit.covariance[a * f.length + b] * grad[b];
  return Number.isFinite(v) && v >= 0 ? Math.sqrt(v * s2) : 0.3;
}

/** Label leftover peaks as m = 2 lines when that explains them better than "spurious". */
function labelSecondOrder(ctx: SearchContext, harmonic: Int32Array, order: Int8Array, fit: ModelFit, dof: number): void {
  const lines2 = predictLines(ctx, fit.parameters, 2);
  if (lines2.pixel.length === 0) return;
  const s2 = Math.max(1, fit.chiSquarePosition / Math.max(dof, 1));
  const n = ctx.peaks.length;
  const used = new Set<number>();
  const firstOrderWidth: { px: number; w: number }[] = [];
  const firstOrderArea = new Map<number, number>();
  const firstOrderSaturated = new Set<number>();
  for (let i = 0; i < n; i++) {
    if (harmonic[i] > 0 && order[i] === 1) {
      firstOrderArea.set(harmonic[i], ctx.peaks[i].area);
      if (ctx.peaks[i].saturated) firstOrderSaturated.add(harmonic[i]);
      if (Number.isFinite(ctx.peaks[i].spatialWidthPx)) firstOrderWidth.push({ px: ctx.peaks[i].pixel, w: ctx.peaks[i].spatialWidthPx });
    }
  }
  // m = 1 partners the fit puts well inside the detector (filters not opaque at their energy).
  const lines1 = predictLines(ctx, fit.parameters, 1);
  const partnerOnDetector = new Map<number, number>();
  lines1.harmonic.forEach((q, j) => partnerOnDetector.set(q, lines1.pixel[j]));
  const spurious = spuriousCost(ctx.model.pixelCount);
  for (let i = 0; i < n; i++) {
    if (harmonic[i] > 0 || ctx.knownPeaks.has(i)) continue;
    const pk = ctx.peaks[i];
    const j = nearestLine(lines2, pk.pixel);
    if (j < 0) continue;
    const q = lines2.harmonic[j];
    if (used.has(q)) continue;
    const lambda1 = (2 * fit.parameters[P_DRIVER]) / q;
    const sp = predictionSigma(ctx, fit, lambda1, s2);
    const variance = s2 * pk.sigmaPx * pk.sigmaPx + sp * sp + 0.02 * 0.02;
    const r = pk.pixel - lines2.pixel[j];
    if (Math.abs(r) > 0.2 * localSpacing(lines2, j)) continue;
    const cost = (r * r) / variance + Math.log(2 * Math.PI * variance) + SECOND_ORDER_COST;
    if (!(cost < spurious)) continue;
    // A second-order line cannot outshine its own first-order line (gratings put far less into m = 2).
    const a1 = firstOrderArea.get(q);
    if (a1 !== undefined && pk.area > a1 && !firstOrderSaturated.has(q)) continue;
    // The m = 2 line of q has the photon energy of the m = 1 line of q (same filter transmission)
    // and a grating puts less into m = 2, so an m = 2 line whose m = 1 partner lies well inside the
    // detector and was not seen is no m = 2 line. Partners off the detector (shorter wavelength than
    // it covers) or at its edge prove nothing.
    const partnerPx = partnerOnDetector.get(q);
    const margin = EDGE_FWHM * pk.fwhmPx;
    if (a1 === undefined && partnerPx !== undefined && partnerPx > margin && partnerPx < ctx.model.pixelCount - 1 - margin) continue;
    // Divergence falls with harmonic order: the m = 2 line of q is narrower than the m = 1 line of ~q/2 beside it.
    // Without its m = 1 partner in view (off the detector), position alone would take any stray
    // line that happens to sit on an m = 2 position: then a clearly narrower profile is required.
    const widthKnown = Number.isFinite(pk.spatialWidthPx) && firstOrderWidth.length >= 2;
    if (a1 === undefined && !widthKnown) continue;
    if (widthKnown) {
      const near = [...firstOrderWidth].sort((a, b) => Math.abs(a.px - pk.pixel) - Math.abs(b.px - pk.pixel)).slice(0, 2);
      const w1 = (near[0].w + near[1].w) / 2;
      if (pk.spatialWidthPx > (a1 === undefined ? UNPARTNERED_WIDTH_RATIO : PARTNERED_WIDTH_RATIO) * w1) continue;
    }
    harmonic[i] = q;
    order[i] = 2;
    used.add(q);
  }
}

/** Parity 'all': m = 2 of harmonic 2k lands exactly on m = 1 of k (mλ is the same). */
function findBlends(ctx: SearchContext, harmonic: Int32Array, order: Int8Array, fit: ModelFit): Map<number, { harmonic: number; diffractionOrder: number }[]> {
  const blends = new Map<number, { harmonic: number; diffractionOrder: number }[]>();
  if (ctx.parity !== 'all') return blends;
  const lambda0 = fit.parameters[P_DRIVER];
  const firstOrder = new Set<number>();
  for (let i = 0; i < harmonic.length; i++) if (harmonic[i] > 0 && order[i] === 1) firstOrder.add(harmonic[i]);
  const g = geometryOf(ctx.model, fit.parameters);
  for (let i = 0; i < harmonic.length; i++) {
    if (!(harmonic[i] > 0 && order[i] === 1)) continue;
    const q2 = 2 * harmonic[i];
    if (ctx.transmission(harmonicEnergyEv(lambda0, q2)) < ctx.opaqueTransmission) continue;
    const px = wavelengthToPixel(g, lambda0 / q2, 1);
    const onDetector = Number.isFinite(px) && px > -0.5 && px < ctx.model.pixelCount - 0.5;
    // If harmonic 2k is on the detector in m = 1 and not seen, its m = 2 share is negligible.
    if (onDetector && !firstOrder.has(q2)) continue;
    blends.set(i, [{ harmonic: q2, diffractionOrder: 2 }]);
  }
  return blends;
}

/** With the grown model, give each first-order line the peak that sits on it best (a spurious peak beside a line must not take its label). */
function rematch(ctx: SearchContext, harmonic: Int32Array, order: Int8Array, params: ArrayLike<number>): boolean {
  const lambda0 = params[P_DRIVER];
  let changed = false;
  for (let i = 0; i < harmonic.length; i++) {
    if (!(harmonic[i] > 0 && order[i] === 1) || ctx.pins.has(i)) continue;
    const pred = predictPixel(ctx.model, params, lambda0 / harmonic[i]);
    if (!Number.isFinite(pred)) continue;
    let bestJ = i;
    let bestZ = ((ctx.peaks[i].pixel - pred) / ctx.peaks[i].sigmaPx) ** 2;
    for (let j = Math.max(0, i - 3); j <= Math.min(harmonic.length - 1, i + 3); j++) {
      if (harmonic[j] > 0) continue;
      const z = ((ctx.peaks[j].pixel - pred) / ctx.peaks[j].sigmaPx) ** 2;
      if (z + 9 < bestZ) {
        bestZ = z;
        bestJ = j;
      }
    }
    if (bestJ !== i) {
      harmonic[bestJ] = harmonic[i];
      order[bestJ] = 1;
      harmonic[i] = 0;
      order[i] = 0;
      changed = true;
    }
  }
  return changed;
}

/**
 * Weak first-order lines the grown map explains: an unlabelled peak on a predicted m = 1 line whose
 * harmonic no peak holds, within 4σ of it (the peak's σ scaled by the fit's own reduced χ², the
 * prediction's σ, and the centroid floor), joins the labelling. Grow's window is relative to the
 * line spacing and its outlier test to the scatter; a faint line can miss both and still be a line.
 */
function labelWeakFirstOrder(ctx: SearchContext, harmonic: Int32Array, order: Int8Array, fit: ModelFit, dof: number): number {
  const lines = predictLines(ctx, fit.parameters, 1);
  if (lines.pixel.length === 0) return 0;
  const s2 = Math.max(1, fit.chiSquarePosition / Math.max(dof, 1));
  const used = new Set<number>();
  for (let i = 0; i < harmonic.length; i++) if (harmonic[i] > 0 && order[i] === 1) used.add(harmonic[i]);
  let added = 0;
  for (let i = 0; i < harmonic.length; i++) {
    if (harmonic[i] > 0 || ctx.knownPeaks.has(i)) continue;
    const pk = ctx.peaks[i];
    const j = nearestLine(lines, pk.pixel);
    if (j < 0 || used.has(lines.harmonic[j])) continue;
    const q = lines.harmonic[j];
    const sp = predictionSigma(ctx, fit, fit.parameters[P_DRIVER] / q, s2);
    const sigma = Math.sqrt(s2 * pk.sigmaPx * pk.sigmaPx + sp * sp + FIT_FLOOR_PX * FIT_FLOOR_PX);
    const r = pk.pixel - lines.pixel[j];
    if (!(Math.abs(r) < 4 * sigma && Math.abs(r) < 0.1 * localSpacing(lines, j))) continue;
    harmonic[i] = q;
    order[i] = 1;
    used.add(q);
    added++;
  }
  return added;
}

function finish(ctx: SearchContext, harmonic: Int32Array, order: Int8Array, start: ArrayLike<number>): Candidate {
  let state = refit(ctx, harmonic, order, start, true);
  if (rematch(ctx, harmonic, order, state.fit.parameters)) state = refit(ctx, harmonic, order, state.fit.parameters, true);
  {
    const hBefore = Int32Array.from(harmonic);
    const mBefore = Int8Array.from(order);
    const dof1 = Math.max(1, state.points.length - state.fit.freeIndices.length);
    if (labelWeakFirstOrder(ctx, harmonic, order, state.fit, dof1) > 0) {
      const withWeak = refit(ctx, harmonic, order, state.fit.parameters, true);
      // Keep them unless they spoil the fit (a score that gets worse means one was no line).
      if (totalScore(rawScore(ctx, harmonic, order, withWeak.fit, withWeak.points), 1) <= totalScore(rawScore(ctx, hBefore, mBefore, state.fit, state.points), 1)) state = withWeak;
      else {
        harmonic.set(hBefore);
        order.set(mBefore);
      }
    }
  }
  const dof = Math.max(1, state.points.length - state.fit.freeIndices.length);
  const before = order.filter((m) => m === 2).length;
  const h0 = Int32Array.from(harmonic);
  const m0 = Int8Array.from(order);
  const without = rawScore(ctx, h0, m0, state.fit, state.points);
  labelSecondOrder(ctx, harmonic, order, state.fit, dof);
  let raw = without;
  if (order.filter((m) => m === 2).length !== before) {
    // Keep the m = 2 labels only if the labelling with them scores better as a whole: a false
    // peak taken for an m = 2 line must not drag the fit of the real lines.
    const withState = refit(ctx, harmonic, order, state.fit.parameters, true);
    const withRaw = rawScore(ctx, harmonic, order, withState.fit, withState.points);
    if (totalScore(withRaw, 1) <= totalScore(without, 1) || !Number.isFinite(totalScore(without, 1))) {
      state = withState;
      raw = withRaw;
    } else {
      harmonic.set(h0);
      order.set(m0);
    }
  }
  return { harmonic, order, fit: state.fit, points: state.points, raw, blends: findBlends(ctx, harmonic, order, state.fit) };
}

function labelKey(h: Int32Array, m: Int8Array): string {
  let s = '';
  for (let i = 0; i < h.length; i++) s += `${h[i]}/${m[i]},`;
  return s;
}

function contradicts(a: Candidate, b: Candidate): boolean {
  for (let i = 0; i < a.harmonic.length; i++) {
    if (a.harmonic[i] > 0 && b.harmonic[i] > 0 && (a.harmonic[i] !== b.harmonic[i] || a.order[i] !== b.order[i])) return true;
  }
  return false;
}

/** A seed's implied (peak, harmonic) pairs with the harmonics taken relative to the lowest-index peak's. */
function patternKey(implied: [number, number][]): string {
  const sorted = [...new Map(implied).entries()].sort((x, y) => x[0] - y[0]);
  const ref = sorted.length ? sorted[0][1] : 0;
  return sorted.map(([i, q]) => `${i}:${q - ref}`).join(',');
}

/** Seeds: (pair of neighbouring peaks, their harmonics) → starting labelling and parameters. */
function searchCandidates(ctx: SearchContext): Candidate[] {
  const n = ctx.peaks.length;
  const step = harmonicStep(ctx.parity);
  const kMax = ctx.parity === 'odd' ? 3 : 4;
  // A saturated line is among the brightest whatever its fitted SNR (its clipped core is down-weighted).
  const rank = (i: number): number => (ctx.peaks[i].saturated ? Number.POSITIVE_INFINITY : ctx.peaks[i].snr);
  const bySnr = [...ctx.peaks.keys()].filter((i) => !ctx.knownPeaks.has(i)).sort((a, b) => rank(b) - rank(a) || ctx.peaks[b].snr - ctx.peaks[a].snr);
  const strong = bySnr.slice(0, Math.min(8, n));
  const pairSet = new Set<string>();
  const pairs: [number, number][] = [];
  const addPair = (a: number, b: number): void => {
    if (a < 0 || b < 0 || a >= n || b >= n || a === b) return;
    const lo = Math.min(a, b);
    const hi = Math.max(a, b);
    const key = `${lo},${hi}`;
    if (pairSet.has(key)) return;
    pairSet.add(key);
    pairs.push([lo, hi]);
  };
  for (const p of ctx.pins.keys()) {
    addPair(p, p - 1);
    addPair(p, p + 1);
  }
  // Edge peaks are poor seeds (truncated lines); neighbours of the strongest clean peaks, and every
  // pair among the strongest few, so that a labelling can start from two first-order lines even when
  // m = 2 lines or false peaks sit between them.
  const clean = bySnr.filter((i) => !ctx.peaks[i].edge);
  const seedPool = clean.length >= 2 ? clean : bySnr;
  const adjacent = new Set<string>();
  for (const s of seedPool.slice(0, Math.min(4, seedPool.length))) {
    for (const t of [s - 1, s + 1]) {
      if (t >= 0 && t < n && !ctx.peaks[t].edge) {
        addPair(s, t);
        adjacent.add(`${Math.min(s, t)},${Math.max(s, t)}`);
      }
    }
  }
  const top = seedPool.slice(0, Math.min(5, seedPool.length));
  for (let x = 0; x < top.length; x++) for (let y = x + 1; y < top.length; y++) addPair(top[x], top[y]);
  const incr = ctx.model.wavelengthIncreasesWithPixel;
  interface Seed {
    harmonic: Int32Array;
    start: Float64Array;
    matches: number;
    /** Strong peaks not on an m = 1 line that sit on an m = 2 line. */
    matchesSecond: number;
    /** Peaks of any strength on the seed's predicted lines. */
    matchesAll: number;
    /** Plausibility of the seed's geometry (lower is better); ranks seeds with equal matches. */
    cost: number;
    key: string;
    /** (peak, harmonic) pairs the seed implies: its two peaks and the strong peaks on its lines. */
    implied: [number, number][];
  }
  const seeds: Seed[] = [];
  for (const [a, b] of pairs) {
    const [qLo, qHi] = candidateHarmonics(ctx, a);
    const [qbLo, qbHi] = candidateHarmonics(ctx, b);
    const near = adjacent.has(`${a},${b}`);
    for (let qa = qLo; qa <= qHi; qa++) {
      if (!allowedHarmonic(ctx.parity, qa)) continue;
      if (ctx.pins.has(a) && ctx.pins.get(a) !== qa) continue;
      const kHi = near ? kMax : Math.max(kMax, Math.ceil(Math.abs(incr ? qa - qbLo : qbHi - qa) / step));
      for (let k = 1; k <= kHi; k++) {
        const qb = incr ? qa - k * step : qa + k * step;
        if (!near && (qb < qbLo || qb > qbHi)) continue;
        if (!allowedHarmonic(ctx.parity, qb)) continue;
        if (ctx.pins.has(b) && ctx.pins.get(b) !== qb) continue;
        const harmonic = new Int32Array(n);
        for (const [p, q] of ctx.pins) harmonic[p] = q;
        if ([...ctx.pins.entries()].some(([p, q]) => (p === a && q !== qa) || (p === b && q !== qb))) continue;
        harmonic[a] = qa;
        harmonic[b] = qb;
        // Pins and the pair must read as one comb: first-order harmonics strictly monotonic in pixel
        // (a pin beside a pair that repeats or reverses its harmonic is no labelling at all).
        if (ctx.pins.size > 0 && !monotonicLabels(harmonic, incr)) continue;
        let seedParams: Float64Array;
        let seedCost: number;
        if (ctx.angleKnown) {
          // Linear placement of the pair (no iterative fit): most seeds die here for free.
          const lin = linearSeed(ctx, a, qa, b, qb);
          if (!lin) continue;
          seedParams = lin.start;
          seedCost = lin.cost;
        } else {
          const start = seedStart(ctx, a, qa);
          if (!start) continue;
          // Cheap check before any fit: with A placed, B must land within ±20 % of its separation.
          const predB = predictPixel(ctx.model, start, start[P_DRIVER] / qb);
          const sep = ctx.peaks[b].pixel - ctx.peaks[a].pixel;
          if (!Number.isFinite(predB) || Math.abs(predB - ctx.peaks[b].pixel) > 0.2 * Math.abs(sep)) continue;
          const order = new Int8Array(n);
          for (let i = 0; i < n; i++) if (harmonic[i] > 0) order[i] = 1;
          const state = refit(ctx, harmonic, order, start);
          if (!(state.fit.chiSquarePrior < 50) || !(state.fit.chiSquarePosition < 1e4)) continue;
          seedParams = state.fit.parameters;
          seedCost = state.fit.chiSquarePrior + 1e-3 * state.fit.chiSquarePosition;
        }
        const lines = predictLines(ctx, seedParams, 1);
        let matches = 0;
        let key = '';
        const implied: [number, number][] = [[a, qa], [b, qb]];
        for (const s of strong) {
          const j = nearestLine(lines, ctx.peaks[s].pixel);
          if (j < 0) continue;
          if (Math.abs(ctx.peaks[s].pixel - lines.pixel[j]) < 0.12 * localSpacing(lines, j)) {
            matches++;
            key += `${s}:${lines.harmonic[j]},`;
            implied.push([s, lines.harmonic[j]]);
          }
        }
        // Strong peaks off every m = 1 line but on an m = 2 line of the seed's geometry: a frame with
        // bright second-order lines would otherwise rank seeds that read them as first order highest.
        const lines2 = predictLines(ctx, seedParams, 2);
        let matchesSecond = 0;
        for (const s of strong) {
          const j1 = nearestLine(lines, ctx.peaks[s].pixel);
          if (j1 >= 0 && Math.abs(ctx.peaks[s].pixel - lines.pixel[j1]) < 0.12 * localSpacing(lines, j1)) continue;
          const j = nearestLine(lines2, ctx.peaks[s].pixel);
          if (j >= 0 && Math.abs(ctx.peaks[s].pixel - lines2.pixel[j]) < 0.12 * localSpacing(lines2, j)) matchesSecond++;
        }
        // All peaks on predicted lines: separates seeds that all explain the few strongest peaks.
        let matchesAll = 0;
        for (let i = 0; i < n; i++) {
          const j = nearestLine(lines, ctx.peaks[i].pixel);
          if (j >= 0 && Math.abs(ctx.peaks[i].pixel - lines.pixel[j]) < 0.12 * localSpacing(lines, j)) matchesAll++;
        }
        seeds.push({ harmonic, start: seedParams, matches, matchesSecond, matchesAll, cost: seedCost, key, implied });
      }
    }
  }
  seeds.sort((x, y) => y.matches - x.matches || y.matchesAll - x.matchesAll || x.cost - y.cost);
  const grownKeys = new Set<string>();
  const grownPatterns = new Map<string, number>();
  const grownLabellings: Int32Array[] = [];
  const out = new Map<string, Candidate>();
  let grown = 0;
  const topMatches = seeds.length > 0 ? seeds[0].matches : 0;
  /** Grows one seed into a finished candidate unless an equivalent seed was grown; false when skipped. */
  const tryGrow = (seed: Seed): boolean => {
    if (grownKeys.has(seed.key)) return false;
    grownKeys.add(seed.key);
    // Seeds that differ only by a uniform shift of their implied harmonics are slips of one
    // pattern: grow the most plausible few (with wide walls the most plausible geometry need not
    // belong to the true slip); the slips of the leading labelling are fitted in
    // earnest afterwards (shiftedRivals).
    // With pins a shifted copy is not the same hypothesis (the pins break the shift symmetry).
    const pattern = ctx.pins.size > 0 ? seed.key + Array.from(seed.harmonic).join('/') : patternKey(seed.implied);
    const grownOfPattern = grownPatterns.get(pattern) ?? 0;
    if (grownOfPattern >= (ctx.pins.size === 0 ? MAX_GROWN_PER_PATTERN : 1)) return false;
    if (ctx.pins.size === 0) grownPatterns.set(pattern, grownOfPattern + 1);
    // A seed whose implied labels a grown labelling already carries would grow into that labelling.
    if (grownLabellings.some((h) => seed.implied.every(([i, q]) => h[i] === q))) return false;
    const lab = grow(ctx, seed.harmonic, seed.start);
    if (!lab) return true;
    // With pins, only a seed that grew stands for its pattern: a failed one must not hide the others.
    if (ctx.pins.size > 0) grownPatterns.set(pattern, 1);
    grownLabellings.push(lab.harmonic);
    let ok = true;
    for (const [p, q] of ctx.pins) if (lab.harmonic[p] !== q) ok = false;
    if (!ok) return true;
    const key0 = labelKey(lab.harmonic, lab.order);
    if (out.has(key0)) return true;
    const cand = finish(ctx, lab.harmonic, lab.order, lab.fit.parameters);
    const key = labelKey(cand.harmonic, cand.order);
    const prev = out.get(key);
    if (!prev || totalScore(cand.raw, 1) < totalScore(prev.raw, 1)) out.set(key, cand);
    return true;
  };
  for (const seed of seeds) {
    if (grown >= MAX_GROWN_SEEDS) break;
    // Seeds that explain far fewer strong peaks than the best seed cannot win; growing them wastes time.
    if (seed.matches < topMatches - 2 && grown >= 4) break;
    if (tryGrow(seed)) grown++;
  }
  // Bright m = 2 lines (their m = 1 partners possibly off the detector) can make every seed that
  // reads them as first order outrank the true comb on m = 1 matches alone. Grow the few seeds that
  // explain more strong peaks than any m = 1-only reading once m = 2 lines count too; the score
  // decides between them and the rest.
  const bySecond = seeds
    .filter((s) => s.matches + s.matchesSecond > topMatches)
    .sort((x, y) => y.matches + y.matchesSecond - (x.matches + x.matchesSecond) || y.matches - x.matches || x.cost - y.cost);
  let grownSecond = 0;
  for (const seed of bySecond) {
    if (grownSecond >= MAX_SECOND_ORDER_SEEDS) break;
    if (tryGrow(seed)) grownSecond++;
  }
  return [...out.values()];
}

/**
 * The labellings a slip of the whole comb would give: every first-order label moved by ±1 and ±2
 * parity steps (m = 2 labels dropped and re-found), each grown and fitted from two starts (the
 * best fit's geometry with λ0 rescaled into its wall, and the nominal geometry placed on the
 * strongest clean peak). The search may never seed these when the geometry absorbs the slip, and
 * they are exactly the rivals that make a confident answer wrong.
 */
function shiftedRivals(ctx: SearchContext, best: Candidate): Candidate[] {
  const n = best.harmonic.length;
  const step = harmonicStep(ctx.parity);
  const out: Candidate[] = [];
  const driverWall = ctx.model.walls[P_DRIVER] as Wall;
  const s2 = Math.max(1, best.raw.position / best.raw.degreesOfFreedom);
  const bestScore = totalScore(best.raw, s2);
  const farBehind = new Set<number>();
  for (const k of [1, -1, 2, -2]) {
    // A two-step slip misfits more than the one-step slip the same way; skip it when that one is hopeless.
    if (Math.abs(k) === 2 && farBehind.has(Math.sign(k))) continue;
    const shift = k * step;
    const harmonic = new Int32Array(n);
    let ok = true;
    let count = 0;
    let strongest = -1;
    for (let i = 0; i < n; i++) {
      if (!(best.harmonic[i] > 0 && best.order[i] === 1)) continue;
      const q = best.harmonic[i] + shift;
      if (!allowedHarmonic(ctx.parity, q) || (ctx.pins.has(i) && ctx.pins.get(i) !== q)) {
        ok = false;
        break;
      }
      harmonic[i] = q;
      count++;
      if (!ctx.peaks[i].edge && (strongest < 0 || ctx.peaks[i].snr > ctx.peaks[strongest].snr)) strongest = i;
    }
    if (!ok || count < 2) continue;
    const starts: Float64Array[] = [];
    const order1 = new Int8Array(n);
    for (let i = 0; i < n; i++) if (harmonic[i] > 0) order1[i] = 1;
    const a = Float64Array.from(best.fit.parameters);
    // Keep the positions: λ0 scales with the harmonic, then clamp it into the blue-shift wall.
    let qRef = 0;
    for (let i = 0; i < n; i++) if (harmonic[i] > 0) qRef = Math.max(qRef, best.harmonic[i]);
    a[P_DRIVER] = Math.min(driverWall.hi, Math.max(driverWall.lo, (a[P_DRIVER] * (qRef + shift)) / qRef));
    starts.push(a);
    starts.push(...labellingStarts(ctx, harmonic, order1));
    let bestCand: Candidate | null = null;
    // The slipped labelling keeps the same peaks (no growing: it is the same set of lines read one
    // step off); only its geometry is searched, from each start, and the best fit is finished.
    let bestStart: Float64Array | null = null;
    let bestCost = Infinity;
    for (const start of starts) {
      const fit = refit(ctx, harmonic, order1, start).fit;
      const cost = fit.chiSquarePosition + fit.chiSquarePrior;
      if (cost < bestCost) {
        bestCost = cost;
        bestStart = fit.parameters;
      }
    }
    if (bestStart) bestCand = finish(ctx, Int32Array.from(harmonic), Int8Array.from(order1), bestStart);
    if (bestCand) {
      out.push(bestCand);
      if (totalScore(bestCand.raw, s2) - bestScore > HOPELESS_SLIP_MARGINS * UNIQUE_MARGIN) farBehind.add(Math.sign(k));
    }
  }
  return out;
}

function toHypothesis(ctx: SearchContext, c: Candidate, s2: number, bestScore: number, original: number[], totalPeaks: number): Hypothesis {
  const labels: PeakLabel[] = Array.from({ length: totalPeaks }, () => ({ harmonic: null, diffractionOrder: null, residualPx: Number.NaN }));
  let sumSq = 0;
  let count = 0;
  const residualByPeak = new Map<number, number>();
  let k = 0;
  for (let i = 0; i < c.harmonic.length; i++) {
    if (c.harmonic[i] > 0) {
      residualByPeak.set(i, c.fit.residualsPx[k]);
      sumSq += c.fit.residualsPx[k] ** 2;
      count++;
      k++;
    }
  }
  let first = Infinity;
  let last = -Infinity;
  for (let i = 0; i < c.harmonic.length; i++) {
    const label: PeakLabel = {
      harmonic: c.harmonic[i] > 0 ? c.harmonic[i] : null,
      diffractionOrder: c.harmonic[i] > 0 ? c.order[i] : null,
      residualPx: residualByPeak.get(i) ?? Number.NaN,
    };
    const blend = c.blends.get(i);
    if (blend) label.blend = blend;
    const known = ctx.knownPeaks.get(i);
    if (known !== undefined) label.knownLine = known;
    labels[original[i]] = label;
    if (c.harmonic[i] > 0 && c.order[i] === 1) {
      first = Math.min(first, c.harmonic[i]);
      last = Math.max(last, c.harmonic[i]);
    }
  }
  const score = totalScore(c.raw, s2);
  return {
    firstHarmonic: first,
    lastHarmonic: last,
    labels,
    harmonics: labels.map((l) => l.harmonic),
    matchedPeaks: c.raw.firstOrderCount + c.raw.secondOrderCount,
    secondOrderPeaks: c.raw.secondOrderCount,
    unexplainedPeaks: c.raw.unexplainedCount,
    rmsResidualPx: count > 0 ? Math.sqrt(sumSq / count) : Number.NaN,
    chiSquarePosition: c.raw.position,
    degreesOfFreedom: c.raw.degreesOfFreedom,
    score,
    deltaScore: score - bestScore,
    driverNm: c.fit.parameters[P_DRIVER],
    geometry: geometryOf(ctx.model, c.fit.parameters),
    fittedParameters: c.fit.freeIndices.map((j) => PARAMETER_NAMES[j]),
    terms: {
      position: c.raw.position / s2,
      prior: c.raw.prior,
      unexplained: c.raw.unexplained,
      secondOrder: c.raw.secondOrder,
      missing: c.raw.missing,
      normalisation: c.raw.normalisation + c.raw.fittedPoints * Math.log(s2),
    },
    missingHarmonics: c.raw.missingHarmonics,
  };
}

/** Starting points for fitting a fixed labelling: the nominal geometry placed on one labelled peak, with the incidence at its nominal value and at both ends of its range. */
function labellingStarts(ctx: SearchContext, harmonic: Int32Array, order: Int8Array): Float64Array[] {
  let ref = -1;
  for (let i = 0; i < harmonic.length; i++) {
    if (!(harmonic[i] > 0 && order[i] === 1)) continue;
    if (ref < 0 || (ctx.peaks[ref].edge && !ctx.peaks[i].edge) || (ctx.peaks[i].edge === ctx.peaks[ref].edge && ctx.peaks[i].snr > ctx.peaks[ref].snr)) ref = i;
  }
  if (ref < 0) return [];
  const out: Float64Array[] = [];
  const inc = ctx.model.walls[P_INCIDENCE] as Wall;
  for (const incidence of [ctx.model.nominal[P_INCIDENCE], inc.lo, inc.hi]) {
    const saved = ctx.model.nominal[P_INCIDENCE];
    ctx.model.nominal[P_INCIDENCE] = incidence;
    const start = seedStart(ctx, ref, harmonic[ref]);
    ctx.model.nominal[P_INCIDENCE] = saved;
    if (start) out.push(start);
  }
  return out;
}

/** How well one given labelling fits (for checks and for "why not this labelling?" displays). */
export interface LabellingFit {
  chiSquarePosition: number;
  chiSquarePrior: number;
  fittedPoints: number;
  freeParameters: number;
  driverNm: number;
}

/**
 * Fit one labelling chosen by the caller (harmonic per peak, null = not used; order per peak,
 * default 1) with the same model, ranges and starts as the search. Null when the labelling
 * cannot be placed on the detector at all.
 */
export function fitLabelling(peaks: Peak[], input: AssignInput, harmonics: (number | null)[], orders?: (number | null)[]): LabellingFit | null {
  const prepared = prepare(peaks, input);
  if (typeof prepared === 'string') throw new EngineError('invalid_input', prepared);
  const { ctx, original } = prepared;
  const n = ctx.peaks.length;
  const harmonic = new Int32Array(n);
  const order = new Int8Array(n);
  for (let i = 0; i < n; i++) {
    const q = harmonics[original[i]];
    if (q !== null && q !== undefined && q > 0) {
      harmonic[i] = q;
      order[i] = orders?.[original[i]] ?? 1;
    }
  }
  let best: ModelFit | null = null;
  let bestPoints = 0;
  for (const start of labellingStarts(ctx, harmonic, order)) {
    const state = refit(ctx, harmonic, order, start);
    const again = refit(ctx, harmonic, order, state.fit.parameters);
    for (const f of [state.fit, again.fit]) {
      if (!best || f.chiSquarePosition + f.chiSquarePrior < best.chiSquarePosition + best.chiSquarePrior) {
        best = f;
        bestPoints = state.points.length;
      }
    }
  }
  if (!best) return null;
  return { chiSquarePosition: best.chiSquarePosition, chiSquarePrior: best.chiSquarePrior, fittedPoints: bestPoints, freeParameters: best.freeIndices.length, driverNm: best.parameters[P_DRIVER] };
}

/**
 * Assign harmonic (q) and diffraction (m) orders to peaks. Never throws on bad data: returns
 * `failed` with a message (an EngineError from a helper is turned into one).
 */
export function assignOrders(peaks: Peak[], input: AssignInput): AssignResult {
  try {
    return assignInner(peaks, input);
  } catch (error) {
    if (error instanceof EngineError) return failed(error.message);
    throw error;
  }
}

function assignInner(peaks: Peak[], input: AssignInput): AssignResult {
  const prepared = prepare(peaks, input);
  if (typeof prepared === 'string') return failed(prepared);
  const { ctx, original } = prepared;
  const notes = [...prepared.notes];
  if (ctx.peaks.length < 2 || (ctx.peaks.length < 3 && ctx.pins.size === 0 && !ctx.anchored && ctx.peaks.length < 2)) {
    return failed(`Only ${ctx.peaks.length} usable peak(s) on the detector; at least 2 are needed to assign orders (3 or more to decide them without a pin).`, notes);
  }
  if (!ctx.angleKnown) notes.push('The profile gives no central diffraction angle; it was searched over all angles.');
  const candidates = searchCandidates(ctx);
  let viable = candidates.filter((c) => c.raw.firstOrderCount >= 2);
  if (viable.length > 0) {
    // Make sure the slips of the leading labelling are in the pool, fitted in earnest.
    const leader = viable.reduce((a, b) => (totalScore(a.raw, 1) <= totalScore(b.raw, 1) ? a : b));
    const seen = new Map(viable.map((c) => [labelKey(c.harmonic, c.order), c] as const));
    for (const c of shiftedRivals(ctx, leader)) {
      if (c.raw.firstOrderCount < 2) continue;
      const key = labelKey(c.harmonic, c.order);
      const prev = seen.get(key);
      if (!prev || totalScore(c.raw, 1) < totalScore(prev.raw, 1)) seen.set(key, c);
    }
    viable = [...seen.values()];
  }
  if (viable.length === 0) {
    return failed('No labelling of the peaks fits the grating model within the realignment ranges; check the profile (groove density, incidence angle, distance, pixel pitch, direction), the driver wavelength and the parity.', notes);
  }
  const rawBest = viable.reduce((a, b) => (totalScore(a.raw, 1) <= totalScore(b.raw, 1) ? a : b));
  const s2 = Math.max(1, rawBest.raw.position / rawBest.raw.degreesOfFreedom);
  viable.sort((a, b) => totalScore(a.raw, s2) - totalScore(b.raw, s2));
  const best = viable[0];
  const bestScore = totalScore(best.raw, s2);
  const reducedChi = best.raw.position / best.raw.degreesOfFreedom;
  const rivals = viable.filter((c) => c !== best && contradicts(c, best));
  const runnerUp = rivals[0];
  const margin = input.uniqueMargin ?? UNIQUE_MARGIN;
  const shown = [best, ...rivals.slice(0, 7)];
  const hypotheses = shown.map((c) => toHypothesis(ctx, c, s2, bestScore, original, peaks.length));
  const bestHyp = hypotheses[0];

  let driverNm = best.fit.parameters[P_DRIVER];
  let driverSigmaNm: number;
  let scaleSigmaRelative: number;
  if (ctx.anchored && best.fit.covariance && best.fit.freeIndices.includes(P_DRIVER)) {
    const j = best.fit.freeIndices.indexOf(P_DRIVER);
    const f = best.fit.freeIndices.length;
    driverSigmaNm = Math.sqrt(Math.max(best.fit.covariance[j * f + j], 0) * s2);
    scaleSigmaRelative = driverSigmaNm / driverNm;
    notes.push('The absolute scale is anchored by known-wavelength line(s); the driver wavelength was fitted.');
  } else {
    driverNm = ctx.model.nominal[P_DRIVER];
    scaleSigmaRelative = driverPriorMoments(ctx.driver).sigmaRelative;
    driverSigmaNm = scaleSigmaRelative * driverNm;
    notes.push(
      `No absolute anchor: the driver wavelength is taken as ${driverNm.toFixed(3)} nm, the middle of its tolerance, so the whole wavelength scale is uncertain by ±${(200 * scaleSigmaRelative).toFixed(2)} % (2σ). A filter edge seen on a continuum, a known line or a geometry measured after the realignment would pin it.`,
    );
  }
  const blendCount = best.blends.size;
  if (blendCount > 0) notes.push(`${blendCount} peak(s) may also hold the m = 2 line of twice their harmonic (parity 'all': the same pixel); their labels give the m = 1 reading, and position cannot tell them apart.`);

  const priorSigma: AssignResult['priorSigma'] = {};
  for (const j of [P_CENTER, P_ANGLE, P_INCIDENCE, P_DISTANCE, P_TILT]) {
    const w = ctx.model.walls[j];
    if (w) priorSigma[PARAMETER_NAMES[j] as keyof AssignResult['priorSigma']] = (w.hi - w.lo) / Math.sqrt(12);
  }
  const base = {
    priorSigma,
    hypotheses,
    best: bestHyp,
    anchored: ctx.anchored,
    driverNm,
    driverSigmaNm,
    scaleSigmaRelative,
    reducedChiSquare: reducedChi,
    notes,
  };
  const lineWord = `${best.raw.firstOrderCount} first-order line(s) q = ${bestHyp.firstHarmonic}–${bestHyp.lastHarmonic}${best.raw.secondOrderCount ? `, ${best.raw.secondOrderCount} m = 2 line(s)` : ''}${best.raw.unexplainedCount ? `, ${best.raw.unexplainedCount} unexplained peak(s)` : ''}`;
  const delta = runnerUp ? totalScore(runnerUp.raw, s2) - bestScore : Infinity;
  const verdict = decideVerdict({
    ctx,
    harmonic: best.harmonic,
    order: best.order,
    fit: best.fit,
    points: best.points,
    firstOrderCount: best.raw.firstOrderCount,
    margin: delta,
    uniqueMargin: margin,
    blended: new Set([...best.blends.keys(), ...ctx.knownPeaks.keys()]),
  });
  const gates = verdict.gates.map((g) => ({ ...g }));
  if (verdict.status === 'unique') {
    const rival = runnerUp ? ` The next labelling trails by ${delta.toFixed(1)} in −2 ln L.` : ' No other labelling fits within the ranges.';
    return { ...base, gates, status: 'unique', message: `Orders assigned: ${lineWord}.${rival}` };
  }
  const failedGates = verdict.gates.filter((g) => g.passed === false);
  if (verdict.status === 'failed') {
    return { ...base, gates, status: 'failed', message: `No labelling fits: the best one (${lineWord}) fits the peaks badly (χ²/ν ${verdict.reducedChiSquareFloored.toFixed(0)}); the profile or the driver wavelength is probably wrong.` };
  }
  const marginGate = failedGates.find((g) => g.name === 'margin');
  let detail = '';
  if (marginGate && runnerUp) {
    const i = best.harmonic.findIndex((h, k) => h > 0 && runnerUp.harmonic[k] > 0 && (h !== runnerUp.harmonic[k] || best.order[k] !== runnerUp.order[k]));
    if (i >= 0) detail = ` The peak at pixel ${ctx.peaks[i].pixel.toFixed(1)} is harmonic ${best.harmonic[i]} in the best labelling and ${runnerUp.harmonic[i]} in the next, which trails by only ${delta.toFixed(1)} (unique needs ${margin}).`;
  }
  const others = failedGates.filter((g) => g.name !== 'margin' || !detail).map((g) => ` The leading labelling (${lineWord}) fails the ${g.name} gate: ${g.detail}.`);
  return {
    ...base,
    gates,
    status: 'ambiguous',
    message: `The data cannot decide the orders.${detail}${others.join('')} A pin on one peak, a filter whose absorption edge falls inside the spectrum, a known line, or a narrower realignment range would decide it.`,
  };
}
