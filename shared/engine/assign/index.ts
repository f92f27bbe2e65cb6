/**
 * Order assignment: decide the harmonic order q (and diffraction order m) of every peak, or say
 * honestly that the data cannot decide. The method is in README.md beside this file; the stages:
 *
 * - context.ts   the caller's input checked; peak trust; pins and known lines matched to peaks
 * - priors.ts    what the user knows, as the model's nominal vector and soft walls
 * - seeds.ts     pairs of strong peaks × harmonics → linear placements → grown labellings
 * - labelling.ts finishing a labelling: rematch, weak first-order lines, m = 2 (second-order.ts)
 * - rivals.ts    the slips of the leader (±1, ±2 parity steps), fitted in earnest
 * - score.ts     −2 ln L of a labelling
 * - verdict.ts   gates and margin: unique, ambiguous or failed, and why
 * - search.ts / model.ts  the grating-model fit (grating.ts) and the growth of a labelling
 *
 * This file runs the stages and writes the result: hypotheses, the driver wavelength and the
 * scale's 1σ (the driver prior's own 1σ without an anchor; the fit's with a known line).
 */
import { EngineError } from '../errors.ts';
import type { Peak } from '../types.ts';
import {
  geometryOf,
  P_ANGLE,
  P_CENTER,
  P_DISTANCE,
  P_DRIVER,
  P_INCIDENCE,
  P_TILT,
  PARAMETER_NAMES,
  type ModelFit,
} from './model.ts';
import { totalScore } from './score.ts';
import { refit, type SearchContext } from './search.ts';
import { prepare } from './context.ts';
import { allowedHarmonic } from './search.ts';
import { contradicts, labelKey, type Candidate } from './labelling.ts';
import { driverPriorMoments } from './priors.ts';
import { labellingStarts, shiftedRivals } from './rivals.ts';
import { searchCandidates } from './seeds.ts';
import type { AssignInput, AssignResult, Hypothesis, PeakLabel } from './types.ts';
import { decideVerdict, UNIQUE_MARGIN } from './verdict.ts';

export type { AssignInput, AssignResult, Hypothesis, PeakLabel, RealignmentRanges, FilterSpec, VerdictGate } from './types.ts';
export { DEFAULT_BLUE_SHIFT_PCT, DEFAULT_DRIVER_SIGMA_PCT, DEFAULT_RANGES, unanchoredScaleSigma } from './priors.ts';
export { UNIQUE_MARGIN } from './verdict.ts';

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

function toHypothesis(ctx: SearchContext, c: Candidate, s2: number, bestScore: number, original: number[], totalPeaks: number): Hypothesis {
  const labels: PeakLabel[] = Array.from({ length: totalPeaks }, () => ({ harmonic: null, diffractionOrder: null, residualPx: Number.NaN }));
  let sumSq = 0;
  let count = 0;
  const residualByPeak = new Map<number, number>();
  let k = 0;
  // The fit's points: the labelled peaks in order, then the known lines (a known line relabelled
  // as the harmonic it is keeps its known point's residual).
  let labelledPoints = 0;
  for (let i = 0; i < c.harmonic.length; i++) if (c.harmonic[i] > 0 && !ctx.knownPeaks.has(i)) labelledPoints++;
  for (let i = 0; i < c.harmonic.length; i++) {
    const known = ctx.knownPeaks.get(i);
    if (known !== undefined) {
      residualByPeak.set(i, c.fit.residualsPx[labelledPoints + known.point]);
      continue;
    }
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
    if (known !== undefined) label.knownLine = known.label;
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

/**
 * A known line that is a harmonic measured elsewhere (its wavelength λ0/q for an allowed q, within
 * 3σ of the fitted λ0) keeps its order label; an emission or absorption line of another source
 * does not fit any q and stays a known line only.
 */
function labelKnownHarmonics(ctx: SearchContext, best: Candidate): void {
  const lambda0 = best.fit.parameters[P_DRIVER];
  const j = best.fit.freeIndices.indexOf(P_DRIVER);
  const f = best.fit.freeIndices.length;
  const sigmaRel = j >= 0 && best.fit.covariance ? Math.sqrt(Math.max(0, best.fit.covariance[j * f + j])) / lambda0 : 0;
  for (const [i, known] of ctx.knownPeaks) {
    const q = Math.round(lambda0 / known.wavelengthNm);
    if (!allowedHarmonic(ctx.parity, q) || best.harmonic.some((h, k) => k !== i && h === q && best.order[k] === 1)) continue;
    if (Math.abs((q * known.wavelengthNm) / lambda0 - 1) <= Math.max(3 * sigmaRel, 1e-6)) {
      best.harmonic[i] = q;
      best.order[i] = 1;
    }
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
  labelKnownHarmonics(ctx, best);
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
      `No absolute anchor: the driver wavelength is taken as ${driverNm.toFixed(3)} nm, the mean of its prior (the measured wavelength less half the blue-shift allowance), so the whole wavelength scale is uncertain by ±${(200 * scaleSigmaRelative).toFixed(2)} % (2σ). A filter edge seen on a continuum, or a known line, would pin it.`,
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
  const lineWord = `${best.raw.firstOrderCount} first-order line(s) q = ${bestHyp.firstHarmonic}–${bestHyp.lastHarmonic}${best.raw.secondOrderCount ? `, ${best.raw.secondOrderCount} higher-order (m ≥ 2) line(s)` : ''}${best.raw.unexplainedCount ? `, ${best.raw.unexplainedCount} unexplained peak(s)` : ''}`;
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

