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
import type { KnownLine } from '../../shared/engine/known-lines.ts';
import { parseProfile, parseCalibrationFile } from './inputs.ts';
import type { Calibration, Frame, LineShape, Parity, SpatialBand } from '../../shared/engine/types.ts';

export interface CliFailure {
  status: 'failed';
  message: string;
}

/** A flag whose value turns out wrong only once the files are read (exit code 2, like a usage error). */
export class FlagValueError extends Error {}

/** Which files the bytes came from, for messages; tests that pass bytes alone get generic names. */
export interface FileNames {
  frame?: string;
  dark?: string;
}

/** Decodes one page, naming the file in the engine's message ("frame 'a.tif': page 2 does not exist: …"). */
async function decodeNamed(bytes: Uint8Array, page: number, what: string): Promise<Frame> {
  try {
    return await decodeFrame(bytes, { page });
  } catch (error) {
    if (error instanceof EngineError) throw new EngineError(error.code, `${what}: ${error.message}`, error.details);
    throw error;
  }
}

/** The frame's page and the dark frame that goes with it (see {@link darkForPage}). */
async function decodeFrameAndDark(frameBytes: Uint8Array, darkBytes: Uint8Array | undefined, page: number | undefined, names: FileNames = {}): Promise<{ frame: Frame; dark?: Frame }> {
  const frameName = names.frame ? `frame '${names.frame}'` : 'the frame';
  // Without a name the caller names the frame itself (orderly apply prefixes each frame's line).
  const frame = names.frame ? await decodeNamed(frameBytes, page ?? 0, frameName) : await decodeFrame(frameBytes, { page: page ?? 0 });
  if (!darkBytes) return { frame };
  return { frame, dark: await darkForPage(darkBytes, frame, frameName, names.dark ? `dark frame '${names.dark}'` : 'the dark frame') };
}

/**
 * The dark frame for one page of a frame: a single-page dark applies to every page; a dark stack
 * with as many pages as the frame is paired page by page; anything else is refused, naming the
 * dark file and both page counts (a stack of another length cannot be paired unambiguously).
 */
async function darkForPage(darkBytes: Uint8Array, frame: Frame, frameName: string, darkName: string): Promise<Frame> {
  const first = await decodeNamed(darkBytes, 0, darkName);
  if (first.pageCount === 1) return first;
  if (first.pageCount === frame.pageCount) return frame.page === 0 ? first : decodeNamed(darkBytes, frame.page, darkName);
  throw new EngineError(
    'invalid_input',
    `${darkName} has ${first.pageCount} pages but ${frameName} has ${frame.pageCount}: a dark is either one page (subtracted from every page) or a stack with one page per page of the frame`,
  );
}

export interface CalibrateArgs {
  frameBytes: Uint8Array;
  darkBytes?: Uint8Array;
  /** File names for messages. */
  names?: FileNames;
  page?: number;
  profile: unknown;
  driverNm: number;
  /** 1σ of the measured driver wavelength, percent. */
  driverTolerancePct?: number;
  /** Ionisation blue-shift allowance below it, percent. */
  blueShiftPct?: number;
  parity: Parity;
  filters: string[];
  pins: { pixel: number; harmonic: number }[];
  /** `--line PIXEL=ENERGY_EV`: lines of known first-order photon energy. @default [] */
  knownLines?: KnownLine[];
  signal?: SpatialBand;
  background: SpatialBand[];
  model: string;
}

function modelOption(model: string): 'auto' | 'grating' | { polynomialDegree: number } {
  if (model.startsWith('poly:')) return { polynomialDegree: Number(model.slice(5)) };
  return model === 'grating' ? 'grating' : 'auto';
}

export async function runCalibrate(args: CalibrateArgs) {
  const { frame, dark } = await decodeFrameAndDark(args.frameBytes, args.darkBytes, args.page, args.names);
  const profile = parseProfile(args.profile);
  const knownLines = args.knownLines ?? [];
  const result = calibrateFrame(frame, {
    profile,
    driverNm: args.driverNm,
    driverTolerancePct: args.driverTolerancePct,
    blueShiftPct: args.blueShiftPct,
    parity: args.parity,
    filters: args.filters,
    pins: args.pins,
    knownLines,
    dark,
    signal: args.signal,
    background: args.background.length > 0 ? args.background : undefined,
    model: modelOption(args.model),
  });
  // A line off the detector or with no peak near it is a bad --line value, seen only on the data.
  const bad = result.badOption ? knownLines[result.badOption.index] : undefined;
  if (bad) throw new FlagValueError(`--line ${bad.pixel}=${bad.energyEv}: ${result.message}`);
  return result;
}

export interface ApplyArgs {
  frameBytes: Uint8Array;
  darkBytes?: Uint8Array;
  /** File names for messages. */
  names?: FileNames;
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
  const { frame, dark } = await decodeFrameAndDark(args.frameBytes, args.darkBytes, args.page, args.names);
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
