/**
 * The labelling search: seed hypotheses from pairs of strong peaks (linearSeed), fit the physical
 * grating model, grow the labelling outward with further matching peaks, refit, then test the
 * leftovers as second-order lines. Each finished labelling is scored by −2 ln L (see score.ts).
 *
 * Physics used (common practice): harmonic q of a driver λ0 sits at λ0/q (first-order
 * wavelength); a line in diffraction order m lands where m·λ lands in m = 1 (grating equation
 * m·λ = d(sin α − sin β)).
 */
import { HC_EV_NM } from '../constants.ts';
import { groovePeriodNm, pixelToWavelengthNm, planeOffsetPerDistance, wavelengthToDiffractionAngleRad } from '../grating.ts';
import {
  fitModel,
  type Wall,
  geometryOf,
  predictPixel,
  P_ANGLE,
  P_CENTER,
  P_DISTANCE,
  P_DRIVER,
  P_INCIDENCE,
  P_TILT,
  type ModelContext,
  type ModelFit,
  type ModelPoint,
} from './model.ts';
import type { Parity } from '../types.ts';
import { spuriousCost } from './score.ts';
import { driverSpanNm, type DriverPrior } from './priors.ts';

/** A peak as the search sees it (index = position in the usable list). */
export interface SearchPeak {
  pixel: number;
  sigmaPx: number;
  snr: number;
  /** Line area (counts), > 0. */
  area: number;
  spatialWidthPx: number;
  /** Fitted FWHM along the spectral axis, px. */
  fwhmPx: number;
  /** Centre within a few widths of the detector edge (line possibly truncated). */
  edge: boolean;
  /** Some of the line's pixels were clipped at full scale. */
  saturated: boolean;
}

export interface SearchContext {
  model: ModelContext;
  /** The driver prior (measured wavelength, its σ, the blue-shift allowance). */
  driver: DriverPrior;
  peaks: SearchPeak[];
  parity: Parity;
  angleKnown: boolean;
  /** True when known lines with pixels fix the absolute scale (driver wavelength then free). */
  anchored: boolean;
  /** Known-wavelength points always in the fit. */
  knownPoints: ModelPoint[];
  /** Peaks that are known lines (index → label): explained, never given a harmonic label. */
  /** Peaks that are known lines: label, wavelength and index of their point in `knownPoints`. */
  knownPeaks: Map<number, { label: string; wavelengthNm: number; point: number }>;
  /** Filter stack transmission at a photon energy. */
  transmission: (energyEv: number) => number;
  /** False when nothing is in the beam (transmission 1 everywhere): envelope terms are then 0. */
  filtered: boolean;
  /** peak index → pinned harmonic (m = 1). */
  pins: Map<number, number>;
  /** Transmission below which no line of this frame can be detected (see opaqueTransmission). */
  opaqueTransmission: number;
}

/** A finished labelling. */
export interface Labelling {
  harmonic: Int32Array;
  order: Int8Array;
  fit: ModelFit;
  /** Fit with the second-order lines included, same as `fit` when there are none. */
  points: ModelPoint[];
  pointPeak: number[];
}

/** Upper bound of the transmission below which a line cannot be detected (the filter stack is opaque there). */
export const OPAQUE_TRANSMISSION = 1e-3;

/**
 * Transmission below which no line of this frame could be seen. A bright comb shows lines through
 * a filter's "opaque" side (an Al foil passing 5e-4 above its edge still shows a plateau line of
 * SNR 3000 at SNR ~ 60), so the bound scales with the brightest peak: with shot-noise-limited lines
 * SNR ∝ √(photons), a line is lost below T ≈ (3 / SNR_max)². Never above OPAQUE_TRANSMISSION.
 */
export function opaqueTransmission(maxSnr: number): number {
  const s = Number.isFinite(maxSnr) && maxSnr > 3 ? maxSnr : 3;
  return Math.min(OPAQUE_TRANSMISSION, Math.max(1e-9, (3 / s) ** 2));
}

export function harmonicStep(parity: Parity): number {
  return parity === 'odd' ? 2 : 1;
}

export function allowedHarmonic(parity: Parity, q: number): boolean {
  return q >= 1 && (parity === 'all' || q % 2 === 1);
}

export function harmonicEnergyEv(lambda0Nm: number, q: number): number {
  return (q * HC_EV_NM) / lambda0Nm;
}

/** Predicted lines of one diffraction order on the detector, sorted by pixel. */
export interface LineSet {
  harmonic: number[];
  pixel: number[];
}

/** Range of first-order wavelengths that land on the detector under `p`. */
function detectorWavelengthRange(ctx: SearchContext, p: ArrayLike<number>): [number, number] | null {
  const g = geometryOf(ctx.model, p);
  const n = ctx.model.pixelCount;
  const a = pixelToWavelengthNm(g, -0.5);
  const b = pixelToWavelengthNm(g, n - 0.5);
  if (!Number.isFinite(a) || !Number.isFinite(b)) return null;
  return [Math.min(a, b), Math.max(a, b)];
}

/** Lines of diffraction order m (harmonics allowed by parity, filters not opaque) on the detector. */
export function predictLines(ctx: SearchContext, p: ArrayLike<number>, m: number): LineSet {
  const range = detectorWavelengthRange(ctx, p);
  const out: LineSet = { harmonic: [], pixel: [] };
  if (!range) return out;
  const lambda0 = p[P_DRIVER];
  const qLo = Math.max(1, Math.ceil((m * lambda0) / range[1]));
  const qHi = Math.min(2000, Math.floor((m * lambda0) / range[0]));
  const items: [number, number][] = [];
  for (let q = qLo; q <= qHi; q++) {
    if (!allowedHarmonic(ctx.parity, q)) continue;
    // Parity 'all': m = 2 of an even q lands exactly on m = 1 of q/2 — a blend, not a separate line.
    if (m === 2 && ctx.parity === 'all' && q % 2 === 0) continue;
    // m = 3 of 3k lands exactly on m = 1 of k: a blend, not a separate line.
    if (m === 3 && q % 3 === 0 && allowedHarmonic(ctx.parity, q / 3)) continue;
    if (ctx.transmission(harmonicEnergyEv(lambda0, q)) < ctx.opaqueTransmission) continue;
    const px = predictPixel(ctx.model, p, (m * lambda0) / q);
    if (Number.isFinite(px)) items.push([px, q]);
  }
  items.sort((x, y) => x[0] - y[0]);
  for (const [px, q] of items) {
    out.pixel.push(px);
    out.harmonic.push(q);
  }
  return out;
}

/** Index of the predicted line nearest to `pixel`, or −1. */
export function nearestLine(lines: LineSet, pixel: number): number {
  const xs = lines.pixel;
  if (xs.length === 0) return -1;
  let lo = 0;
  let hi = xs.length - 1;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if (xs[mid] < pixel) lo = mid;
    else hi = mid;
  }
  return Math.abs(xs[lo] - pixel) <= Math.abs(xs[hi] - pixel) ? lo : hi;
}

/** Distance from line j to its nearest neighbour line, px. */
export function localSpacing(lines: LineSet, j: number): number {
  const xs = lines.pixel;
  let s = Number.POSITIVE_INFINITY;
  if (j > 0) s = Math.min(s, xs[j] - xs[j - 1]);
  if (j < xs.length - 1) s = Math.min(s, xs[j + 1] - xs[j]);
  return s;
}

export function labelledPoints(ctx: SearchContext, harmonic: Int32Array, order: Int8Array): { points: ModelPoint[]; pointPeak: number[] } {
  const points: ModelPoint[] = [];
  const pointPeak: number[] = [];
  for (let i = 0; i < harmonic.length; i++) {
    if (harmonic[i] <= 0) continue;
    const pk = ctx.peaks[i];
    points.push({ pixel: pk.pixel, sigmaPx: pk.sigmaPx, scale: order[i] / harmonic[i], fixedNm: 0 });
    pointPeak.push(i);
  }
  for (const k of ctx.knownPoints) {
    points.push(k);
    pointPeak.push(-1);
  }
  return { points, pointPeak };
}

/** Which parameters to free for a fit of `count` points (groups freed as data allow). */
export function freeParameters(ctx: SearchContext, count: number): number[] {
  const free = [ctx.angleKnown ? P_CENTER : P_ANGLE, P_DISTANCE];
  // The incidence is free from two points on: at normal incidence a realignment of it shifts the
  // whole spectrum by more than the centre's range, so a seed that can only move the centre fails.
  if (count >= 2) free.push(P_INCIDENCE);
  // With three or more points every nuisance parameter is free inside its wall: holding one (the
  // tilt, say) at its nominal value would favour whichever labelling happens to absorb its true value.
  if (count >= 3) free.push(P_TILT);
  // λ0 is free inside its blue-shift wall even without an anchor: otherwise the geometry alone has
  // to absorb the true λ0's offset from the middle of the tolerance, and a rival labelling would be
  // judged against the wrong scale.
  // With a known line the driver is what the anchor measures: free as soon as two points are in.
  if (count >= 3 || (ctx.anchored && count >= 2)) free.push(P_DRIVER);
  return free;
}

function fitLabels(ctx: SearchContext, harmonic: Int32Array, order: Int8Array, start: ArrayLike<number>, warm = false): { fit: ModelFit; points: ModelPoint[]; pointPeak: number[] } {
  const { points, pointPeak } = labelledPoints(ctx, harmonic, order);
  const free = freeParameters(ctx, points.length);
  // Cold starts in two stages: the shift/scale pair first, then everything free; this keeps LM out
  // of the flat valley's far ends. A warm start (the previous fit of nearly the same labelling) is
  // already in the valley and goes straight to the full fit.
  let fit = warm || free.length <= 2 ? fitModel(ctx.model, points, start, free) : fitModel(ctx.model, points, start, free.slice(0, 2));
  if (!warm && free.length > 2) fit = fitModel(ctx.model, points, fit.parameters, free);
  return { fit, points, pointPeak };
}

/** Starting parameters that put harmonic q of peak i exactly on its pixel (shift only). */
export function seedStart(ctx: SearchContext, peakIndex: number, q: number): Float64Array | null {
  const p = Float64Array.from(ctx.model.nominal);
  const lambda1 = p[P_DRIVER] / q;
  const g = geometryOf(ctx.model, p);
  const beta = wavelengthToDiffractionAngleRad(g, lambda1, 1);
  if (!Number.isFinite(beta)) return null;
  if (ctx.angleKnown) {
    const px = predictPixel(ctx.model, p, lambda1);
    if (!Number.isFinite(px)) return null;
    p[P_CENTER] += ctx.peaks[peakIndex].pixel - px;
  } else {
    const sMm = (ctx.peaks[peakIndex].pixel - p[P_CENTER]) * g.pixelPitchUm * 1e-3;
    const dir = g.wavelengthIncreasesWithPixel ? -1 : 1;
    p[P_ANGLE] = ((beta - dir * Math.atan(sMm / g.detectorDistanceMm)) * 180) / Math.PI;
  }
  return p;
}

const DEG = Math.PI / 180;

/**
 * A seed without an iterative fit: with the nominal incidence, tilt θ and λ0, a flat detector
 * puts first-order λ at s = L·t/(cos θ − t·sin θ), t = tan(β(λ) − β0) (grating.ts), which is
 * linear in the centre c and the distance L. Two labelled peaks fix both exactly. The seed is
 * kept when L and c lie within what the walls (plus what the incidence, tilt and λ0 ranges can
 * mimic: a stretch of ±15 % and a shift of L·Δβ/pitch) allow. Returns the parameters and a
 * plausibility cost (relative stretch and shift beyond the walls), or null.
 */
export function linearSeed(ctx: SearchContext, a: number, qa: number, b: number, qb: number): { start: Float64Array; cost: number } | null {
  const m = ctx.model;
  const p = Float64Array.from(m.nominal);
  const g = geometryOf(m, p);
  const pitchMm = m.pixelPitchUm * 1e-3;
  const u = (q: number): number => planeOffsetPerDistance(g, p[P_DRIVER] / q, 1);
  const ua = u(qa);
  const ub = u(qb);
  if (!Number.isFinite(ua) || !Number.isFinite(ub) || ua === ub) return null;
  const pa = ctx.peaks[a].pixel;
  const pb = ctx.peaks[b].pixel;
  const L = ((pb - pa) * pitchMm) / (ub - ua);
  if (!(L > 0)) return null;
  const L0 = p[P_DISTANCE];
  const stretch = Math.abs(L / L0 - 1);
  const dWall = m.walls[P_DISTANCE] as Wall;
  const stretchFree = Math.max(dWall.hi / L0 - 1, 1 - dWall.lo / L0) + 0.15;
  if (stretch > stretchFree) return null;
  const c = pa - (L * ua) / pitchMm;
  const cWall = m.walls[P_CENTER] as Wall;
  const incWall = m.walls[P_INCIDENCE] as Wall;
  const lambdaA = p[P_DRIVER] / qa;
  const [lambdaLo, lambdaHi] = driverSpanNm(ctx.driver);
  const driverSpread = (lambdaHi - lambdaLo) / 2 / p[P_DRIVER];
  // dβ = (cos α dα − dλ/d)/cos β from the grating equation: the shift an incidence or λ0 change can mimic.
  const alpha = p[P_INCIDENCE] * DEG;
  const cosBeta = Math.max(1e-5, Math.cos(wavelengthToDiffractionAngleRad(g, lambdaA, 1)));
  const dAlpha = ((incWall.hi - incWall.lo) / 2) * DEG;
  const shiftFree = (L * (dAlpha * Math.abs(Math.cos(alpha)) / cosBeta + (driverSpread * lambdaA) / (groovePeriodNm(m.grooveDensityPerMm) * cosBeta))) / pitchMm + 0.02 * m.pixelCount;
  const beyond = c < cWall.lo ? cWall.lo - c : c > cWall.hi ? c - cWall.hi : 0;
  if (beyond > shiftFree) return null;
  p[P_CENTER] = c;
  p[P_DISTANCE] = L;
  return { start: p, cost: stretch / stretchFree + beyond / shiftFree };
}

/** Grow window: a peak joins a labelling when it lies within this fraction of the local line spacing. */
const GROW_WINDOW = 0.12;

/**
 * Grow a labelling from a seed: fit, predict first-order lines, add peaks that sit on a predicted
 * line, refit, until nothing more joins. Then drop gross outliers.
 */
export function grow(ctx: SearchContext, seedHarmonic: Int32Array, start: ArrayLike<number>): Labelling | null {
  const n = ctx.peaks.length;
  const harmonic = Int32Array.from(seedHarmonic);
  const order = new Int8Array(n);
  for (let i = 0; i < n; i++) if (harmonic[i] > 0) order[i] = 1;
  let params: ArrayLike<number> = start;
  let state = fitLabels(ctx, harmonic, order, params);
  for (let iter = 0; iter < 40; iter++) {
    params = state.fit.parameters;
    const lines = predictLines(ctx, params, 1);
    if (lines.pixel.length === 0) return null;
    const used = new Set<number>();
    for (let i = 0; i < n; i++) if (harmonic[i] > 0) used.add(harmonic[i]);
    const best = new Map<number, { peak: number; rel: number }>();
    for (let i = 0; i < n; i++) {
      if (harmonic[i] > 0 || ctx.knownPeaks.has(i)) continue;
      const j = nearestLine(lines, ctx.peaks[i].pixel);
      if (j < 0) continue;
      const q = lines.harmonic[j];
      if (used.has(q)) continue;
      const rel = Math.abs(ctx.peaks[i].pixel - lines.pixel[j]) / localSpacing(lines, j);
      if (!(rel < GROW_WINDOW)) continue;
      const prev = best.get(q);
      // Two peaks on one line: keep the closer, weighted towards the stronger (m = 2 lines are weak).
      const key = rel / Math.sqrt(Math.max(ctx.peaks[i].snr, 1));
      if (!prev || key < prev.rel) best.set(q, { peak: i, rel: key });
    }
    if (best.size === 0) break;
    // Grow outward: add the candidates nearest the labelled span first (few at a time while the
    // model is still loosely constrained, all at once later).
    const labelledPx: number[] = [];
    for (let i = 0; i < n; i++) if (harmonic[i] > 0) labelledPx.push(ctx.peaks[i].pixel);
    const lo = Math.min(...labelledPx);
    const hi = Math.max(...labelledPx);
    const cands = [...best.entries()].map(([q, v]) => {
      const px = ctx.peaks[v.peak].pixel;
      return { q, peak: v.peak, dist: px < lo ? lo - px : px > hi ? px - hi : 0 };
    });
    cands.sort((a, b) => a.dist - b.dist);
    const take = labelledPx.length < 5 ? 2 : cands.length;
    for (const c of cands.slice(0, take)) {
      harmonic[c.peak] = c.q;
      order[c.peak] = 1;
    }
    state = fitLabels(ctx, harmonic, order, params, true);
  }
  // Outlier removal: a labelled peak far off the fitted curve (relative to the fit's own scatter) is dropped.
  for (let round = 0; round < 4; round++) {
    const { fit, points, pointPeak } = state;
    const m = points.length;
    if (m < 4) break;
    const z = points.map((pt, k) => Math.abs(fit.residualsPx[k] / pt.sigmaPx));
    const sorted = [...z].sort((a, b) => a - b);
    const median = sorted[Math.floor(sorted.length / 2)];
    const scale = Math.max(1, median / 0.6745);
    let worst = -1;
    let worstZ = 0;
    for (let k = 0; k < m; k++) {
      const peak = pointPeak[k];
      if (peak < 0 || ctx.pins.has(peak)) continue;
      if (z[k] > 6 * scale && z[k] > worstZ) {
        worst = peak;
        worstZ = z[k];
      }
    }
    if (worst < 0) break;
    harmonic[worst] = 0;
    order[worst] = 0;
    state = fitLabels(ctx, harmonic, order, state.fit.parameters, true);
  }
  // A badly fitting labelling may hide one wrong member (a false peak beside a weak line, a blend)
  // that distorts the whole fit, so the residual test above cannot see it: try leaving each labelled
  // peak out and drop the one whose removal gains more than calling it spurious costs.
  for (let round = 0; round < 3; round++) {
    const { fit, points, pointPeak } = state;
    const free = fit.freeIndices.length;
    const m = points.length;
    if (m - 1 - free < 1 || m > LEAVE_OUT_MAX_POINTS || fit.chiSquarePosition / (m - free) < BAD_FIT_REDUCED_CHI2) break;
    let bestPeak = -1;
    let bestState: ReturnType<typeof fitLabels> | null = null;
    for (let k = 0; k < m; k++) {
      const peak = pointPeak[k];
      if (peak < 0 || ctx.pins.has(peak)) continue;
      const h2 = Int32Array.from(harmonic);
      const o2 = Int8Array.from(order);
      h2[peak] = 0;
      o2[peak] = 0;
      const trial = fitLabels(ctx, h2, o2, fit.parameters, true);
      if (!bestState || trial.fit.chiSquarePosition + trial.fit.chiSquarePrior < bestState.fit.chiSquarePosition + bestState.fit.chiSquarePrior) {
        bestState = trial;
        bestPeak = peak;
      }
    }
    if (!bestState) break;
    const s2 = Math.max(1, bestState.fit.chiSquarePosition / Math.max(1, m - 1 - free));
    const gain = (fit.chiSquarePosition + fit.chiSquarePrior - bestState.fit.chiSquarePosition - bestState.fit.chiSquarePrior) / s2;
    if (!(gain > spuriousCost(ctx.model.pixelCount))) break;
    harmonic[bestPeak] = 0;
    order[bestPeak] = 0;
    state = bestState;
  }
  return { harmonic, order, fit: state.fit, points: state.points, pointPeak: state.pointPeak };
}

/** Reduced χ² above which grow() looks for one wrong member by leaving peaks out. */
const BAD_FIT_REDUCED_CHI2 = 9;
/** Leave-one-out is for short labellings; in long ones the median-based test above sees a wrong member. */
const LEAVE_OUT_MAX_POINTS = 16;

/** Refit a labelling including second-order labels (`warm`: the start is a fit of nearly the same labelling). */
export function refit(ctx: SearchContext, harmonic: Int32Array, order: Int8Array, start: ArrayLike<number>, warm = false): { fit: ModelFit; points: ModelPoint[]; pointPeak: number[] } {
  return fitLabels(ctx, harmonic, order, start, warm);
}

/** Pixel uncertainty of a prediction from the fit covariance (scaled by the fit's own reduced χ²). */
export function predictionSigma(ctx: SearchContext, fit: ModelFit, lambda1: number, s2: number): number {
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

