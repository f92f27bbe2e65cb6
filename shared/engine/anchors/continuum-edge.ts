/**
 * Filter edges located on the data: where a continuum (or lines too broad to separate) crosses a
 * filter's absorption edge, the lineout steps, and the pixel of that step is an absolute anchor
 * of the wavelength scale at the edge energy. See README.md for the method and its criterion.
 *
 * Model, for each tabulated step (references.ts transmissionStepEdges) of the filters in the
 * beam, near the pixel where a provisional map puts its energy E_s:
 *
 *   counts(p) = (a1 + b1·u)·L(p − s) + (a2 + b2·u)·R(p − s),   u = (p − centre)/half-width,
 *
 * where L and R are the stack's tabulated transmission T(E(x)) on the low- and high-energy side
 * of E_s (E(x) from the provisional map), each seen through the instrument's line profile (a
 * Gaussian of the resolution FWHM) and integrated over the pixel. a1, b1, a2, b2 are linear (a
 * smooth source on each side, so a foil thicker or thinner than stated still fits); s, the shift
 * of the whole pattern against the provisional map, is scanned and refined. The lines in the
 * window (detected peaks, and the comb positions a hypothesis predicts, which catches a line the
 * peak finder cannot see because it sits on the step) are fitted with it as pixel-integrated
 * Gaussians of free amplitude (the ones close to the step with free centre and width too:
 * step-fit.ts). Weights are 1/variance; saturated pixels are left out.
 */
import { EngineError } from '../errors.ts';
import { HC_EV_NM } from '../constants.ts';
import { stackTransmission, toFoil, type Foil } from '../filters/transmission.ts';
import { transmissionStepEdges, type AbsorptionEdge } from '../references.ts';
import type { Lineout, ScaleAnchor } from '../types.ts';
import { edgeProfiles, pixelOfEnergy, provisionalWavelengthsNm, type ProvisionalMap } from './edge-profiles.ts';
import { refineSmooth, refineStep, scanMinima, solutionCovariance, type StepSolution, type StepWindow, type WindowLine } from './step-fit.ts';

export type { ProvisionalMap } from './edge-profiles.ts';

/**
 * A line on the detector: its centre, px, and its FWHM when measured. A measured line (a detected
 * peak) close to the step has its centre and width fitted too; a line given without a width (a
 * position a hypothesis predicts) keeps its place and the resolution's width, and only its
 * amplitude is fitted, so that it cannot move onto the step and stand in for it.
 */
export interface LineAt {
  pixel: number;
  fwhmPx?: number;
}

export interface ContinuumEdgeInput {
  lineout: Lineout;
  /** Provisional pixel → wavelength map (e.g. the first assignment's calibration). */
  map: ProvisionalMap;
  /** Filters in the beam ("Al", "Zr:150", { material, thicknessNm }). */
  filters: readonly (string | Foil)[];
  /** Lines on the detector (detected peaks; comb positions a hypothesis predicts), fitted as Gaussians so they do not pass for the step. @default [] */
  lines?: readonly LineAt[];
}

export interface ContinuumEdgeOptions {
  /** Instrument resolution (FWHM of a monochromatic line), px; also the width of lines given without one. @default median FWHM of the lines that have one; 3 without */
  resolutionFwhmPx?: number;
  /** Half-range of photon energy searched around each edge, relative to its energy. @default 0.02 */
  searchRelative?: number;
  /** Detection threshold on Δχ² (step model over a smooth continuum, divided by the fit's reduced χ² when above 1). @default 36 */
  minDeltaChiSquare?: number;
}

/** A filter edge located on the data: the anchor the assigner takes as a known line. */
export interface LocatedEdge extends ScaleAnchor {
  kind: 'filter-edge';
  material: string;
  /** e.g. "Al L2,3". */
  edgeLabel: string;
  /** Where the provisional map put the edge energy, px. */
  expectedPixel: number;
  /** χ² of a smooth continuum without a step minus χ² of the step model (after the reduced-χ² scaling). */
  deltaChiSquare: number;
  /** Observed depth of the step in units of the tabulated one (ln ratio over ln ratio); null when the far side is zero within the noise. */
  depthFactor: number | null;
  reducedChiSquare: number;
}

/** One edge that was looked for, found or not, in plain words. */
export interface EdgeSearch {
  material: string;
  edgeLabel: string;
  energyEv: number;
  /** False when the provisional map does not put the edge on the detector (nothing was looked at). */
  onDetector: boolean;
  located: boolean;
  reason: string;
}

export interface ContinuumEdgeResult {
  edges: LocatedEdge[];
  searches: EdgeSearch[];
}

const FWHM_PER_SIGMA = 2 * Math.sqrt(2 * Math.LN2);
/** Grid step of the scan over s, px: finer than the blurred step's width (≥ 1 px), so no minimum falls between. */
const SCAN_STEP_PX = 0.5;
/** Scan minima refined jointly with the lines (the step and a line on it can trade places). */
const STARTS = 3;
/** Lines whose centre is within this many line FWHM (plus 3 resolution σ) of a start get free centre and width. */
const FREE_LINE_FWHM = 2;
/** A step shallower than this fraction of the tabulated one (in ln T) is not the edge. */
const MIN_DEPTH_FACTOR = 0.3;
/** The fall across the edge must be this many σ, and the far side no lower than −this many σ. */
const MIN_FALL_SIGMA = 5;
/** Data pixels wanted on each side of a located step, within the fit's margin. */
const MIN_SIDE_PIXELS = 4;
/** A given line closer than this many FWHM to an earlier one is the same line (one column, not two). */
const SAME_LINE_FWHM = 0.75;
/**
 * Systematic floor of a located step's pixel, added in quadrature to the fit's σ. The step's
 * position also depends on the line-shape (tilt, curvature) correction reduce applied and on the
 * line profile assumed for the blur: on simulated frames the located steps sat −0.09 … +0.06 px
 * from the truth with the line shape estimated from the frame (0.01-0.03 px with the true one),
 * while the fit's own σ was 0.005-0.04 px.
 */
const SYSTEMATIC_PX = 0.05;

interface Resolved {
  resolutionFwhmPx: number;
  searchRelative: number;
  minDeltaChiSquare: number;
}

function median(values: number[]): number {
  const s = [...values].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
}

function resolveOptions(lines: readonly LineAt[], o: ContinuumEdgeOptions): Resolved {
  const widths = lines.map((p) => p.fwhmPx ?? Number.NaN).filter((w) => Number.isFinite(w) && w > 0);
  const r: Resolved = {
    resolutionFwhmPx: o.resolutionFwhmPx ?? (widths.length > 0 ? median(widths) : 3),
    searchRelative: o.searchRelative ?? 0.02,
    minDeltaChiSquare: o.minDeltaChiSquare ?? 36,
  };
  if (!(r.resolutionFwhmPx > 0 && r.resolutionFwhmPx < 200)) throw new EngineError('invalid_input', `resolutionFwhmPx must be between 0 and 200 px, got ${r.resolutionFwhmPx}.`);
  if (!(r.searchRelative > 0 && r.searchRelative <= 0.2)) throw new EngineError('invalid_input', `searchRelative must be in (0, 0.2], got ${r.searchRelative}.`);
  if (!(r.minDeltaChiSquare > 0)) throw new EngineError('invalid_input', `minDeltaChiSquare must be positive, got ${r.minDeltaChiSquare}.`);
  return r;
}

interface Context {
  lineout: Lineout;
  energies: Float64Array;
  map: ProvisionalMap;
  foils: Foil[];
  /** The given lines, duplicates removed, each with a width. */
  lines: KnownWidthLine[];
  o: Resolved;
}

function usable(lineout: Lineout, p: number): boolean {
  const { counts, variance, saturated } = lineout;
  return Number.isFinite(counts[p]) && variance[p] > 0 && Number.isFinite(variance[p]) && !saturated[p];
}

interface KnownWidthLine {
  pixel: number;
  fwhmPx: number;
  measured: boolean;
}

/** The given lines with a width each, a line within SAME_LINE_FWHM of an earlier one dropped (measured ones first). */
function distinctLines(lines: readonly LineAt[], resolutionFwhmPx: number): KnownWidthLine[] {
  const isMeasured = (l: LineAt): boolean => l.fwhmPx !== undefined && Number.isFinite(l.fwhmPx) && l.fwhmPx > 0;
  const kept: KnownWidthLine[] = [];
  for (const l of [...lines.filter(isMeasured), ...lines.filter((x) => !isMeasured(x))]) {
    if (!Number.isFinite(l.pixel)) continue;
    const measured = isMeasured(l);
    const fwhmPx = measured ? l.fwhmPx! : resolutionFwhmPx;
    if (kept.every((k) => Math.abs(k.pixel - l.pixel) >= SAME_LINE_FWHM * Math.max(k.fwhmPx, fwhmPx))) kept.push({ pixel: l.pixel, fwhmPx, measured });
  }
  return kept;
}

/** The window's lines; measured ones near the step at `stepPx` free to move. */
function windowLines(lines: readonly KnownWidthLine[], stepPx: number, sigmaPx: number): WindowLine[] {
  return lines.map((l) => ({ pixel: l.pixel, fwhmPx: l.fwhmPx, free: l.measured && Math.abs(l.pixel - stepPx) <= FREE_LINE_FWHM * l.fwhmPx + 3 * sigmaPx }));
}

/** Fits from the best few scan minima, each with the lines near it free; the lowest χ² wins. */
function bestFit(w: StepWindow, lines: readonly KnownWidthLine[], expected: number, sigmaPx: number): StepSolution {
  const starts: number[] = [];
  for (const m of scanMinima(w, SCAN_STEP_PX)) {
    if (starts.every((s) => Math.abs(s - m.s) >= 1)) starts.push(m.s);
    if (starts.length === STARTS) break;
  }
  let best: StepSolution | null = null;
  for (const s0 of starts) {
    const fit = refineStep({ ...w, lines: windowLines(lines, expected + s0, sigmaPx) }, s0);
    if (!best || fit.chiSquare < best.chiSquare) best = fit;
  }
  return best!;
}

function searchOne(ctx: Context, edge: AbsorptionEdge, material: string): { search: EdgeSearch; located?: LocatedEdge } {
  const base = { material, edgeLabel: edge.label, energyEv: edge.energyEv, onDetector: true };
  const no = (reason: string, onDetector = true) => ({ search: { ...base, onDetector, located: false, reason } });
  const n = ctx.lineout.counts.length;
  const expected = pixelOfEnergy(ctx.energies, edge.energyEv);
  if (!Number.isFinite(expected)) return no(`${edge.label} (${edge.energyEv} eV) is not on the detector under the provisional map.`, false);
  const ends = [1 - ctx.o.searchRelative, 1 + ctx.o.searchRelative].map((f) => Math.abs(pixelOfEnergy(ctx.energies, edge.energyEv * f) - expected)).filter(Number.isFinite);
  const searchPx = Math.max(3, ...ends);
  const sigmaPx = ctx.o.resolutionFwhmPx / FWHM_PER_SIGMA;
  const marginPx = Math.max(15, Math.ceil(6 * sigmaPx));
  const from = Math.max(0, Math.floor(expected - searchPx - marginPx));
  const to = Math.min(n - 1, Math.ceil(expected + searchPx + marginPx));
  const pixels: number[] = [];
  for (let p = from; p <= to; p++) if (usable(ctx.lineout, p)) pixels.push(p);
  const lines = ctx.lines.filter((l) => l.pixel >= from - 3 * (l.fwhmPx / FWHM_PER_SIGMA) && l.pixel <= to + 3 * (l.fwhmPx / FWHM_PER_SIGMA));
  if (pixels.length < 12 + 3 * lines.length) return no(`${edge.label}: too few usable pixels near pixel ${expected.toFixed(1)} to fit a step.`);
  const w: StepWindow = {
    pixels: Float64Array.from(pixels),
    counts: Float64Array.from(pixels, (p) => ctx.lineout.counts[p]),
    sigma: Float64Array.from(pixels, (p) => Math.sqrt(ctx.lineout.variance[p])),
    centre: expected,
    halfWidth: Math.max(1, (to - from) / 2),
    profiles: edgeProfiles(ctx.map, ctx.foils, edge.energyEv, from - searchPx - 1, to + searchPx + 1, sigmaPx),
    lines: windowLines(lines, expected, sigmaPx).map((l) => ({ ...l, free: false })),
    searchPx,
  };
  const fit = bestFit(w, lines, expected, sigmaPx);
  const free = fit.lines.filter((l) => l.free).length;
  const dof = Math.max(1, pixels.length - 5 - fit.lines.length - 2 * free);
  const reducedChiSquare = fit.chiSquare / dof;
  const scale = Math.max(1, reducedChiSquare);
  // The null has the same lines free, so that a step cannot win by mending a line's profile.
  const freeAtStart = windowLines(lines, expected + fit.s, sigmaPx);
  const deltaChiSquare = (refineSmooth(w, freeAtStart) - fit.chiSquare) / scale;
  const pixel = expected + fit.s;
  const ue = (pixel - w.centre) / w.halfWidth;
  const justBelow = stackTransmission(ctx.foils, edge.energyEv * (1 - 1e-9));
  const justAbove = stackTransmission(ctx.foils, edge.energyEv * (1 + 1e-9));
  // Counts just on the transmitting (low-energy) side and just across the edge, and their σ.
  const { covariance, shiftIndex } = solutionCovariance(w, fit);
  const [a1, b1, a2, b2] = fit.coefficients;
  const near = [justBelow, justBelow * ue, 0, 0];
  const far = [0, 0, justAbove, justAbove * ue];
  const level = (g: number[]): number => g.reduce((sum, gi, i) => sum + gi * fit.coefficients[i], 0);
  const sigmaOf = (g: number[]): number => Math.sqrt(Math.max(0, scale * g.reduce((sum, gi, i) => sum + gi * g.reduce((t, gj, j) => t + covariance[i][j] * gj, 0), 0)));
  const fall = near.map((x, i) => x - far[i]);
  const nearLevel = level(near);
  const farLevel = level(far);
  const relative = (a2 + b2 * ue) / (a1 + b1 * ue);
  const tabulatedRatio = justAbove / justBelow;
  const depthFactor = relative > 0 ? Math.log(relative * tabulatedRatio) / Math.log(tabulatedRatio) : null;
  const shiftSigma = Math.sqrt(Math.max(0, scale * covariance[shiftIndex][shiftIndex]));
  const at = `near pixel ${pixel.toFixed(1)}`;
  if (deltaChiSquare < ctx.o.minDeltaChiSquare) return no(`${edge.label}: no significant step ${at} (Δχ² = ${deltaChiSquare.toFixed(1)} < ${ctx.o.minDeltaChiSquare}, reduced χ² ${reducedChiSquare.toFixed(1)}).`);
  if (Math.abs(fit.s) > searchPx - 0.5) return no(`${edge.label}: the best step lies at the end of the searched range (${at}), not a located edge.`);
  if (!(level(fall) >= MIN_FALL_SIGMA * sigmaOf(fall)) || !(farLevel >= -MIN_FALL_SIGMA * sigmaOf(far))) {
    return no(`${edge.label}: the step ${at} is not a fall of a positive continuum across the edge (${nearLevel.toFixed(0)} → ${farLevel.toFixed(0)} counts).`);
  }
  if (depthFactor !== null && !(depthFactor >= MIN_DEPTH_FACTOR)) {
    return no(`${edge.label}: the step ${at} is too shallow for the ${material} foil (depth ${depthFactor.toFixed(2)} of the tabulated one).`);
  }
  if (!(shiftSigma <= ctx.o.resolutionFwhmPx)) return no(`${edge.label}: the step ${at} cannot be placed to within the resolution (±${shiftSigma.toFixed(1)} px): not a sharp edge.`);
  const sideLo = pixels.filter((p) => p < pixel - 1.5 * sigmaPx && p >= pixel - marginPx).length;
  const sideHi = pixels.filter((p) => p > pixel + 1.5 * sigmaPx && p <= pixel + marginPx).length;
  if (sideLo < MIN_SIDE_PIXELS || sideHi < MIN_SIDE_PIXELS) return no(`${edge.label}: the step ${at} has too few usable pixels on one side (the detector end or saturation).`);
  const pixelSigma = Math.hypot(shiftSigma, SYSTEMATIC_PX);
  const located: LocatedEdge = {
    kind: 'filter-edge',
    label: `${edge.label} edge (Henke step, ${edge.energyEv} eV)`,
    material,
    edgeLabel: edge.label,
    pixel,
    pixelSigma,
    energyEv: edge.energyEv,
    energySigmaEv: edge.energySigmaEv ?? 0,
    expectedPixel: expected,
    deltaChiSquare,
    depthFactor,
    reducedChiSquare,
  };
  return { search: { ...base, located: true, reason: `${edge.label} located at pixel ${pixel.toFixed(2)} ± ${pixelSigma.toFixed(2)} (Δχ² = ${deltaChiSquare.toFixed(0)}).` }, located };
}

/**
 * Looks for the steps of the filters' transmission on the lineout, near where the provisional
 * map puts each edge, and returns the ones detected significantly (README.md): never an edge from
 * its expected position alone.
 *
 * @throws EngineError 'invalid_input' for a malformed lineout, unknown filters or bad options.
 */
export function locateContinuumEdges(input: ContinuumEdgeInput, options: ContinuumEdgeOptions = {}): ContinuumEdgeResult {
  const { lineout, map } = input;
  const n = lineout.counts.length;
  if (lineout.variance.length !== n || lineout.saturated.length !== n) throw new EngineError('invalid_input', `The lineout's counts (${n}), variance (${lineout.variance.length}) and saturation flags (${lineout.saturated.length}) must have one value per pixel.`);
  const foils = input.filters.map(toFoil);
  const given = input.lines ?? [];
  const o = resolveOptions(given, options);
  const pixels = new Float64Array(n);
  for (let p = 0; p < n; p++) pixels[p] = p;
  const energies = Float64Array.from(provisionalWavelengthsNm(map, pixels), (nm) => (nm > 0 ? HC_EV_NM / nm : Number.NaN));
  const ctx: Context = { lineout, energies, map, foils, lines: distinctLines(given, o.resolutionFwhmPx), o };
  const seen = new Set<string>();
  const result: ContinuumEdgeResult = { edges: [], searches: [] };
  for (const foil of foils) {
    for (const edge of transmissionStepEdges(foil.material)) {
      if (seen.has(edge.label)) continue;
      seen.add(edge.label);
      const { search, located } = searchOne(ctx, edge, foil.material);
      result.searches.push(search);
      if (located) result.edges.push(located);
    }
  }
  return result;
}
