/**
 * −2 ln L of one labelling. Terms (all in χ² units):
 * - position: Σ (residual/σ)², later divided by the best hypothesis's reduced χ² (s²), plus the
 *   Gaussian normalisation Σ ln(2π s² σ²) so that labellings explaining different peaks compare;
 * - prior: soft-wall cost of the realignment ranges (geometry, driver tolerance);
 * - unexplained: a peak not on any line is spurious, density 1/N over the detector, prior 1/10:
 *   2 ln N + 2 ln 10 each;
 * - second order: a prior cost of 2 per m = 2 label (such lines are rarer than m = 1);
 * - missing: a predicted m = 1 line inside the labelled span, where the filters transmit > 10 %,
 *   that no peak sits on, costs 3 (1.5 for an even order under parity 'all': often weak);
 * - envelope: the filter-corrected line areas ln(area/T) of neighbouring harmonics should vary
 *   smoothly; Huber cost with τ = ln 3 per step, minus the same cost of the uncorrected areas.
 *   This is where filter transmission steps (edges) decide between labellings that positions
 *   alone cannot.
 */
import { harmonicEnergyEv, predictLines, type SearchContext } from './search.ts';
import type { ModelFit, ModelPoint } from './model.ts';
import { P_DRIVER, wallResidual } from './model.ts';
import { driverSpanNm } from './priors.ts';

export interface RawScore {
  position: number;
  /** Σ ln(2π σ²) over the fitted points (before the s² scaling). */
  normalisation: number;
  fittedPoints: number;
  prior: number;
  unexplained: number;
  secondOrder: number;
  missing: number;
  envelope: number;
  missingHarmonics: number[];
  degreesOfFreedom: number;
  unexplainedCount: number;
  secondOrderCount: number;
  firstOrderCount: number;
}

export const MISSING_COST = 3;
export const SECOND_ORDER_COST = 2;
const ENVELOPE_TAU = Math.log(3);

export function spuriousCost(pixelCount: number): number {
  return 2 * Math.log(Math.max(pixelCount, 2)) + 2 * Math.log(10);
}

function huber(z: number): number {
  const a = Math.abs(z);
  return a <= 3 ? a * a : 6 * a - 9;
}

/** λ0 values tried across the driver span when the comb alone does not fix the scale. */
const ENVELOPE_DRIVER_STEPS = 24;

/** The envelope term at one λ0 (see the header). */
function envelopeAt(ctx: SearchContext, firstOrder: { q: number; a: number }[], lambda0: number): number {
  const step = ctx.parity === 'odd' ? 2 : 1;
  let envelope = 0;
  let previousU = 0;
  for (let k = 0; k < firstOrder.length; k++) {
    const t = Math.max(ctx.transmission(harmonicEnergyEv(lambda0, firstOrder[k].q)), 1e-8);
    const u = firstOrder[k].a - Math.log(t);
    if (k > 0) {
      const gap = (firstOrder[k].q - firstOrder[k - 1].q) / step;
      if (gap <= 3) {
        const tau = ENVELOPE_TAU * Math.sqrt(gap);
        // Relative to the uncorrected areas: without filters this term is 0 for every labelling, so
        // a genuinely weak (missing) order costs all hypotheses alike.
        envelope += huber((u - previousU) / tau) - huber((firstOrder[k].a - firstOrder[k - 1].a) / tau);
      }
    }
    previousU = u;
  }
  return envelope;
}

/**
 * The envelope term of a labelling. Without an anchor the positions barely fix λ0 (the geometry
 * absorbs a common change of it), so the fitted λ0 is one arbitrary point of a flat valley and
 * where it puts a filter edge decides nothing: the term is then the best over the driver span of
 * envelope + the driver prior's cost beyond the fitted one. With an anchor λ0 is the fit's.
 */
function envelopeCost(ctx: SearchContext, firstOrder: { q: number; a: number }[], lambda0: number): number {
  if (!ctx.filtered) return 0;
  const atFit = envelopeAt(ctx, firstOrder, lambda0);
  if (ctx.anchored || firstOrder.length < 2) return atFit;
  const wall = ctx.model.walls[P_DRIVER];
  const fitWall = wallResidual(wall, lambda0) ** 2;
  const [lo, hi] = driverSpanNm(ctx.driver);
  let best = atFit;
  for (let k = 0; k <= ENVELOPE_DRIVER_STEPS; k++) {
    const l0 = lo + ((hi - lo) * k) / ENVELOPE_DRIVER_STEPS;
    best = Math.min(best, envelopeAt(ctx, firstOrder, l0) + Math.max(0, wallResidual(wall, l0) ** 2 - fitWall));
  }
  return best;
}

export function rawScore(ctx: SearchContext, harmonic: Int32Array, order: Int8Array, fit: ModelFit, points: ModelPoint[]): RawScore {
  let normalisation = 0;
  for (const pt of points) normalisation += Math.log(2 * Math.PI * pt.sigmaPx * pt.sigmaPx);
  let unexplainedCount = 0;
  let secondOrderCount = 0;
  let firstOrderCount = 0;
  let qMin = Infinity;
  let qMax = -Infinity;
  const firstOrder: { q: number; a: number }[] = [];
  const lambda0 = fit.parameters[P_DRIVER];
  for (let i = 0; i < harmonic.length; i++) {
    if (harmonic[i] <= 0) {
      if (!ctx.knownPeaks.has(i)) unexplainedCount++;
    }
    else if (order[i] >= 2) secondOrderCount++;
    else {
      firstOrderCount++;
      qMin = Math.min(qMin, harmonic[i]);
      qMax = Math.max(qMax, harmonic[i]);
      firstOrder.push({ q: harmonic[i], a: Math.log(Math.max(ctx.peaks[i].area, 1e-12)) });
    }
  }
  const labelled = new Set<number>();
  for (let i = 0; i < harmonic.length; i++) if (harmonic[i] > 0 && order[i] === 1) labelled.add(harmonic[i]);
  const missingHarmonics: number[] = [];
  let missing = 0;
  const lines = predictLines(ctx, fit.parameters, 1);
  const n = ctx.model.pixelCount;
  for (let j = 0; j < lines.pixel.length; j++) {
    const q = lines.harmonic[j];
    if (q <= qMin || q >= qMax || labelled.has(q)) continue;
    if (lines.pixel[j] < 2 || lines.pixel[j] > n - 3) continue;
    if (ctx.transmission(harmonicEnergyEv(lambda0, q)) < 0.1) continue;
    missingHarmonics.push(q);
    missing += ctx.parity === 'all' && q % 2 === 0 ? MISSING_COST / 2 : MISSING_COST;
  }
  firstOrder.sort((a, b) => a.q - b.q);
  const envelope = envelopeCost(ctx, firstOrder, lambda0);
  const fittedPoints = points.length;
  return {
    position: fit.chiSquarePosition,
    normalisation,
    fittedPoints,
    prior: fit.chiSquarePrior,
    unexplained: unexplainedCount * spuriousCost(n),
    secondOrder: secondOrderCount * SECOND_ORDER_COST,
    missing,
    envelope,
    missingHarmonics: missingHarmonics.sort((a, b) => a - b),
    degreesOfFreedom: Math.max(1, fittedPoints - fit.freeIndices.length),
    unexplainedCount,
    secondOrderCount,
    firstOrderCount,
  };
}

/** Total −2 ln L with the position χ² scaled by s² (≥ 1). */
export function totalScore(r: RawScore, s2: number): number {
  return r.position / s2 + r.normalisation + r.fittedPoints * Math.log(s2) + r.prior + r.unexplained + r.secondOrder + r.missing + r.envelope;
}
