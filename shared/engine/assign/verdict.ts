/**
 * The verdict: is the leading labelling `unique`, or must the answer be `ambiguous` (or
 * `failed`)? A margin over every contradicting rival is necessary but not enough: the leader must
 * also pass gates that a wrong labelling tends to fail even when it beats its rivals.
 *
 * - fit: its own lines fit the model. χ² with a floor of FIT_FLOOR_PX added in quadrature to each
 *   centroid's σ (a centroid is not better than the detector's pixel response and the line shape
 *   allow, whatever its photon statistics claim), judged against its degrees of freedom.
 * - explained: most bright peaks sit on a line of the labelling (m = 1 or m = 2).
 * - comb: most of the lines the labelling predicts between its ends are seen.
 * - priors: no parameter sits beyond its realignment range (a best fit pressed against a wall is a
 *   sign that the labelling needs a geometry the instrument does not have).
 * - lines: at least three first-order lines, or a pin or an anchor.
 * - margin: every contradicting labelling trails by at least the unique margin in −2 ln L.
 *
 * The message names the first gate that failed and what to check; it never quotes a margin as
 * "only" when the margin passed.
 */
import { P_DRIVER, PARAMETER_NAMES, wallResidual, type ModelFit, type ModelPoint } from './model.ts';
import { harmonicEnergyEv, predictLines, type SearchContext } from './search.ts';
import type { VerdictGate } from './types.ts';

/** Margin in −2 ln L for `unique` (≈ 4σ). */
export const UNIQUE_MARGIN = 16;
/** Floor on a centroid's uncertainty in the goodness-of-fit gate and the final fit, px (common practice: pixel-response and line-shape limits). */
export const FIT_FLOOR_PX = 0.02;
/** Reduced χ² (with the floor) beyond which the answer is `failed`, not `ambiguous`. */
const FAILED_REDUCED_CHI2 = 2500;
/** A peak counts as bright from this SNR, and from this fraction of the median SNR of the labelled lines. */
const BRIGHT_SNR = 10;
const BRIGHT_FRACTION = 0.2;
/** Share of the bright peaks that may stay unexplained (stray lines, other sources). */
const MAX_UNEXPLAINED_SHARE = 0.3;
const MAX_UNEXPLAINED_ALWAYS_ALLOWED = 2;
/** Share of the predicted lines between the labelling's ends that must be seen. */
const MIN_COMB_COMPLETENESS = 0.6;
/** Beyond a geometry wall by this many softness units (2 % of the range each) counts as sitting on it. */
const GEOMETRY_WALL_UNITS = 1.5;
/** The driver's tail is Gaussian with its σ: beyond the blue-shift band by this many σ fails. */
const DRIVER_WALL_SIGMAS = 3.5;

export interface VerdictInput {
  ctx: SearchContext;
  harmonic: Int32Array;
  order: Int8Array;
  fit: ModelFit;
  points: ModelPoint[];
  firstOrderCount: number;
  /** Δ(−2 ln L) of the best contradicting labelling (Infinity when none). */
  margin: number;
  uniqueMargin: number;
  /** Peak indices that may hold a blend (not counted as unexplained). */
  blended: Set<number>;
}

export type Gate = VerdictGate;

export interface Verdict {
  status: 'unique' | 'ambiguous' | 'failed';
  gates: Gate[];
  reducedChiSquareFloored: number;
}

/** χ² of the fit with the centroid floor, and its degrees of freedom. */
export function flooredChiSquare(fit: ModelFit, points: ModelPoint[]): { chiSquare: number; dof: number } {
  let chiSquare = 0;
  for (let k = 0; k < points.length; k++) chiSquare += fit.residualsPx[k] ** 2 / (points[k].sigmaPx ** 2 + FIT_FLOOR_PX ** 2);
  return { chiSquare, dof: Math.max(1, points.length - fit.freeIndices.length) };
}

/** χ² exceeding its dof by ~5σ of the χ² distribution (and by 10 at least). */
function fitTooBad(chiSquare: number, dof: number): boolean {
  return chiSquare > dof + 5 * Math.sqrt(2 * dof) + 10;
}

function formatParameter(index: number, value: number): string {
  const name = PARAMETER_NAMES[index];
  return `${name} = ${Math.abs(value) >= 100 ? value.toFixed(1) : value.toPrecision(5)}`;
}

/**
 * First-order lines the labelling puts between its lowest and highest harmonic, on the detector,
 * where the filters pass at least a third of what they pass at its faintest-transmitted labelled
 * line, and where no peak sits (even orders under parity 'all' count half: often weak). A labelling
 * that claims a line through a nearly opaque filter must show the better-transmitted ones too.
 */
function unseenCombLines(v: VerdictInput): number {
  const { ctx, fit } = v;
  const lambda0 = fit.parameters[P_DRIVER];
  const labelled = new Set<number>();
  let qMin = Infinity;
  let qMax = -Infinity;
  let faintestT = Infinity;
  for (let i = 0; i < v.harmonic.length; i++) {
    if (!(v.harmonic[i] > 0 && v.order[i] === 1)) continue;
    const q = v.harmonic[i];
    labelled.add(q);
    qMin = Math.min(qMin, q);
    qMax = Math.max(qMax, q);
    faintestT = Math.min(faintestT, ctx.transmission(harmonicEnergyEv(lambda0, q)));
  }
  if (!Number.isFinite(qMin)) return 0;
  const expectedFrom = Math.min(0.1, faintestT / 3);
  const lines = predictLines(ctx, fit.parameters, 1);
  const n = ctx.model.pixelCount;
  let unseen = 0;
  for (let j = 0; j < lines.pixel.length; j++) {
    const q = lines.harmonic[j];
    if (q <= qMin || q >= qMax || labelled.has(q) || lines.pixel[j] < 2 || lines.pixel[j] > n - 3) continue;
    if (ctx.transmission(harmonicEnergyEv(lambda0, q)) < expectedFrom) continue;
    unseen += ctx.parity === 'all' && q % 2 === 0 ? 0.5 : 1;
  }
  return unseen;
}

export function decideVerdict(v: VerdictInput): Verdict {
  const gates: Gate[] = [];
  const { ctx, fit } = v;

  const { chiSquare, dof } = flooredChiSquare(fit, v.points);
  const reduced = chiSquare / dof;
  const fitBad = fitTooBad(chiSquare, dof);
  gates.push({
    name: 'fit',
    passed: !fitBad,
    detail: fitBad
      ? `its lines misfit the grating model (χ²/ν = ${reduced.toFixed(1)} over ν = ${dof}, with a ${FIT_FLOOR_PX} px floor on each centroid): check the profile (groove density, pixel pitch, direction, detector tilt), the signal region, and whether lines of another source overlap the comb`
      : `χ²/ν = ${reduced.toFixed(2)} over ν = ${dof} (${FIT_FLOOR_PX} px centroid floor)`,
  });

  const labelledSnr: number[] = [];
  for (let i = 0; i < v.harmonic.length; i++) if (v.harmonic[i] > 0 && v.order[i] === 1) labelledSnr.push(ctx.peaks[i].snr);
  labelledSnr.sort((a, b) => a - b);
  const medianSnr = labelledSnr.length ? labelledSnr[labelledSnr.length >> 1] : 0;
  const brightFrom = Math.max(BRIGHT_SNR, BRIGHT_FRACTION * medianSnr);
  let bright = 0;
  let unexplained = 0;
  for (let i = 0; i < ctx.peaks.length; i++) {
    const pk = ctx.peaks[i];
    if (pk.edge || !(pk.saturated || pk.snr >= brightFrom)) continue;
    bright++;
    if (v.harmonic[i] <= 0 && !v.blended.has(i)) unexplained++;
  }
  const unexplainedBad = unexplained > MAX_UNEXPLAINED_ALWAYS_ALLOWED && unexplained > MAX_UNEXPLAINED_SHARE * bright;
  gates.push({
    name: 'explained',
    passed: !unexplainedBad,
    detail: unexplainedBad
      ? `${unexplained} of ${bright} bright peaks sit on no line of it: check the driver wavelength and parity, the profile, and whether a second source or stray light puts lines on the camera`
      : `${bright - unexplained} of ${bright} bright peaks explained`,
  });

  // A comb is mostly there between its ends: a few orders may be missing (a filter, a weak order),
  // but three lines with most of the orders between them absent are a coincidence, not a comb.
  const missingLines = unseenCombLines(v);
  const completeness = v.firstOrderCount / Math.max(1, v.firstOrderCount + missingLines);
  const combBad = completeness < MIN_COMB_COMPLETENESS;
  gates.push({
    name: 'comb',
    passed: !combBad,
    detail: combBad
      ? `only ${v.firstOrderCount} of the ${Math.round(v.firstOrderCount + missingLines)} lines it puts between its ends (where the filters pass at least what they pass at its faintest-transmitted line) are seen: check that the lines are harmonics of this driver at all, the driver wavelength and the filters`
      : `${v.firstOrderCount} of ${Math.round(v.firstOrderCount + missingLines)} lines between its ends seen`,
  });

  const offWall: string[] = [];
  for (const j of fit.freeIndices) {
    const w = ctx.model.walls[j];
    const r = wallResidual(w, fit.parameters[j]);
    if (!w || r === 0) continue;
    if (j === P_DRIVER) {
      if (r > DRIVER_WALL_SIGMAS) offWall.push(`the effective driver wavelength ${fit.parameters[j].toFixed(2)} nm lies ${r.toFixed(1)}σ outside ${w.lo.toFixed(2)}–${w.hi.toFixed(2)} nm (measured wavelength less the blue-shift allowance)`);
    } else if (r > GEOMETRY_WALL_UNITS) {
      offWall.push(`${formatParameter(j, fit.parameters[j])} lies beyond its realignment range ${w.lo.toPrecision(5)}–${w.hi.toPrecision(5)}`);
    }
  }
  gates.push({
    name: 'priors',
    passed: offWall.length === 0,
    detail: offWall.length
      ? `its fit needs ${offWall.join('; ')}: check the profile's nominal geometry and the driver wavelength, or widen the realignment range if the instrument really moved that far`
      : 'every parameter inside its range',
  });

  const enoughLines = v.firstOrderCount >= 3 || ctx.pins.size > 0 || ctx.anchored;
  gates.push({
    name: 'lines',
    passed: enoughLines,
    detail: enoughLines ? `${v.firstOrderCount} first-order lines` : `only ${v.firstOrderCount} first-order line(s): three or more, a pin, or a known line are needed`,
  });

  const marginOk = v.margin >= v.uniqueMargin;
  gates.push({
    name: 'margin',
    passed: marginOk,
    detail: Number.isFinite(v.margin)
      ? `the nearest contradicting labelling trails by ${v.margin.toFixed(1)} in −2 ln L (unique needs ${v.uniqueMargin})`
      : 'no contradicting labelling fits within the ranges',
  });

  const status = reduced > FAILED_REDUCED_CHI2 ? 'failed' : gates.every((g) => g.passed) ? 'unique' : 'ambiguous';
  return { status, gates, reducedChiSquareFloored: reduced };
}
