/**
 * Can the data decide? An information check for the evaluation, independent of the engine's
 * search: the detected peaks that sit on true first-order lines are given the TRUE labels and,
 * in turn, the whole labelling slipped by ±1 and ±2 parity steps; each labelling is fitted with
 * the grating model inside the realignment ranges and the driver tolerance the engine is told
 * about (fitLabelling). When a slip fits within the uniqueness margin of the truth, no method
 * can tell them apart from positions and ranges alone, so the scenario is not decidable whatever
 * its class says. A slip that puts a detected line where the filters are opaque for this frame (below the
 * transmission at which its brightest line would vanish, opaqueTransmission) is excluded
 * (physics, not the engine's score). Fewer than three first-order lines decide nothing without
 * a pin or an anchor.
 */
import { fitLabelling, UNIQUE_MARGIN, type AssignInput } from '../../shared/engine/assign/index.ts';
import { stackTransmission } from '../../shared/engine/assign/filters.ts';
import { opaqueTransmission } from '../../shared/engine/assign/search.ts';
import { HC_EV_NM } from '../../shared/engine/constants.ts';
import type { Peak } from '../../shared/engine/types.ts';
import type { SimTruth } from '../../shared/engine/simulate/index.ts';

export interface Decidability {
  decidable: boolean;
  /** Smallest Δ(−2 ln L) of a slipped labelling over the truth (Infinity when none fits). */
  marginOverSlip: number;
  matchedLines: number;
}

export function decidability(peaks: Peak[], truth: SimTruth, input: AssignInput): Decidability {
  const first = truth.lines.filter((l) => l.visible && l.diffractionOrder === 1);
  const harmonics: (number | null)[] = peaks.map((p) => {
    const near = first.reduce<{ d: number; q: number | null }>((b, l) => (Math.abs(l.pixel - p.pixel) < b.d ? { d: Math.abs(l.pixel - p.pixel), q: l.harmonic } : b), { d: 1.5, q: null });
    return near.q;
  });
  const matched = harmonics.filter((q) => q !== null).length;
  if (matched < 3) return { decidable: false, marginOverSlip: 0, matchedLines: matched };
  const truthFit = fitLabelling(peaks, input, harmonics);
  if (!truthFit) return { decidable: false, marginOverSlip: 0, matchedLines: matched };
  const s2 = Math.max(1, truthFit.chiSquarePosition / Math.max(1, truthFit.fittedPoints - truthFit.freeParameters));
  const truthScore = truthFit.chiSquarePosition / s2 + truthFit.chiSquarePrior;
  const transmission = stackTransmission(input.filters ?? []);
  // "Opaque" relative to this frame's brightest line (a bright comb shows lines through 5e-4).
  const opaque = opaqueTransmission(peaks.reduce((m, p) => Math.max(m, p.snr), 0));
  const step = input.parity === 'odd' ? 2 : 1;
  let margin = Infinity;
  for (const k of [-2, -1, 1, 2]) {
    const slipped = harmonics.map((q) => (q === null ? null : q + k * step));
    if (slipped.some((q) => q !== null && q < 1)) continue;
    // Scale of the slipped labelling: λ0 in its tolerance; a line in an opaque band cannot be seen.
    const driver = input.driverNm;
    if (slipped.some((q) => q !== null && transmission((q * HC_EV_NM) / driver) < opaque && transmission((q * HC_EV_NM) / (driver * (1 - (input.blueShiftPct ?? 1) / 100))) < opaque)) continue;
    const fit = fitLabelling(peaks, input, slipped);
    if (!fit) continue;
    margin = Math.min(margin, fit.chiSquarePosition / s2 + fit.chiSquarePrior - truthScore);
  }
  return { decidable: margin >= UNIQUE_MARGIN, marginOverSlip: margin, matchedLines: matched };
}
