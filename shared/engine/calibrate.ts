/**
 * The calibrate pipeline: frame → lineout → peaks → order assignment → dispersion map, returned
 * as the `orderly calibrate --json` object. Never throws on bad data: an EngineError becomes a
 * `failed` result with its message.
 */
import { findFilterEdges } from './anchors/index.ts';
import { assignOrders, DEFAULT_BLUE_SHIFT_PCT, DEFAULT_DRIVER_SIGMA_PCT, unanchoredScaleSigma, type AssignInput, type AssignResult, type FilterSpec, type Hypothesis } from './assign/index.ts';
import { HC_EV_NM } from './constants.ts';
import { FIT_FLOOR_PX } from './assign/verdict.ts';
import { evaluateCalibration, fitGratingMap, fitPolynomialMap, type GratingParameter } from './dispersion/index.ts';
import { EngineError } from './errors.ts';
import { matchKnownLines, type KnownLine, type MatchedKnownLines } from './known-lines.ts';
import { findPeaks } from './peaks.ts';
import { reduceFrame } from './reduce.ts';
import { describeAbsoluteScale } from './scale-note.ts';
import type { Calibration, CalibrationPoint, Frame, InstrumentProfile, LineShape, Lineout, Parity, Peak, SpatialBand } from './types.ts';

export interface CalibrateOptions {
  /** The instrument's nominal profile. */
  profile: InstrumentProfile;
  /** Nominal driver wavelength, nm. */
  driverNm: number;
  /** 1σ of the measured driver wavelength, percent (symmetric). @default 0.5 */
  driverTolerancePct?: number;
  /** Largest ionisation blue shift of the harmonics below the measured driver, percent (an assumption). @default 1 */
  blueShiftPct?: number;
  /** @default 'odd' */
  parity?: Parity;
  /** Filters in the beam. @default [] */
  filters?: FilterSpec[];
  /** User-fixed orders. They fix an order, not the scale. @default [] */
  pins?: { pixel: number; harmonic: number }[];
  /**
   * Lines of known first-order photon energy: the detected peak nearest `pixel` (within
   * max(3 px, 2 FWHM)) is that line. Absolute anchors of the wavelength scale. @default []
   */
  knownLines?: KnownLine[];
  dark?: Frame;
  signal?: SpatialBand;
  background?: SpatialBand[];
  lineShape?: LineShape;
  /** Dispersion model: the grating equation, or a Chebyshev polynomial of a given degree. @default 'auto' (grating) */
  model?: 'auto' | 'grating' | { polynomialDegree: number | 'auto' };
}

export interface CalibratedPeak {
  pixel: number;
  pixelSigma: number;
  harmonic: number | null;
  diffractionOrder: number;
  wavelengthNm: number | null;
  energyEv: number | null;
  fwhmPx: number;
  area: number;
  snr: number;
  spatialWidthPx: number;
}

export interface HypothesisSummary {
  rank: number;
  firstHarmonic: number;
  lastHarmonic: number;
  harmonics: (number | null)[];
  matchedPeaks: number;
  secondOrderPeaks: number;
  unexplainedPeaks: number;
  rmsResidualPx: number;
  score: number;
  deltaScore: number;
  driverNm: number;
}

export interface CalibrateResult {
  status: 'unique' | 'ambiguous' | 'failed';
  message: string;
  peaks: CalibratedPeak[];
  hypotheses: HypothesisSummary[];
  /** The map of the best hypothesis; given for `ambiguous` too (marked in its notes), null for `failed`. */
  calibration: Calibration | null;
  notes: string[];
  /**
   * On a `failed` result caused by an option that cannot be used rather than by the data (e.g. a
   * known line with no peak near it): which option, and which entry of it. Callers answer it as
   * bad input (exit code 2, a 400) instead of a failed calibration.
   */
  badOption?: { name: 'knownLines'; index: number };
}

function failedResult(message: string, peaks: CalibratedPeak[] = [], notes: string[] = []): CalibrateResult {
  return { status: 'failed', message, peaks, hypotheses: [], calibration: null, notes };
}

function badOptionOf(error: EngineError): CalibrateResult['badOption'] {
  const { option, index } = error.details ?? {};
  return option === 'knownLines' && typeof index === 'number' ? { name: option, index } : undefined;
}

function unlabelled(peaks: Peak[]): CalibratedPeak[] {
  return peaks.map((p) => ({
    pixel: p.pixel,
    pixelSigma: p.pixelSigma,
    harmonic: null,
    diffractionOrder: 1,
    wavelengthNm: null,
    energyEv: null,
    fwhmPx: p.fwhmPx,
    area: p.area,
    snr: p.snr,
    spatialWidthPx: p.spatialWidthPx,
  }));
}

function summarise(h: Hypothesis, rank: number): HypothesisSummary {
  return {
    rank,
    firstHarmonic: h.firstHarmonic,
    lastHarmonic: h.lastHarmonic,
    harmonics: h.harmonics,
    matchedPeaks: h.matchedPeaks,
    secondOrderPeaks: h.secondOrderPeaks,
    unexplainedPeaks: h.unexplainedPeaks,
    rmsResidualPx: h.rmsResidualPx,
    score: h.score,
    deltaScore: h.deltaScore,
    driverNm: h.driverNm,
  };
}

/** The documented defaults, given to the assigner explicitly so that the unanchored σ below is the one it used. */
function driverTolerancePct(options: CalibrateOptions): number {
  return options.driverTolerancePct ?? DEFAULT_DRIVER_SIGMA_PCT;
}
function blueShiftPct(options: CalibrateOptions): number {
  return options.blueShiftPct ?? DEFAULT_BLUE_SHIFT_PCT;
}

/** Geometry entries to free in the final fit: as many as the points support, the best-determined first. */
function freeParameters(pointCount: number): GratingParameter[] {
  const order: GratingParameter[] = ['detectorAngleDeg', 'detectorDistanceMm', 'detectorTiltDeg', 'incidenceAngleDeg'];
  return order.slice(0, Math.max(1, Math.min(order.length, pointCount - 2)));
}

type GratingBounds = Partial<Record<GratingParameter, [number, number]>>;

/**
 * A few-line fit holds parameters the lines cannot determine; their uncertainty still moves the
 * map. Propagate it: with θ_h ~ (value, σ_h²) from the assigner's priors and G = ∂θ̂_free/∂θ_h
 * (one refit per held parameter, by finite difference), the joint covariance is
 * [C_f + G Σ_h Gᵀ, G Σ_h; Σ_h Gᵀ, Σ_h] (linearised, common practice), stored over
 * free ∪ held so that the band at every pixel includes it.
 */
function withHeldParameters(
  points: CalibrationPoint[],
  fit: ReturnType<typeof fitGratingMap>,
  free: GratingParameter[],
  bounds: GratingBounds,
  priorSigma: AssignResult['priorSigma'],
): NonNullable<Calibration['grating']> {
  const grating = fit.grating;
  const held = HELD_CANDIDATES.filter((name) => !free.includes(name) && (priorSigma[name] ?? 0) > 0);
  if (held.length === 0) return grating;
  const k = free.length;
  const gradients: number[][] = [];
  for (const name of held) {
    const sigma = priorSigma[name] as number;
    const h = 0.05 * sigma;
    const start = { ...grating.geometry };
    start[name] = grating.geometry[name] + h;
    const moved = fitGratingMap(points, start, { restarts: 0, maxIterations: 200, free, bounds: { ...bounds, [name]: undefined } });
    gradients.push(free.map((f, j) => (moved.grating.parameters[j] - grating.parameters[j]) / h));
  }
  const m = k + held.length;
  const cov = Array.from({ length: m }, () => new Array<number>(m).fill(0));
  for (let a = 0; a < k; a++) for (let b = 0; b < k; b++) cov[a][b] = grating.covariance[a][b];
  held.forEach((name, hIndex) => {
    const s2 = (priorSigma[name] as number) ** 2;
    const g = gradients[hIndex];
    for (let a = 0; a < k; a++) {
      for (let b = 0; b < k; b++) cov[a][b] += g[a] * g[b] * s2;
      cov[a][k + hIndex] = g[a] * s2;
      cov[k + hIndex][a] = g[a] * s2;
    }
    cov[k + hIndex][k + hIndex] = s2;
  });
  return {
    geometry: grating.geometry,
    parameterNames: [...grating.parameterNames, ...held],
    parameters: [...grating.parameters, ...held.map((name) => grating.geometry[name])],
    covariance: cov,
    heldParameterNames: held,
  };
}

/** Parameters a few-line fit may hold (the centre pixel is never fitted: the angle absorbs a shift). */
const HELD_CANDIDATES: GratingParameter[] = ['detectorAngleDeg', 'detectorDistanceMm', 'detectorTiltDeg', 'incidenceAngleDeg'];

function fitMap(
  points: CalibrationPoint[],
  hypothesis: Hypothesis,
  pixelCount: number,
  model: CalibrateOptions['model'],
  priorSigma: AssignResult['priorSigma'] = {},
): { calibration: Pick<Calibration, 'model' | 'polynomial' | 'grating' | 'residualRmsNm' | 'reducedChiSquare'>; residualsNm: number[]; looNm: number[]; notes: string[] } {
  const notes: string[] = [];
  if (model && typeof model === 'object') {
    const fit = fitPolynomialMap(points, { pixelCount, degree: model.polynomialDegree });
    return {
      calibration: { model: 'polynomial', polynomial: fit.polynomial, residualRmsNm: fit.residualRmsNm, reducedChiSquare: fit.reducedChiSquare },
      residualsNm: fit.residualsNm,
      looNm: fit.leaveOneOutResidualsNm,
      notes,
    };
  }
  const free = freeParameters(points.length);
  const g = hypothesis.geometry;
  const bounds: GratingBounds = {
    detectorAngleDeg: [g.detectorAngleDeg - 2, g.detectorAngleDeg + 2],
    detectorDistanceMm: [g.detectorDistanceMm * 0.9, g.detectorDistanceMm * 1.1],
    detectorTiltDeg: [g.detectorTiltDeg - 10, g.detectorTiltDeg + 10],
    incidenceAngleDeg: [g.incidenceAngleDeg - 1, g.incidenceAngleDeg + 1],
  };
  const fit = fitGratingMap(points, g, {
    // The start is the assigner's own least-squares geometry for these very points (searched from
    // several starts there), so extra restarts only repeat that search.
    restarts: 0,
    // From that start the fit converges in tens of steps; leave-one-out comes from the leverages
    // of the one fit (MINPACK-style stopping), so the default iteration cap costs little.
    maxIterations: 200,
    free,
    bounds,
  });
  if (!fit.wellConditioned) notes.push(`The grating fit's free parameters (${free.join(', ')}) are strongly correlated; the map is sound, the individual parameters are not.`);
  const grating = withHeldParameters(points, fit, free, bounds, priorSigma);
  if (grating.heldParameterNames?.length) {
    notes.push(`Too few lines to fit ${grating.heldParameterNames.join(', ')}: held at the assigner's values, their spread over the realignment range is carried into the band.`);
  }
  return {
    calibration: { model: 'grating', grating, residualRmsNm: fit.residualRmsNm, reducedChiSquare: fit.reducedChiSquare },
    residualsNm: fit.residualsNm,
    looNm: fit.leaveOneOutResidualsNm,
    notes,
  };
}

function buildCalibration(
  lineout: Lineout,
  peaks: Peak[],
  assignment: AssignResult,
  hypothesis: Hypothesis,
  options: CalibrateOptions,
  spectralAxis: 'x' | 'y',
  known: MatchedKnownLines,
): Calibration {
  const pixelCount = lineout.counts.length;
  const points: CalibrationPoint[] = [];
  hypothesis.labels.forEach((label, i) => {
    if (label.harmonic === null || label.diffractionOrder === null) return;
    points.push({
      pixel: peaks[i].pixel,
      // The same centroid floor as the assigner's fit gate: bright lines claim 0.001 px while the
      // detector and line shape hold them to about 0.02 px.
      pixelSigma: Math.hypot(peaks[i].pixelSigma, FIT_FLOOR_PX),
      harmonic: label.harmonic,
      diffractionOrder: label.diffractionOrder,
      wavelengthNm: assignment.driverNm / label.harmonic,
      residualNm: 0,
      leaveOneOutResidualNm: Number.NaN,
    });
  });
  if (points.length < 2) throw new EngineError('fit_failed', 'fewer than two labelled peaks: no map can be fitted');
  const fitted = fitMap(points, hypothesis, pixelCount, options.model, assignment.priorSigma);
  points.forEach((p, i) => {
    p.residualNm = fitted.residualsNm[i];
    p.leaveOneOutResidualNm = fitted.looNm[i];
  });
  return {
    format: 'orderly-calibration/1',
    ...fitted.calibration,
    spectralAxis,
    pixelCount,
    driverNm: assignment.driverNm,
    driverSigmaNm: assignment.driverSigmaNm,
    parity: options.parity ?? 'odd',
    absoluteScale: assignment.anchored ? 'anchored' : 'driver-tolerance',
    // Only what the assigner says anchored the scale is listed as having done so.
    ...(assignment.anchored && known.anchors.length > 0 ? { anchors: known.anchors } : {}),
    unanchoredScaleSigmaRelative: unanchoredScaleSigma(driverTolerancePct(options), blueShiftPct(options)),
    scaleSigmaRelative: assignment.scaleSigmaRelative,
    points,
    filters: (options.filters ?? []).map((f) => (typeof f === 'string' ? f : `${f.material}${f.thicknessNm ? `:${f.thicknessNm}` : ''}`)),
    signal: lineout.signal,
    background: lineout.background,
    lineShape: lineout.lineShape,
    notes: [...assignment.notes, ...fitted.notes],
  };
}

/**
 * Filter edges as anchors (anchors/README.md): after the first assignment, the filters' edges are
 * looked for on the continuum with that assignment's map as the provisional one; edges located
 * there go back to the assigner as known lines at their pixels and the assignment runs again, so
 * the scale is anchored. The notes say where each edge was located and what it fixes, and which
 * labelled orders each edge lies between (which fixes labels, not the scale).
 */
function anchorOnFilterEdges(
  lineout: Lineout,
  peaks: Peak[],
  options: CalibrateOptions,
  spectralAxis: 'x' | 'y',
  known: MatchedKnownLines,
  assignInput: AssignInput,
  first: AssignResult & { best: Hypothesis },
): { assignment: AssignResult; calibration: Calibration; notes: string[] } {
  const calibration = buildCalibration(lineout, peaks, first, first.best, options, spectralAxis, known);
  if ((options.filters ?? []).length === 0) return { assignment: first, calibration, notes: [] };
  const found = findFilterEdges({
    lineout,
    peaks,
    calibration,
    labels: first.best.labels,
    driverNm: first.driverNm,
    parity: options.parity ?? 'odd',
    filters: options.filters ?? [],
    scaleSigmaRelative: first.scaleSigmaRelative,
  });
  if (found.knownLines.length === 0) return { assignment: first, calibration, notes: found.notes };
  const withEdges: MatchedKnownLines = { assignLines: [...known.assignLines, ...found.knownLines], anchors: [...known.anchors, ...found.anchors] };
  const second = assignOrders(peaks, { ...assignInput, knownLines: withEdges.assignLines });
  if (second.status === 'failed' || !second.best) {
    return { assignment: first, calibration, notes: [...found.notes, `The located edge(s) fit no labelling of the peaks, so the scale is not anchored by them: ${second.message}`] };
  }
  const anchored = buildCalibration(lineout, peaks, second, second.best, options, spectralAxis, withEdges);
  const unused = second.anchored ? [] : ['The order assigner did not use the located edge(s) to anchor the scale.'];
  return { assignment: second, calibration: anchored, notes: [...found.notes, ...unused] };
}

/** Runs the whole calibration on one frame. */
export function calibrateFrame(frame: Frame, options: CalibrateOptions): CalibrateResult {
  let peaks: Peak[] = [];
  try {
    const spectralAxis = options.profile.spectralAxis;
    const lineout = reduceFrame(frame, {
      spectralAxis,
      dark: options.dark,
      signal: options.signal,
      background: options.background,
      lineShape: options.lineShape,
    });
    peaks = findPeaks(lineout);
    if (peaks.length === 0) return failedResult('no peaks above the noise in the signal band: check the signal region, the exposure and the filters');
    const pixelCount = lineout.counts.length;
    const known = matchKnownLines(options.knownLines ?? [], peaks, pixelCount);
    const assignInput: AssignInput = {
      profile: options.profile,
      pixelCount,
      driverNm: options.driverNm,
      driverTolerancePct: driverTolerancePct(options),
      blueShiftPct: blueShiftPct(options),
      parity: options.parity ?? 'odd',
      filters: options.filters,
      pins: options.pins,
      knownLines: known.assignLines,
    };
    const firstAssignment = assignOrders(peaks, assignInput);
    if (firstAssignment.status === 'failed' || !firstAssignment.best) {
      return { ...failedResult(firstAssignment.message, unlabelled(peaks), firstAssignment.notes), hypotheses: firstAssignment.hypotheses.map((h, i) => summarise(h, i + 1)) };
    }
    const edges = anchorOnFilterEdges(lineout, peaks, options, spectralAxis, known, assignInput, { ...firstAssignment, best: firstAssignment.best });
    const { assignment, calibration } = edges;
    const hypotheses = assignment.hypotheses.map((h, i) => summarise(h, i + 1));
    const best = assignment.best!;
    calibration.notes.push(...edges.notes);
    calibration.notes.unshift(describeAbsoluteScale(calibration));
    if (known.anchors.length > 0 && !assignment.anchored) {
      calibration.notes.unshift(`${known.anchors.length} known line(s) were given, but the order assigner did not use them to anchor the scale.`);
    }
    if (assignment.status === 'ambiguous') {
      calibration.notes.unshift('AMBIGUOUS: this map belongs to the best of several hypotheses the data could not tell apart; do not use it before an order is pinned or an anchor decides.');
    }
    const { wavelengthNm } = evaluateCalibration(calibration, peaks.map((p) => p.pixel));
    const labelled: CalibratedPeak[] = unlabelled(peaks).map((p, i) => {
      const label = best.labels[i];
      const m = label.diffractionOrder ?? 1;
      const lambda = wavelengthNm[i] / m;
      const known = label.harmonic !== null && assignment.status === 'unique';
      return {
        ...p,
        harmonic: known ? label.harmonic : null,
        diffractionOrder: m,
        wavelengthNm: known && Number.isFinite(lambda) ? lambda : null,
        energyEv: known && Number.isFinite(lambda) ? HC_EV_NM / lambda : null,
      };
    });
    return { status: assignment.status, message: assignment.message, peaks: labelled, hypotheses, calibration, notes: [...assignment.notes, ...edges.notes] };
  } catch (error) {
    if (error instanceof EngineError) {
      const badOption = badOptionOf(error);
      return { ...failedResult(error.message, unlabelled(peaks)), ...(badOption ? { badOption } : {}) };
    }
    throw error;
  }
}
