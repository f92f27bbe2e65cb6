/**
 * The rivals that make a confident answer wrong: every first-order label of the leading labelling
 * slipped by ±1 and ±2 parity steps, fitted in earnest from several starts.
 */
import { fitModel, P_DRIVER, P_INCIDENCE, type Wall } from './model.ts';
import { driverSpanNm } from './priors.ts';
import { totalScore } from './score.ts';
import {
  allowedHarmonic,
  freeParameters,
  harmonicStep,
  labelledPoints,
  refit,
  seedStart,
  type SearchContext,
} from './search.ts';
import type { Candidate } from './labelling.ts';
import { finish } from './labelling.ts';
import { UNIQUE_MARGIN } from './verdict.ts';

/** A one-step slip trailing by this many unique margins makes the two-step slip in that direction pointless to fit. */
const HOPELESS_SLIP_MARGINS = 50;

/**
 * The labellings a slip of the whole comb would give: every first-order label moved by ±1 and ±2
 * parity steps (m = 2 labels dropped and re-found), each grown and fitted from two starts (the
 * best fit's geometry with λ0 rescaled into its wall, and the nominal geometry placed on the
 * strongest clean peak). The search may never seed these when the geometry absorbs the slip, and
 * they are exactly the rivals that make a confident answer wrong.
 */
export function shiftedRivals(ctx: SearchContext, best: Candidate): Candidate[] {
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
    const rescaled = (a[P_DRIVER] * (qRef + shift)) / qRef;
    a[P_DRIVER] = Math.min(driverWall.hi, Math.max(driverWall.lo, rescaled));
    starts.push(a);
    // Unclamped too: the slip's lines then sit where the leader's do, and the fit walks λ0 back
    // along the flat valley into its band (from the clamped start it may stall halfway).
    if (rescaled !== a[P_DRIVER]) {
      const b = Float64Array.from(best.fit.parameters);
      b[P_DRIVER] = rescaled;
      starts.push(b);
    }
    starts.push(...labellingStarts(ctx, harmonic, order1));
    starts.push(...valleyStarts(ctx, harmonic, order1, best.fit.parameters));
    let bestCand: Candidate | null = null;
    // The slipped labelling keeps the same peaks (no growing: it is the same set of lines read one
    // step off); only its geometry is searched, from each start, and the best fit is finished.
    let bestStart: Float64Array | null = null;
    let bestCost = Infinity;
    for (const start of starts) {
      // Twice: the second pass restarts LM's damping from the first one's end (as fitLabelling does).
      const first = refit(ctx, harmonic, order1, start).fit;
      const fit = refit(ctx, harmonic, order1, first.parameters, true).fit;
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

/** λ0 values across the driver span from which a slip's geometry is fitted with λ0 held. */
const VALLEY_STEPS = 5;

/**
 * Starts along the λ0 valley: the geometry fitted with λ0 held at points across the driver span.
 * With λ0 free from one start, LM follows the long flat valley of λ0 against incidence, distance
 * and tilt poorly and can stop against a wall far from the valley's floor; each held-λ0 fit is well
 * conditioned.
 */
function valleyStarts(ctx: SearchContext, harmonic: Int32Array, order: Int8Array, base: ArrayLike<number>): Float64Array[] {
  const { points } = labelledPoints(ctx, harmonic, order);
  const free = freeParameters(ctx, points.length).filter((j) => j !== P_DRIVER);
  if (ctx.anchored || free.length === 0) return [];
  const [lo, hi] = driverSpanNm(ctx.driver);
  const out: Float64Array[] = [];
  for (let k = 0; k < VALLEY_STEPS; k++) {
    const start = Float64Array.from(base);
    start[P_DRIVER] = lo + ((hi - lo) * (k + 0.5)) / VALLEY_STEPS;
    const held = fitModel(ctx.model, points, start, free.slice(0, 2));
    out.push(fitModel(ctx.model, points, held.parameters, free).parameters);
  }
  return out;
}

/** Starting points for fitting a fixed labelling: the nominal geometry placed on one labelled peak, with the incidence at its nominal value and at both ends of its range. */
export function labellingStarts(ctx: SearchContext, harmonic: Int32Array, order: Int8Array): Float64Array[] {
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

