/**
 * Finishing a grown labelling: give each first-order line the peak that sits on it best, add the
 * weak first-order lines the map explains, test the leftovers as m = 2 lines (second-order.ts), and
 * score the result (score.ts).
 */
import { predictPixel, P_DRIVER, type ModelFit, type ModelPoint } from './model.ts';
import { rawScore, totalScore, type RawScore } from './score.ts';
import {
  localSpacing,
  nearestLine,
  predictionSigma,
  predictLines,
  refit,
  type SearchContext,
} from './search.ts';
import { findBlends, labelSecondOrder } from './second-order.ts';
import { FIT_FLOOR_PX } from './verdict.ts';

export interface Candidate {
  harmonic: Int32Array;
  order: Int8Array;
  fit: ModelFit;
  points: ModelPoint[];
  raw: RawScore;
  blends: Map<number, { harmonic: number; diffractionOrder: number }[]>;
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

export function finish(ctx: SearchContext, harmonic: Int32Array, order: Int8Array, start: ArrayLike<number>): Candidate {
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
  const before = order.filter((m) => m >= 2).length;
  const h0 = Int32Array.from(harmonic);
  const m0 = Int8Array.from(order);
  const without = rawScore(ctx, h0, m0, state.fit, state.points);
  labelSecondOrder(ctx, harmonic, order, state.fit, dof);
  let raw = without;
  if (order.filter((m) => m >= 2).length !== before) {
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

export function labelKey(h: Int32Array, m: Int8Array): string {
  let s = '';
  for (let i = 0; i < h.length; i++) s += `${h[i]}/${m[i]},`;
  return s;
}

export function contradicts(a: Candidate, b: Candidate): boolean {
  for (let i = 0; i < a.harmonic.length; i++) {
    if (a.harmonic[i] > 0 && b.harmonic[i] > 0 && (a.harmonic[i] !== b.harmonic[i] || a.order[i] !== b.order[i])) return true;
  }
  return false;
}

