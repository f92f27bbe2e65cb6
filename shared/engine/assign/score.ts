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
import { P_DRIVER } from './model.ts';

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

export function rawScore(ctx: SearchContext, harmonic: Int32Array, order: Int8Array, fit: ModelFit, points: ModelPoint[]): RawScore {
  let normalisation = 0;
  for (const pt of points) normalisation += Math.log(2 * Math.PI * pt.sigmaPx * pt.sigmaPx);
  let unexplainedCount = 0;
  let secondOrderCount = 0;
  let firstOrderCount = 0;
  let qMin = Infinity;
  let qMax = -Infinity;
  const firstOrder: { q: number; u: number; a: number }[] = [];
  const lambda0 = fit.parameters[P_DRIVER];
  for (let i = 0; i < harmonic.length; i++) {
    if (harmonic[i] <= 0) {
      if (!ctx.knownPeaks.has(i)) unexplainedCount++;
    }
    else if (order[i] === 2) secondOrderCount++;
    else {
      firstOrderCount++;
      qMin = Math.min(qMin, harmonic[i]);
      qMax = Math.max(qMax, harmonic[i]);
      const t = Math.max(ctx.transmission(harmonicEnergyEv(lambda0, harmonic[i])), 1e-8);
      const a = Math.log(Math.max(ctx.peaks[i].area, 1e-12));
      firstOrder.push({ q: harmonic[i], u: a - Math.log(t), a });
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
  let envelope = 0;
  const step = ctx.parity === 'odd' ? 2 : 1;
  for (let k = 1; k < firstOrder.length; k++) {
    const gap = (firstOrder[k].q - firstOrder[k - 1].q) / step;
    if (gap > 3) continue;
    const tau = ENVELOPE_TAU * Math.sqrt(gap);
    // Relative to the uncorrected areas: without filters this term is 0 for every labelling, so
    // a genuinely weak (missing) order costs all hypotheses alike.
    envelope += huber((firstOrder[k].u - firstOrder[k - 1].u) / tau) - huber((firstOrder[k].a - firstOrder[k - 1].a) / tau);
  }
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
