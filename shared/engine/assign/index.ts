/**
 * Order assignment: decide the harmonic order q (and diffraction order m) of every peak, or say
 * honestly that the data cannot decide.
 *
 * Method (see ENGINE-NOTES.md): hypotheses are seeded from pairs of neighbouring strong peaks
 * (every harmonic pair allowed by parity, the realignment ranges and up to two missing orders in
 * between), each fitted with the physical grating model (grating.ts) with soft walls for the
 * realignment ranges and the driver tolerance, then grown outward (search.ts). Leftover peaks
 * are tested as m = 2 lines (position, and a narrower spatial profile when measured), else left
 * unexplained. Labellings are compared by −2 ln L (score.ts); `unique` only when every
 * contradicting labelling trails by ≥ 16 (≈ 4σ).
 *
 * Assumptions, stated in the result's notes:
 * - the effective driver wavelength lies in [nominal·(1 − tol), nominal] (ionisation blue-shifts
 *   harmonics; it does not red-shift them);
 * - without a known-wavelength anchor the absolute scale is known only to the driver tolerance:
 *   λ0 is then held at the middle of that interval, and `scaleSigmaRelative` is chosen so that
 *   ±2σ is the central 95 % of the uniform prior (0.95 · tol / 4). A pin fixes an order, not the
 *   scale: pins do not make a calibration anchored.
 */
import { EngineError } from '../errors.ts';
import { nominalGeometry, wavelengthToPixel } from '../grating.ts';
import type { Peak } from '../types.ts';
import { stackTransmission } from './filters.ts';
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
  localSpacing,
  nearestLine,
  OPAQUE_TRANSMISSION,
  predictLines,
  refit,
  seedStart,
  type SearchContext,
  type SearchPeak,
} from './search.ts';
import type { AssignInput, AssignResult, Hypothesis, PeakLabel, RealignmentRanges } from './types.ts';

export type { AssignInput, AssignResult, Hypothesis, PeakLabel, RealignmentRanges, FilterSpec } from './types.ts';

export const DEFAULT_RANGES: RealignmentRanges = {
  incidenceDeg: 0.5,
  distanceRelative: 0.04,
  centerRelative: 0.06,
  detectorAngleDeg: 0.3,
  tiltDeg: 3,
};

/** Margin in −2 ln L for `unique` (≈ 4σ). */
export const UNIQUE_MARGIN = 16;
/** Smallest centroid uncertainty believed, px (sub-0.005 px claims are numerical, not physical). */
const SIGMA_FLOOR_PX = 0.005;
const MAX_GROWN_SEEDS = 32;

/** Relative 1σ of the scale when only the driver tolerance bounds it: ±2σ = central 95 % of U[−tol/2, tol/2]. */
export function unanchoredScaleSigma(tolerancePct: number): number {
  return (0.95 * (tolerancePct / 100)) / 4;
}

function failed(message: string, notes: string[] = []): AssignResult {
  return {
    status: 'failed',
    message,
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

function wall(lo: number, hi: number, softness: number): Wall {
  return { lo, hi, softness };
}

interface Prepared {
  ctx: SearchContext;
  /** usable index → index in the caller's peak array. */
  original: number[];
  tol: number;
  notes: string[];
}

function prepare(peaks: Peak[], input: AssignInput): Prepared | string {
  const { profile, pixelCount, driverNm, parity } = input;
  const tolPct = input.driverTolerancePct ?? 1;
  if (!Number.isFinite(driverNm) || driverNm <= 0) return 'The driver wavelength must be a positive number of nm.';
  if (!Number.isFinite(tolPct) || tolPct < 0 || tolPct >= 50) return 'The driver tolerance must be a percentage from 0 to 50.';
  if (!Number.isInteger(pixelCount) || pixelCount < 8) return 'The spectral pixel count must be an integer of at least 8.';
  if (parity !== 'odd' && parity !== 'all') return "Parity must be 'odd' or 'all'.";
  for (const key of ['grooveDensityPerMm', 'detectorDistanceMm', 'pixelPitchUm'] as const) {
    if (!(Number.isFinite(profile[key]) && profile[key] > 0)) return `The instrument profile's ${key} must be a positive number.`;
  }
  if (!(Number.isFinite(profile.incidenceAngleDeg) && Math.abs(profile.incidenceAngleDeg) < 90)) return "The instrument profile's incidenceAngleDeg must lie between −90° and 90°.";
  const ranges = { ...DEFAULT_RANGES, ...(input.ranges ?? {}) };
  const tol = tolPct / 100;
  const { geometry, centralAngleKnown } = nominalGeometry(profile, pixelCount);
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
  const searchPeaks: SearchPeak[] = usable.map(({ peak }) => ({
    pixel: peak.pixel,
    sigmaPx: Math.max(Number.isFinite(peak.pixelSigma) && peak.pixelSigma > 0 ? peak.pixelSigma : 0.5, SIGMA_FLOOR_PX),
    snr: Number.isFinite(peak.snr) ? peak.snr : 1,
    area: Number.isFinite(peak.area) && peak.area > 0 ? peak.area : Math.max(peak.amplitude * peak.fwhmPx, 1e-12),
    spatialWidthPx: peak.spatialWidthPx,
  }));

  const lambdaCentre = driverNm * (1 - tol / 2);
  const nominal = new Float64Array(PARAMETER_COUNT);
  nominal[P_CENTER] = geometry.detectorCenterPixel;
  nominal[P_ANGLE] = centralAngleKnown ? geometry.detectorAngleDeg : 0;
  nominal[P_INCIDENCE] = geometry.incidenceAngleDeg;
  nominal[P_DISTANCE] = geometry.detectorDistanceMm;
  nominal[P_DRIVER] = lambdaCentre;
  nominal[P_TILT] = 0;
  const cr = ranges.centerRelative * pixelCount;
  const L = geometry.detectorDistanceMm;
  const walls: (Wall | null)[] = [
    wall(nominal[P_CENTER] - cr, nominal[P_CENTER] + cr, 0.02 * cr),
    centralAngleKnown ? wall(nominal[P_ANGLE] - ranges.detectorAngleDeg, nominal[P_ANGLE] + ranges.detectorAngleDeg, 0.02 * ranges.detectorAngleDeg + 1e-4) : null,
    wall(nominal[P_INCIDENCE] - ranges.incidenceDeg, nominal[P_INCIDENCE] + ranges.incidenceDeg, 0.02 * ranges.incidenceDeg + 1e-4),
    wall(L * (1 - ranges.distanceRelative), L * (1 + ranges.distanceRelative), 0.02 * ranges.distanceRelative * L + 1e-6),
    wall(driverNm * (1 - tol), driverNm, 0.02 * tol * driverNm + 1e-9 * driverNm),
    wall(-ranges.tiltDeg, ranges.tiltDeg, 0.02 * ranges.tiltDeg + 1e-4),
  ];
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
  for (const k of input.knownLines ?? []) {
    if (!(Number.isFinite(k.wavelengthNm) && k.wavelengthNm > 0)) return 'A known line needs a positive wavelength in nm.';
    if (k.pixel !== undefined && Number.isFinite(k.pixel)) {
      knownPoints.push({ pixel: k.pixel, sigmaPx: Math.max(k.pixelSigma ?? 0.5, SIGMA_FLOOR_PX), scale: 0, fixedNm: k.wavelengthNm });
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
  const notes: string[] = [];
  const ctx: SearchContext = {
    model,
    peaks: searchPeaks,
    parity,
    angleKnown: centralAngleKnown,
    anchored: knownPoints.length > 0,
    knownPoints,
    transmission,
    pins,
  };
  return { ctx, original: usable.map((u) => u.index), tol, notes };
}

/** Harmonics that peak `i` can be, given the realignment ranges (for the seeds). */
function candidateHarmonics(ctx: SearchContext, i: number, tol: number): [number, number] {
  const lambda0Hi = ctx.model.nominal[P_DRIVER] / (1 - tol / 2);
  const lambda0Lo = lambda0Hi * (1 - tol);
  if (!ctx.angleKnown) return [1, Math.max(1, Math.min(400, Math.floor(lambda0Hi / 1)))];
  let lo = Infinity;
  let hi = -Infinity;
  const p = Float64Array.from(ctx.model.nominal);
  const w = ctx.model.walls;
  for (let corner = 0; corner < 32; corner++) {
    const pick = (bit: number, k: number): number => {
      const wk = w[k] as Wall;
      return corner & (1 << bit) ? wk.hi : wk.lo;
    };
    p[P_CENTER] = pick(0, P_CENTER);
    p[P_ANGLE] = pick(1, P_ANGLE);
    p[P_INCIDENCE] = pick(2, P_INCIDENCE);
    p[P_DISTANCE] = pick(3, P_DISTANCE);
    p[P_TILT] = pick(4, P_TILT);
    const g = geometryOf(ctx.model, p);
    const sinAlpha = Math.sin((g.incidenceAngleDeg * Math.PI) / 180);
    const dir = g.wavelengthIncreasesWithPixel ? -1 : 1;
    const sMm = (ctx.peaks[i].pixel - g.detectorCenterPixel) * g.pixelPitchUm * 1e-3;
    const t = (g.detectorTiltDeg * Math.PI) / 180;
    const beta = (g.detectorAngleDeg * Math.PI) / 180 + dir * Math.atan2(sMm * Math.cos(t), g.detectorDistanceMm + sMm * Math.sin(t));
    const lambda = (1e6 / g.grooveDensityPerMm) * (sinAlpha - Math.sin(beta));
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
  for (let i = 0; i < n; i++) {
    if (harmonic[i] > 0 && order[i] === 1) {
      firstOrderArea.set(harmonic[i], ctx.peaks[i].area);
      if (Number.isFinite(ctx.peaks[i].spatialWidthPx)) firstOrderWidth.push({ px: ctx.peaks[i].pixel, w: ctx.peaks[i].spatialWidthPx });
    }
  }
  const spurious = spuriousCost(ctx.model.pixelCount);
  for (let i = 0; i < n; i++) {
    if (harmonic[i] > 0) continue;
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
    if (a1 !== undefined && pk.area > a1) continue;
    // Divergence falls with harmonic order: the m = 2 line of q is narrower than the m = 1 line of ~q/2 beside it.
    if (Number.isFinite(pk.spatialWidthPx) && firstOrderWidth.length >= 2) {
      const near = [...firstOrderWidth].sort((a, b) => Math.abs(a.px - pk.pixel) - Math.abs(b.px - pk.pixel)).slice(0, 2);
      const w1 = (near[0].w + near[1].w) / 2;
      if (pk.spatialWidthPx > 0.95 * w1) continue;
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
    if (ctx.transmission(harmonicEnergyEv(lambda0, q2)) < OPAQUE_TRANSMISSION) continue;
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

function finish(ctx: SearchContext, harmonic: Int32Array, order: Int8Array, start: ArrayLike<number>): Candidate {
  let state = refit(ctx, harmonic, order, start);
  if (rematch(ctx, harmonic, order, state.fit.parameters)) state = refit(ctx, harmonic, order, state.fit.parameters);
  const dof = Math.max(1, state.points.length - state.fit.freeIndices.length);
  const before = order.filter((m) => m === 2).length;
  labelSecondOrder(ctx, harmonic, order, state.fit, dof);
  if (order.filter((m) => m === 2).length !== before) state = refit(ctx, harmonic, order, state.fit.parameters);
  const raw = rawScore(ctx, harmonic, order, state.fit, state.points);
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

/** Seeds: (pair of neighbouring peaks, their harmonics) → starting labelling and parameters. */
function searchCandidates(ctx: SearchContext, tol: number): Candidate[] {
  const n = ctx.peaks.length;
  const step = harmonicStep(ctx.parity);
  const kMax = ctx.parity === 'odd' ? 3 : 4;
  const bySnr = [...ctx.peaks.keys()].sort((a, b) => ctx.peaks[b].snr - ctx.peaks[a].snr);
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
  for (const s of bySnr.slice(0, Math.min(4, n))) {
    addPair(s, s - 1);
    addPair(s, s + 1);
  }
  const incr = ctx.model.wavelengthIncreasesWithPixel;
  interface Seed {
    harmonic: Int32Array;
    start: Float64Array;
    matches: number;
    prior: number;
    chi: number;
    key: string;
  }
  const seeds: Seed[] = [];
  for (const [a, b] of pairs) {
    const [qLo, qHi] = candidateHarmonics(ctx, a, tol);
    for (let qa = qLo; qa <= qHi; qa++) {
      if (!allowedHarmonic(ctx.parity, qa)) continue;
      if (ctx.pins.has(a) && ctx.pins.get(a) !== qa) continue;
      for (let k = 1; k <= kMax; k++) {
        const qb = incr ? qa - k * step : qa + k * step;
        if (!allowedHarmonic(ctx.parity, qb)) continue;
        if (ctx.pins.has(b) && ctx.pins.get(b) !== qb) continue;
        const harmonic = new Int32Array(n);
        for (const [p, q] of ctx.pins) harmonic[p] = q;
        if ([...ctx.pins.entries()].some(([p, q]) => (p === a && q !== qa) || (p === b && q !== qb))) continue;
        harmonic[a] = qa;
        harmonic[b] = qb;
        const start = seedStart(ctx, a, qa);
        if (!start) continue;
        // Cheap check before any fit: with A placed, B must land within ±20 % of its separation
        // (distance ±4 % and tilt ±3° cannot stretch the dispersion further).
        const lambda0 = start[P_DRIVER];
        const predB = predictPixel(ctx.model, start, lambda0 / qb);
        const sep = ctx.peaks[b].pixel - ctx.peaks[a].pixel;
        if (!Number.isFinite(predB) || Math.abs(predB - ctx.peaks[b].pixel) > 0.2 * Math.abs(sep)) continue;
        const order = new Int8Array(n);
        for (let i = 0; i < n; i++) if (harmonic[i] > 0) order[i] = 1;
        const state = refit(ctx, harmonic, order, start);
        if (!(state.fit.chiSquarePrior < 50) || !(state.fit.chiSquarePosition < 1e4)) continue;
        const lines = predictLines(ctx, state.fit.parameters, 1);
        let matches = 0;
        let key = '';
        for (const s of strong) {
          const j = nearestLine(lines, ctx.peaks[s].pixel);
          if (j < 0) continue;
          if (Math.abs(ctx.peaks[s].pixel - lines.pixel[j]) < 0.12 * localSpacing(lines, j)) {
            matches++;
            key += `${s}:${lines.harmonic[j]},`;
          }
        }
        seeds.push({ harmonic, start: state.fit.parameters, matches, prior: state.fit.chiSquarePrior, chi: state.fit.chiSquarePosition, key });
      }
    }
  }
  seeds.sort((x, y) => y.matches - x.matches || x.prior + x.chi - (y.prior + y.chi));
  const grownKeys = new Set<string>();
  const out = new Map<string, Candidate>();
  let grown = 0;
  const topMatches = seeds.length > 0 ? seeds[0].matches : 0;
  for (const seed of seeds) {
    if (grown >= MAX_GROWN_SEEDS) break;
    // Seeds that explain far fewer strong peaks than the best seed cannot win; growing them wastes time.
    if (seed.matches < topMatches - 3 && grown >= 8) break;
    if (grownKeys.has(seed.key)) continue;
    grownKeys.add(seed.key);
    grown++;
    const lab = grow(ctx, seed.harmonic, seed.start);
    if (!lab) continue;
    let ok = true;
    for (const [p, q] of ctx.pins) if (lab.harmonic[p] !== q) ok = false;
    if (!ok) continue;
    const key0 = labelKey(lab.harmonic, lab.order);
    if (out.has(key0)) continue;
    const cand = finish(ctx, lab.harmonic, lab.order, lab.fit.parameters);
    const key = labelKey(cand.harmonic, cand.order);
    const prev = out.get(key);
    if (!prev || totalScore(cand.raw, 1) < totalScore(prev.raw, 1)) out.set(key, cand);
  }
  return [...out.values()];
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
  const { ctx, original, tol } = prepared;
  const notes = [
    `Assumed: the effective driver wavelength lies between ${(input.driverNm * (1 - tol)).toFixed(3)} nm and ${input.driverNm.toFixed(3)} nm (harmonics blue-shift with ionisation).`,
  ];
  if (ctx.peaks.length < 2 || (ctx.peaks.length < 3 && ctx.pins.size === 0 && !ctx.anchored && ctx.peaks.length < 2)) {
    return failed(`Only ${ctx.peaks.length} usable peak(s) on the detector; at least 2 are needed to assign orders (3 or more to decide them without a pin).`, notes);
  }
  if (!ctx.angleKnown) notes.push('The profile gives no central diffraction angle; it was searched over all angles.');
  const candidates = searchCandidates(ctx, tol);
  const viable = candidates.filter((c) => c.raw.firstOrderCount >= 2);
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
    scaleSigmaRelative = unanchoredScaleSigma(tol * 100);
    driverSigmaNm = scaleSigmaRelative * driverNm;
    notes.push(
      `No absolute anchor: the driver wavelength is taken as ${driverNm.toFixed(3)} nm, the middle of its tolerance, so the whole wavelength scale is uncertain by ±${(200 * scaleSigmaRelative).toFixed(2)} % (2σ). A filter edge seen on a continuum, a known line or a geometry measured after the realignment would pin it.`,
    );
  }
  const blendCount = best.blends.size;
  if (blendCount > 0) notes.push(`${blendCount} peak(s) may also hold the m = 2 line of twice their harmonic (parity 'all': the same pixel); their labels give the m = 1 reading, and position cannot tell them apart.`);

  const base = {
    hypotheses,
    best: bestHyp,
    anchored: ctx.anchored,
    driverNm,
    driverSigmaNm,
    scaleSigmaRelative,
    reducedChiSquare: reducedChi,
    notes,
  };
  if (reducedChi > 2500) {
    return { ...base, status: 'failed', message: `The best labelling fits the peaks badly (reduced χ² ${reducedChi.toFixed(0)}); the profile or the driver wavelength is probably wrong.` };
  }
  const lineWord = `${best.raw.firstOrderCount} first-order line(s) q = ${bestHyp.firstHarmonic}–${bestHyp.lastHarmonic}`;
  const delta = runnerUp ? totalScore(runnerUp.raw, s2) - bestScore : Infinity;
  const enoughLines = best.raw.firstOrderCount >= 3 || ctx.pins.size > 0 || ctx.anchored;
  if (delta >= margin && enoughLines) {
    const rival = runnerUp ? ` The next labelling trails by ${delta.toFixed(1)} in −2 ln L.` : ' No other labelling fits within the ranges.';
    return { ...base, status: 'unique', message: `Orders assigned: ${lineWord}${best.raw.secondOrderCount ? `, ${best.raw.secondOrderCount} m = 2 line(s)` : ''}${best.raw.unexplainedCount ? `, ${best.raw.unexplainedCount} unexplained peak(s)` : ''}.${rival}` };
  }
  let detail = '';
  if (runnerUp) {
    const i = best.harmonic.findIndex((h, k) => h > 0 && runnerUp.harmonic[k] > 0 && (h !== runnerUp.harmonic[k] || best.order[k] !== runnerUp.order[k]));
    if (i >= 0) {
      detail = ` The peak at pixel ${ctx.peaks[i].pixel.toFixed(1)} is harmonic ${best.harmonic[i]} in the best labelling and ${runnerUp.harmonic[i]} in the next, which trails by only ${delta.toFixed(1)} (unique needs ${margin}).`;
    }
  } else {
    detail = ` Only ${best.raw.firstOrderCount} first-order line(s) were found.`;
  }
  return {
    ...base,
    status: 'ambiguous',
    message: `The data cannot decide the orders.${detail} A pin on one peak, a filter whose absorption edge falls inside the spectrum, a known line, or a narrower realignment range would decide it.`,
  };
}
