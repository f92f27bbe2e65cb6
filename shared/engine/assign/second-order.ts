/**
 * Second and third diffraction orders among the peaks: leftover peaks that sit on an m = 2 (then
 * m = 3) line of the fitted map, are fainter than their m = 1 partner and (when measured) narrower
 * along the spatial axis; and, for parity 'all', the m = 2 lines that land exactly on m = 1 lines
 * (blends).
 */
import { wavelengthToPixel } from '../grating.ts';
import { geometryOf, P_DRIVER, type ModelFit } from './model.ts';
import { SECOND_ORDER_COST, spuriousCost } from './score.ts';
import {
  harmonicEnergyEv,
  localSpacing,
  nearestLine,
  predictionSigma,
  predictLines,
  type SearchContext,
} from './search.ts';
import { EDGE_FWHM } from './context.ts';

/**
 * Largest spatial width of an m = 2 line relative to the m = 1 lines beside it: with its m = 1
 * partner seen, and without (divergence ∝ roughly 1/√q, so the m = 2 line of q beside the m = 1
 * line of q/2 is about 1/√2 as wide; common practice).
 */
const PARTNERED_WIDTH_RATIO = 0.95;
const UNPARTNERED_WIDTH_RATIO = 0.8;

/** Label leftover peaks as m = 2 lines when that explains them better than "spurious". */
export function labelSecondOrder(ctx: SearchContext, harmonic: Int32Array, order: Int8Array, fit: ModelFit, dof: number): void {
  for (const m of HIGHER_ORDERS) labelOrder(ctx, harmonic, order, fit, dof, m);
}

/** Diffraction orders tested on leftover peaks, most likely first. */
const HIGHER_ORDERS = [2, 3] as const;

/**
 * Per diffraction order m: prior cost of the label and the largest spatial width relative to the
 * m = 1 lines beside it, with and without the m = 1 partner seen (divergence ∝ ~1/√q: the m line
 * of q beside the m = 1 line of q/m is about 1/√m as wide; common practice).
 */
const ORDER_RULES: Record<2 | 3, { cost: number; partnered: number; unpartnered: number }> = {
  2: { cost: SECOND_ORDER_COST, partnered: PARTNERED_WIDTH_RATIO, unpartnered: UNPARTNERED_WIDTH_RATIO },
  3: { cost: 2 * SECOND_ORDER_COST, partnered: 0.85, unpartnered: 0.7 },
};

function labelledInOrder(harmonic: Int32Array, order: Int8Array, q: number, m: number): boolean {
  for (let i = 0; i < harmonic.length; i++) if (harmonic[i] === q && order[i] === m) return true;
  return false;
}

function labelOrder(ctx: SearchContext, harmonic: Int32Array, order: Int8Array, fit: ModelFit, dof: number, m: 2 | 3): void {
  const rules = ORDER_RULES[m];
  const lines2 = predictLines(ctx, fit.parameters, m);
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
    const lambda1 = (m * fit.parameters[P_DRIVER]) / q;
    const sp = predictionSigma(ctx, fit, lambda1, s2);
    const variance = s2 * pk.sigmaPx * pk.sigmaPx + sp * sp + 0.02 * 0.02;
    const r = pk.pixel - lines2.pixel[j];
    if (Math.abs(r) > 0.2 * localSpacing(lines2, j)) continue;
    const cost = (r * r) / variance + Math.log(2 * Math.PI * variance) + rules.cost;
    if (!(cost < spurious)) continue;
    // A second-order line cannot outshine its own first-order line (gratings put far less into m = 2).
    const a1 = firstOrderArea.get(q);
    if (a1 !== undefined && pk.area > a1 && !firstOrderSaturated.has(q)) continue;
    // The m = 2 line of q has the photon energy of the m = 1 line of q (same filter transmission)
    // and a grating puts less into m = 2, so an m = 2 line whose m = 1 partner lies well inside the
    // detector and was not seen is no m = 2 line. Partners off the detector (shorter wavelength than
    // it covers) or at its edge prove nothing.
    // An m = 3 line needs a lower order of its own harmonic seen (m = 1 or m = 2 are brighter): a
    // stray line sitting on one of the dense m = 3 positions is otherwise too easy a coincidence.
    if (m === 3 && a1 === undefined && !labelledInOrder(harmonic, order, q, 2)) continue;
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
      if (pk.spatialWidthPx > (a1 === undefined ? rules.unpartnered : rules.partnered) * w1) continue;
    }
    harmonic[i] = q;
    order[i] = m;
    used.add(q);
  }
}

/** Parity 'all': m = 2 of harmonic 2k lands exactly on m = 1 of k (mλ is the same). */
export function findBlends(ctx: SearchContext, harmonic: Int32Array, order: Int8Array, fit: ModelFit): Map<number, { harmonic: number; diffractionOrder: number }[]> {
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

