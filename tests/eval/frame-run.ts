/**
 * One scenario through the whole calibrate pipeline (render → encode → decode → reduce → peaks →
 * assign → fit), scored against the truth, with both decidability verdicts on its detected peaks:
 * (a) the engine-wall check (decidability.ts, fitLabelling inside the engine's ranges) and
 * (b) the independent check (independent-decidability.ts, generous bounds, own fit).
 */
import { calibrateFrame, type CalibrateResult } from '../../shared/engine/calibrate.ts';
import { decodeFrame } from '../../shared/engine/frames/index.ts';
import { HC_EV_NM } from '../../shared/engine/constants.ts';
import { driverPriorOf, encodeFits, encodePng16, encodeTiff, simulateFrame, steepestEdgeEv, type SimScenario, type SimTruth } from '../../shared/engine/simulate/index.ts';
import type { Frame, Peak } from '../../shared/engine/types.ts';
import { decidability } from './decidability.ts';
import { independentDecidability, type ScaleAnchorPoint } from './independent-decidability.ts';
import { judgeResult, labelCoverage, mapErrors, type LabelCoverage, type MapErrors, type Outcome } from './judge.ts';

export interface Row extends MapErrors, LabelCoverage {
  sim: string;
  cls: string;
  id: string;
  /** The class's own claim. */
  claimDecidable: boolean;
  /** The input is wrong or holds no comb: undecidable under both verdicts, whatever the peaks. */
  refusalExpected: boolean;
  /** (a) The engine-wall check; false on a refusal-expected scenario. */
  wallDecidable: boolean;
  wallMargin: number;
  /** Set when the wall check could not run (e.g. the engine's fitLabelling changed under it). */
  wallError?: string;
  /** (b) The independent check; false on a refusal-expected scenario. */
  independentDecidable: boolean;
  independentMargin: number;
  independentReason: string;
  outcome: Outcome;
  detail: string;
  format: string;
  /** Decode + calibrate, ms. */
  ms: number;
}

/** Writes the frame in one of the formats a lab would upload, rotating by scenario index. */
function encodeFor(frame: Frame, index: number): { bytes: Uint8Array; format: string } {
  const integer = frame.sampleFormat !== 'float';
  switch (index % 4) {
    case 1:
      return integer ? { bytes: encodePng16(frame), format: 'png16' } : { bytes: encodeFits(frame, -32), format: 'fits-32' };
    case 2:
      return { bytes: encodeFits(frame, integer ? 16 : -32), format: integer ? 'fits16' : 'fits-32' };
    case 3:
      return { bytes: encodeTiff(frame, { bitsPerSample: integer ? 16 : 32, sampleFormat: integer ? 'uint' : 'float', littleEndian: false }), format: 'tiff-be' };
    default:
      return { bytes: encodeTiff(frame, { bitsPerSample: integer ? 16 : 32, sampleFormat: integer ? 'uint' : 'float', littleEndian: true }), format: 'tiff-le' };
  }
}

/** What the user tells the engine: the nominal profile and driver, the parity and the filters. */
function calibrateOptionsOf(scenario: SimScenario) {
  return {
    profile: scenario.profile,
    driverNm: scenario.driver.nominalNm,
    // The driver as the scenario's lab would state it: 1σ and blue-shift allowance (simulate/driver-prior.ts).
    ...driverPriorOf(scenario.driver),
    parity: scenario.parity,
    filters: (scenario.filters ?? []).map((f) => ({ material: f.material, thicknessNm: f.thicknessNm })),
  };
}

/** Uncertainty of an edge located on a continuum, eV (a step a few eV wide, seen through noise; from memory). */
const EDGE_ON_CONTINUUM_SIGMA_EV = 1;

/**
 * The absolute anchor a frame shows: a filter's edge on a continuum, at the pixel where the true
 * map has the edge's energy (the simulator's table puts the step there). None without a continuum.
 */
function continuumAnchors(scenario: SimScenario, truth: SimTruth): ScaleAnchorPoint[] {
  if (!scenario.continuum || !(scenario.continuum.photonsPerPixel > 0) || !scenario.filters?.length) return [];
  const energies = Array.from(truth.wavelengthNmAtPixel, (nm) => HC_EV_NM / nm).filter(Number.isFinite);
  if (energies.length < 2) return [];
  const edgeEv = steepestEdgeEv(scenario.filters, Math.min(...energies), Math.max(...energies));
  if (!Number.isFinite(edgeEv)) return [];
  const map = truth.wavelengthNmAtPixel;
  for (let p = 0; p + 1 < map.length; p += 1) {
    const a = HC_EV_NM / map[p];
    const b = HC_EV_NM / map[p + 1];
    if ((a - edgeEv) * (b - edgeEv) > 0 || a === b) continue;
    const pixel = p + (edgeEv - a) / (b - a);
    return [{ pixel, pixelSigma: EDGE_ON_CONTINUUM_SIGMA_EV / Math.abs(b - a), wavelengthNm: HC_EV_NM / edgeEv }];
  }
  return [];
}

/** The result's peaks as the Peak shape the checks take. */
function peaksOf(result: CalibrateResult): Peak[] {
  return result.peaks.map((p) => ({
    pixel: p.pixel,
    pixelSigma: p.pixelSigma,
    fwhmPx: p.fwhmPx,
    amplitude: p.area / Math.max(p.fwhmPx, 1e-9),
    area: p.area,
    areaSigma: p.area / Math.max(p.snr, 1e-9),
    snr: p.snr,
    spatialWidthPx: p.spatialWidthPx,
    saturated: false,
  }));
}

/** Runs scenario `index` of simulation `sim` with frame seed `frameSeed`. */
export async function runScenario(sim: string, scenario: SimScenario, index: number, frameSeed: number): Promise<Row> {
  const { frame, truth } = simulateFrame(scenario, frameSeed);
  const { bytes, format } = encodeFor(frame, index);
  const start = performance.now();
  const decoded = await decodeFrame(bytes);
  const options = calibrateOptionsOf(scenario);
  const result = calibrateFrame(decoded, options);
  const ms = performance.now() - start;
  const { outcome, detail } = judgeResult(result, truth);
  const errors = outcome === 'correct' ? mapErrors(result, truth) : { errorsNm: [], errorsMeV: [], inside: 0, pixels: 0 };
  const coverage = labelCoverage(result, truth.lines, scenario.lineFwhmPx);
  const peaks = peaksOf(result);
  const refusalExpected = scenario.refusalExpected === true;

  let wallDecidable = false;
  let wallMargin = Number.NaN;
  let wallError: string | undefined;
  if (peaks.length > 0) {
    try {
      const wall = decidability(peaks, truth, { ...options, pixelCount: truth.wavelengthNmAtPixel.length });
      wallDecidable = wall.decidable;
      wallMargin = wall.marginOverSlip;
    } catch (error) {
      wallError = (error as Error).message;
    }
  }
  const independent = independentDecidability(peaks, {
    lines: truth.lines,
    geometry: scenario.geometry,
    effectiveDriverNm: truth.effectiveDriverNm,
    parity: scenario.parity,
    filters: scenario.filters,
    statedTolerancePercent: scenario.driver.tolerancePercent,
    anchors: continuumAnchors(scenario, truth),
  });
  return {
    sim,
    cls: scenario.class,
    id: scenario.id,
    claimDecidable: scenario.decidable,
    refusalExpected,
    wallDecidable: wallDecidable && !refusalExpected,
    wallMargin,
    ...(wallError ? { wallError } : {}),
    independentDecidable: independent.decidable && !refusalExpected,
    independentMargin: independent.margin,
    independentReason: refusalExpected ? `refusal expected (wrong profile or no comb); the peaks alone: ${independent.reason}` : independent.reason,
    outcome,
    detail,
    format,
    ms,
    ...errors,
    ...coverage,
  };
}

/** A row for a scenario whose pipeline threw: failed, and decidable as its class claims (a crash must not pass for a refusal). */
export function thrownRow(sim: string, scenario: SimScenario, error: unknown): Row {
  const claim = scenario.decidable && scenario.refusalExpected !== true;
  return {
    sim,
    cls: scenario.class,
    id: scenario.id,
    claimDecidable: scenario.decidable,
    refusalExpected: scenario.refusalExpected === true,
    wallDecidable: claim,
    wallMargin: Number.NaN,
    independentDecidable: claim,
    independentMargin: Number.NaN,
    independentReason: 'pipeline threw',
    outcome: 'failed',
    detail: `threw: ${(error as Error).message}`,
    format: '?',
    ms: 0,
    errorsNm: [],
    errorsMeV: [],
    inside: 0,
    pixels: 0,
    firstOrderDetected: 0,
    firstOrderLabelled: 0,
    secondOrderDetected: 0,
    secondOrderRight: 0,
  };
}
