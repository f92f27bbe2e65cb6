/**
 * The two CLI commands as plain async functions over bytes and parsed JSON, so tests can call
 * them without spawning a process. All the science is in shared/engine.
 */
import { decodeFrame } from '../../shared/engine/frames/index.ts';
import { calibrateFrame } from '../../shared/engine/calibrate.ts';
import { reduceFrame } from '../../shared/engine/reduce.ts';
import { findPeaks } from '../../shared/engine/peaks.ts';
import { applyCalibration, type ApplyOptions } from '../../shared/engine/apply.ts';
import { EngineError } from '../../shared/engine/errors.ts';
import { parseProfile, parseCalibrationFile } from './inputs.ts';
import type { Calibration, LineShape, Parity, SpatialBand } from '../../shared/engine/types.ts';

export interface CliFailure {
  status: 'failed';
  message: string;
}

export interface CalibrateArgs {
  frameBytes: Uint8Array;
  darkBytes?: Uint8Array;
  page?: number;
  profile: unknown;
  driverNm: number;
  driverTolerancePct?: number;
  parity: Parity;
  filters: string[];
  pins: { pixel: number; harmonic: number }[];
  signal?: SpatialBand;
  background: SpatialBand[];
  model: string;
}

function modelOption(model: string): 'auto' | 'grating' | { polynomialDegree: number } {
  if (model.startsWith('poly:')) return { polynomialDegree: Number(model.slice(5)) };
  return model === 'grating' ? 'grating' : 'auto';
}

export async function runCalibrate(args: CalibrateArgs) {
  const frame = await decodeFrame(args.frameBytes, { page: args.page });
  const dark = args.darkBytes ? await decodeFrame(args.darkBytes, { page: args.page }) : undefined;
  const profile = parseProfile(args.profile);
  return calibrateFrame(frame, {
    profile,
    driverNm: args.driverNm,
    driverTolerancePct: args.driverTolerancePct,
    parity: args.parity,
    filters: args.filters,
    pins: args.pins,
    dark,
    signal: args.signal,
    background: args.background.length > 0 ? args.background : undefined,
    model: modelOption(args.model),
  });
}

export interface ApplyArgs {
  frameBytes: Uint8Array;
  darkBytes?: Uint8Array;
  page?: number;
  calibrationJson: unknown;
  /**
   * Signal/background bands and line shape to reduce with instead of the calibration's own (the
   * server passes a frame's or instrument's saved regions). Omitted: the calibration's, as
   * `orderly apply` does.
   */
  regions?: { signal: SpatialBand; background: SpatialBand[]; lineShape?: LineShape };
  /** Options of the apply stage (e.g. the filter-transmission correction); omitted: its defaults, as `orderly apply`. */
  applyOptions?: ApplyOptions;
}

/** `runApply` with the pieces the server also needs: the detected peaks and the parsed calibration. */
export async function runApplyDetailed(args: ApplyArgs) {
  const calibration: Calibration = parseCalibrationFile(args.calibrationJson);
  const frame = await decodeFrame(args.frameBytes, { page: args.page });
  const dark = args.darkBytes ? await decodeFrame(args.darkBytes, { page: args.page }) : undefined;
  const spectralLength = calibration.spectralAxis === 'x' ? frame.width : frame.height;
  if (spectralLength !== calibration.pixelCount) {
    throw new EngineError(
      'invalid_input',
      `frame has ${spectralLength} spectral pixels but the calibration was made for ${calibration.pixelCount}`,
    );
  }
  // Empty background list → the engine's automatic bands, as for `orderly calibrate`.
  const bands = args.regions
    ? { ...args.regions, background: args.regions.background.length > 0 ? args.regions.background : undefined }
    : { signal: calibration.signal, background: calibration.background, lineShape: calibration.lineShape };
  const lineout = reduceFrame(frame, {
    spectralAxis: calibration.spectralAxis,
    dark,
    signal: bands.signal,
    background: bands.background,
    lineShape: bands.lineShape,
  });
  const peaks = findPeaks(lineout);
  return { spectrum: applyCalibration(lineout, peaks, calibration, args.applyOptions), peaks, calibration };
}

/** Applies a stored calibration with the signal/background bands and line shape it was made with. */
export async function runApply(args: ApplyArgs) {
  return (await runApplyDetailed(args)).spectrum;
}
