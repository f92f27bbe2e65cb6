/**
 * Can the data decide? An information check that shares nothing with the engine but the physics
 * (grating.ts, the forward model; the simulator's filter table): no engine prior, wall, range,
 * score or fit.
 *
 * The detected peaks that sit on true first-order lines are given the TRUE labels and, in turn,
 * the labelling slipped by ±1 and ±2 parity steps (q → q + k·step for every line). Each labelling
 * is fitted with our own bounded least squares (bounded-least-squares.ts) over generous ranges
 * about the truth: effective λ0 ± 2.5 % (or ± twice the user's stated tolerance when that is
 * wider: what the user does not know, the data must decide alone), incidence ± 1°, distance
 * ± 6 %, tilt ± 15°, and the centre pixel free (profiled exactly: it enters the predicted pixel
 * additively). Absolute anchors (a filter edge seen on a continuum: a known first-order
 * wavelength at a pixel) join every labelling's fit as points of their own. The central
 * diffraction angle is held at the truth: with the centre free and the tilt free, a change of
 * it is a shift of the centre plus a change of the tilt about the new central ray, so it adds
 * no freedom.
 *
 * Centroid σ are the peaks' own, floored at 0.01 px (CENTROID_FLOOR_PX).
 * Δχ² of a slip = (χ²_slip − χ²_truth) / s², where s² is the truth fit's reduced χ² (floored at
 * 1, so over-stated centroid errors never inflate a margin; and 1 when there are no more lines
 * than free parameters). Decidable when every slip misses by Δχ² ≥ 16 (≈ 4σ, the margin the
 * prototype's notes found safe) and at least three first-order lines were detected: fewer
 * decide nothing without an anchor. m = 2 lines are left out: a rival labelling may call them
 * stray peaks, so they do not count as evidence here. With an anchor, two lines and the anchor
 * make the three points.
 *
 * One physical exclusion, with the filters in the beam: a slip that moves the seen lines across
 * the stack's transmission so that the source spectrum they imply changes shape by more than a
 * factor 100 between two seen lines (against what the truth implies) would need harmonic
 * neighbours a hundred times apart in brightness, which plateaus do not show (from memory), so
 * it is excluded as a rival.
 */
import { HC_EV_NM } from '../../shared/engine/constants.ts';
import { wavelengthToPixel } from '../../shared/engine/grating.ts';
import { filterStackTransmission, type FilterTransmissionFn, type SimFilter, type SimLine } from '../../shared/engine/simulate/index.ts';
import type { GratingGeometry, Parity } from '../../shared/engine/types.ts';
import { boundedLeastSquares } from './bounded-least-squares.ts';

/** Generous ranges about the truth (fractions and degrees). */
export const INDEPENDENT_BOUNDS = { driverRelative: 0.025, incidenceDeg: 1, distanceRelative: 0.06, tiltDeg: 15 } as const;
/** Δχ² a slip must trail the truth by (≈ 4σ). */
export const INDEPENDENT_MARGIN = 16;
/** Fewer first-order lines than this decide nothing without an anchor. */
export const MIN_FIRST_ORDER_LINES = 3;
/** A slip implying a source spectrum reshaped by more than this factor between seen lines is not a rival. */
export const FILTER_RESHAPE_LIMIT = 100;
/** A peak sits on a true line when it is within this many pixels of it. */
export const MATCH_TOLERANCE_PX = 1.5;
/**
 * Smallest centroid σ believed, px: pixel response and line-shape residuals leave ~0.01 px on
 * real lines however bright (from memory); without it, three bright lines (no degrees of freedom
 * to scale by) would call a 0.02 px misfit decisive.
 */
export const CENTROID_FLOOR_PX = 0.01;
/** Free parameters of a labelling fit: λ0, incidence, distance, tilt, centre. */
const FREE_PARAMETERS = 5;
/** Residual (in σ) given to a line the model cannot place on the detector plane. */
const UNPLACEABLE_RESIDUAL = 1e4;

export interface PeakPosition {
  pixel: number;
  pixelSigma: number;
}

/** What the check needs to know of the truth. */
export interface DecidabilityTruth {
  lines: readonly SimLine[];
  geometry: GratingGeometry;
  effectiveDriverNm: number;
  parity: Parity;
  filters?: readonly SimFilter[];
  /** The driver tolerance the user states, percent (widens the λ0 range when 2× it exceeds 2.5 %). */
  statedTolerancePercent?: number;
  /** Absolute anchors the frame shows: a first-order wavelength at a pixel. @default [] */
  anchors?: readonly ScaleAnchorPoint[];
}

/** A known first-order wavelength seen at a pixel (a filter edge on a continuum, a known line). */
export interface ScaleAnchorPoint {
  pixel: number;
  pixelSigma: number;
  wavelengthNm: number;
}

export interface LabellingFit {
  chiSquare: number;
  driverNm: number;
  geometry: GratingGeometry;
}

export interface SlipVerdict {
  /** Parity steps the labelling slipped by (−2, −1, 1, 2). */
  steps: number;
  /** (χ²_slip − χ²_truth) / s²; NaN when the slip was not fitted. */
  deltaChiSquare: number;
  fittedDriverNm: number;
  /** Why the slip is no rival, when it is not. */
  excluded?: string;
}

export interface IndependentDecision {
  decidable: boolean;
  /** One line saying why. */
  reason: string;
  /** Detected peaks that sit on true first-order lines. */
  firstOrderLines: number;
  truthChiSquare: number;
  /** s²: the truth fit's reduced χ², floored at 1. */
  scale: number;
  /** Smallest Δχ² over the slips that are rivals (Infinity when none is). */
  margin: number;
  slips: SlipVerdict[];
}

/**
 * For each peak, the true line it sits on (nearest within MATCH_TOLERANCE_PX; where lines
 * coincide within 0.5 px, the first-order one), or null. A line claimed by two peaks keeps the nearer.
 */
export function matchPeaksToLines(peaks: readonly PeakPosition[], lines: readonly SimLine[], tolerancePx = MATCH_TOLERANCE_PX): (SimLine | null)[] {
  const matched = peaks.map((peak) => {
    let nearest: SimLine | null = null;
    let best = Infinity;
    for (const line of lines) {
      const d = Math.abs(line.pixel - peak.pixel);
      if (d < best) {
        best = d;
        nearest = line;
      }
    }
    if (!nearest || best > tolerancePx) return null;
    const centre = nearest.pixel;
    const coincidentFirst = lines.find((l) => l.diffractionOrder === 1 && Math.abs(l.pixel - centre) <= 0.5 && Math.abs(l.pixel - peak.pixel) <= tolerancePx);
    return coincidentFirst ?? nearest;
  });
  // One peak per line: the nearer one keeps it.
  const owner = new Map<SimLine, number>();
  matched.forEach((line, i) => {
    if (!line) return;
    const other = owner.get(line);
    if (other === undefined || Math.abs(peaks[i].pixel - line.pixel) < Math.abs(peaks[other].pixel - line.pixel)) owner.set(line, i);
  });
  return matched.map((line, i) => (line && owner.get(line) === i ? line : null));
}

interface FitPoint {
  pixel: number;
  sigma: number;
  harmonic: number;
}

interface Problem {
  lines: readonly FitPoint[];
  anchors: readonly ScaleAnchorPoint[];
  driverRelative: number;
}

function geometryAt(truth: GratingGeometry, p: readonly number[]): GratingGeometry {
  return { ...truth, incidenceAngleDeg: p[1], detectorDistanceMm: p[2], detectorTiltDeg: p[3], detectorCenterPixel: 0 };
}

/** Weighted residuals of the first-order lines and the anchors with the centre pixel profiled out; also returns that centre. */
function residualsOf(problem: Problem, truth: GratingGeometry, p: readonly number[]): { residuals: number[]; centre: number } {
  const g = geometryAt(truth, p);
  const points = [...problem.lines.map((pt) => ({ pixel: pt.pixel, sigma: pt.sigma, nm: p[0] / pt.harmonic })), ...problem.anchors.map((a) => ({ pixel: a.pixel, sigma: a.pixelSigma, nm: a.wavelengthNm }))];
  const offsets = points.map((pt) => wavelengthToPixel(g, pt.nm, 1));
  let sw = 0;
  let swx = 0;
  points.forEach((pt, i) => {
    if (!Number.isFinite(offsets[i])) return;
    const w = 1 / (pt.sigma * pt.sigma);
    sw += w;
    swx += w * (pt.pixel - offsets[i]);
  });
  const centre = sw > 0 ? swx / sw : 0;
  const residuals = points.map((pt, i) => (Number.isFinite(offsets[i]) ? (pt.pixel - offsets[i] - centre) / pt.sigma : UNPLACEABLE_RESIDUAL));
  return { residuals, centre };
}

/**
 * Fits one labelling of first-order points over the generous ranges about the truth, from
 * several starts (the truth; λ0 at the value the labels imply; corners of incidence, distance and
 * tilt), and returns the best.
 */
export function fitLabellingIndependently(problem: Problem, truthGeometry: GratingGeometry, truthDriverNm: number, truthHarmonics: readonly number[]): LabellingFit {
  const B = INDEPENDENT_BOUNDS;
  const points = problem.lines;
  const lower = [truthDriverNm * (1 - problem.driverRelative), truthGeometry.incidenceAngleDeg - B.incidenceDeg, truthGeometry.detectorDistanceMm * (1 - B.distanceRelative), truthGeometry.detectorTiltDeg - B.tiltDeg];
  const upper = [truthDriverNm * (1 + problem.driverRelative), Math.min(89.9, truthGeometry.incidenceAngleDeg + B.incidenceDeg), truthGeometry.detectorDistanceMm * (1 + B.distanceRelative), truthGeometry.detectorTiltDeg + B.tiltDeg];
  const clip = (v: number, j: number): number => Math.min(upper[j], Math.max(lower[j], v));
  // λ0 the relabelled lines ask for: the same wavelengths at the same pixels, λ0'/q' = λ0/q.
  const ratios = points.map((pt, i) => pt.harmonic / truthHarmonics[i]).sort((a, b) => a - b);
  const implied = clip(truthDriverNm * ratios[ratios.length >> 1], 0);
  const truthStart = [truthDriverNm, truthGeometry.incidenceAngleDeg, truthGeometry.detectorDistanceMm, truthGeometry.detectorTiltDeg];
  const starts: number[][] = [truthStart];
  const relabelled = points.some((pt, i) => pt.harmonic !== truthHarmonics[i]);
  // The true labelling starts at its own optimum; a slip needs the corners of the valley too.
  if (relabelled) starts.push([implied, ...truthStart.slice(1)]);
  for (const da of relabelled ? [-0.7, 0.7] : []) {
    for (const dl of [-0.04, 0.04]) {
      for (const dt of [-10, 10]) starts.push([implied, clip(truthStart[1] + da, 1), clip(truthStart[2] * (1 + dl), 2), clip(truthStart[3] + dt, 3)]);
    }
  }
  let best: LabellingFit | null = null;
  for (const start of starts) {
    // χ² is compared at the level of the margin (16): 1e-4 is ample precision.
    const fit = boundedLeastSquares((p) => residualsOf(problem, truthGeometry, p).residuals, start, lower, upper, { absoluteTolerance: 1e-4 });
    if (!best || fit.chiSquare < best.chiSquare) {
      const { centre } = residualsOf(problem, truthGeometry, fit.parameters);
      best = { chiSquare: fit.chiSquare, driverNm: fit.parameters[0], geometry: { ...geometryAt(truthGeometry, fit.parameters), detectorCenterPixel: centre } };
    }
  }
  return best as LabellingFit;
}

/** Spread of ln(T_slip / T_truth) over the seen lines: how much a slip reshapes the implied source spectrum. */
function filterReshape(filters: readonly SimFilter[], harmonics: readonly number[], slipped: readonly number[], truthDriverNm: number, slipDriverNm: number, transmission?: FilterTransmissionFn): number {
  let lo = Infinity;
  let hi = -Infinity;
  harmonics.forEach((q, i) => {
    const t = Math.max(1e-300, filterStackTransmission(filters, (q * HC_EV_NM) / truthDriverNm, transmission));
    const ts = Math.max(1e-300, filterStackTransmission(filters, (slipped[i] * HC_EV_NM) / slipDriverNm, transmission));
    const v = Math.log(ts / t);
    lo = Math.min(lo, v);
    hi = Math.max(hi, v);
  });
  return Number.isFinite(hi - lo) ? hi - lo : 0;
}

export interface IndependentOptions {
  /** @default INDEPENDENT_MARGIN */
  margin?: number;
  /** Filter transmission source. @default the simulator's table */
  transmission?: FilterTransmissionFn;
}

/** The check described in the module comment. */
export function independentDecidability(peaks: readonly PeakPosition[], truth: DecidabilityTruth, options: IndependentOptions = {}): IndependentDecision {
  const margin = options.margin ?? INDEPENDENT_MARGIN;
  const matched = matchPeaksToLines(peaks, truth.lines);
  const points: FitPoint[] = [];
  matched.forEach((line, i) => {
    if (line && line.diffractionOrder === 1) points.push({ pixel: peaks[i].pixel, sigma: Math.max(peaks[i].pixelSigma, CENTROID_FLOOR_PX), harmonic: line.harmonic });
  });
  const anchors = truth.anchors ?? [];
  const base = { firstOrderLines: points.length, truthChiSquare: Number.NaN, scale: Number.NaN, slips: [] as SlipVerdict[] };
  if (points.length < 2 || points.length + anchors.length < MIN_FIRST_ORDER_LINES) {
    return { ...base, decidable: false, margin: 0, reason: `${points.length} first-order line(s) detected${anchors.length ? ` and ${anchors.length} anchor(s)` : ''}: fewer than ${MIN_FIRST_ORDER_LINES} points decide nothing` };
  }
  const driverRelative = Math.max(INDEPENDENT_BOUNDS.driverRelative, (2 * (truth.statedTolerancePercent ?? 0)) / 100);
  const problem: Problem = { lines: points, anchors, driverRelative };
  const harmonics = points.map((p) => p.harmonic);
  const truthFit = fitLabellingIndependently(problem, truth.geometry, truth.effectiveDriverNm, harmonics);
  const dof = points.length + anchors.length - FREE_PARAMETERS;
  const scale = dof > 0 ? Math.max(1, truthFit.chiSquare / dof) : 1;
  const step = truth.parity === 'odd' ? 2 : 1;
  const slips: SlipVerdict[] = [];
  let smallest = Infinity;
  for (const steps of [-2, -1, 1, 2]) {
    const slipped = harmonics.map((q) => q + steps * step);
    if (slipped.some((q) => q < 1)) {
      slips.push({ steps, deltaChiSquare: Number.NaN, fittedDriverNm: Number.NaN, excluded: 'a harmonic below 1' });
      continue;
    }
    const fit = fitLabellingIndependently({ ...problem, lines: points.map((p, i) => ({ ...p, harmonic: slipped[i] })) }, truth.geometry, truth.effectiveDriverNm, harmonics);
    const delta = (fit.chiSquare - truthFit.chiSquare) / scale;
    const reshape = truth.filters?.length ? filterReshape(truth.filters, harmonics, slipped, truth.effectiveDriverNm, fit.driverNm, options.transmission) : 0;
    if (reshape > Math.log(FILTER_RESHAPE_LIMIT)) {
      slips.push({ steps, deltaChiSquare: delta, fittedDriverNm: fit.driverNm, excluded: `the filters would reshape the implied source by ×${Math.exp(reshape).toExponential(1)}` });
      continue;
    }
    slips.push({ steps, deltaChiSquare: delta, fittedDriverNm: fit.driverNm });
    smallest = Math.min(smallest, delta);
  }
  const decidable = smallest >= margin;
  const reason = decidable
    ? `every slip misses by Δχ² ≥ ${margin} (smallest ${Number.isFinite(smallest) ? smallest.toFixed(1) : '∞'}) on ${points.length} first-order lines${anchors.length ? ` + ${anchors.length} anchor(s)` : ''}`
    : `a slip fits within Δχ² ${smallest.toFixed(1)} < ${margin} on ${points.length} first-order lines${anchors.length ? ` + ${anchors.length} anchor(s)` : ''}`;
  return { ...base, truthChiSquare: truthFit.chiSquare, scale, decidable, margin: smallest, slips, reason };
}
