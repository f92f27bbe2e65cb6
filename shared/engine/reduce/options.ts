import { EngineError } from '../errors.ts';
import type { Frame, LineShape, SpatialBand } from '../types.ts';

/** Options of {@link reduceFrame}. */
export interface ReduceOptions {
  /** 'x': the spectrum runs along columns (x) and the spatial axis is rows; 'y': the transpose. */
  spectralAxis: 'x' | 'y';
  /** Dark (or bias) frame subtracted pixel by pixel; must have the frame's width and height. */
  dark?: Frame;
  /** Signal band along the spatial axis. @default found from the spatial profile */
  signal?: SpatialBand;
  /** Background bands along the spatial axis. @default one band each side of the signal band, where there is room */
  background?: SpatialBand[];
  /** Line tilt and curvature to correct before summing. @default no tilt, no curvature */
  lineShape?: LineShape;
  /** Camera gain g in counts per detected photon: var(counts) = g·counts + readNoise². @default 1 */
  gainCountsPerPhoton?: number;
  /**
   * Read noise in counts (rms). When given, the frame is taken as bias-free (dark-subtracted or a
   * camera without offset), so the per-pixel floor is readNoise² + g·max(background, 0).
   * @default measured: the noise floor of the background rows (robust MAD of row-to-row
   * differences), which then includes the shot noise of the background light
   */
  readNoiseCounts?: number;
  /** Raw value at or above which a pixel counts as saturated. @default frame.fullScale */
  saturationLevel?: number;
  /** Replace hot pixels, cosmic-ray hits and NaN pixels inside the bands. @default true */
  rejectOutliers?: boolean;
  /** Rejection threshold in noise sigmas above the neighbourhood median. @default 6 */
  outlierSigma?: number;
  /** Boxcar smoothing of the background estimate along the spectral axis, pixels (odd; 1 = none). @default 1 */
  backgroundSmoothPx?: number;
}

/** {@link ReduceOptions} with every default filled in and every value checked. */
export interface ResolvedReduceOptions {
  spectralAxis: 'x' | 'y';
  dark?: Frame;
  signal?: SpatialBand;
  background?: SpatialBand[];
  lineShape: LineShape;
  gain: number;
  readNoise?: number;
  saturationLevel: number;
  rejectOutliers: boolean;
  outlierSigma: number;
  backgroundSmoothPx: number;
}

function invalid(message: string, details?: Record<string, unknown>): never {
  throw new EngineError('invalid_input', message, details);
}

function checkBand(band: SpatialBand, spatialLength: number, what: string): void {
  if (!Number.isInteger(band.start) || !Number.isInteger(band.end)) {
    invalid(`The ${what} band must have integer start and end rows, got ${band.start}..${band.end}.`);
  }
  if (band.start < 0 || band.end > spatialLength || band.end - band.start < 1) {
    invalid(
      `The ${what} band ${band.start}..${band.end} must lie inside the spatial axis 0..${spatialLength} and hold at least one row.`,
    );
  }
}

/** Checks the frame and options once and fills in defaults; throws EngineError('invalid_input'). */
export function resolveReduceOptions(frame: Frame, options: ReduceOptions): ResolvedReduceOptions {
  if (!frame || !(frame.data instanceof Float32Array)) invalid('The frame has no Float32Array pixel data.');
  if (!Number.isInteger(frame.width) || !Number.isInteger(frame.height) || frame.width < 1 || frame.height < 1) {
    invalid(`The frame size ${frame.width}x${frame.height} is not a positive integer size.`);
  }
  if (frame.data.length !== frame.width * frame.height) {
    invalid(`The frame holds ${frame.data.length} pixels, but ${frame.width}x${frame.height} needs ${frame.width * frame.height}.`);
  }
  if (options.spectralAxis !== 'x' && options.spectralAxis !== 'y') {
    invalid(`spectralAxis must be 'x' or 'y', got ${String(options.spectralAxis)}.`);
  }
  const dark = options.dark;
  if (dark) {
    if (dark.width !== frame.width || dark.height !== frame.height || dark.data.length !== frame.data.length) {
      invalid(
        `The dark frame is ${dark.width}x${dark.height} but the frame is ${frame.width}x${frame.height}; they must be the same size.`,
        { darkWidth: dark.width, darkHeight: dark.height, width: frame.width, height: frame.height },
      );
    }
  }
  const spatialLength = options.spectralAxis === 'x' ? frame.height : frame.width;
  if (options.signal) checkBand(options.signal, spatialLength, 'signal');
  if (options.background) {
    for (const band of options.background) {
      checkBand(band, spatialLength, 'background');
      if (options.signal && band.start < options.signal.end && options.signal.start < band.end) {
        invalid(
          `The background band ${band.start}..${band.end} overlaps the signal band ${options.signal.start}..${options.signal.end}.`,
        );
      }
    }
  }
  const lineShape = options.lineShape ?? { tiltPxPerPx: 0, curvaturePxPerPx2: 0 };
  if (!Number.isFinite(lineShape.tiltPxPerPx) || !Number.isFinite(lineShape.curvaturePxPerPx2)) {
    invalid('lineShape tilt and curvature must be finite numbers.');
  }
  const gain = options.gainCountsPerPhoton ?? 1;
  if (!(gain > 0) || !Number.isFinite(gain)) invalid(`gainCountsPerPhoton must be a positive number, got ${gain}.`);
  const readNoise = options.readNoiseCounts;
  if (readNoise !== undefined && !(readNoise >= 0 && Number.isFinite(readNoise))) {
    invalid(`readNoiseCounts must be zero or positive, got ${readNoise}.`);
  }
  const saturationLevel = options.saturationLevel ?? frame.fullScale ?? Infinity;
  if (Number.isNaN(saturationLevel)) invalid('saturationLevel must be a number.');
  const outlierSigma = options.outlierSigma ?? 6;
  if (!(outlierSigma > 0)) invalid(`outlierSigma must be positive, got ${outlierSigma}.`);
  const backgroundSmoothPx = options.backgroundSmoothPx ?? 1;
  if (!Number.isInteger(backgroundSmoothPx) || backgroundSmoothPx < 1 || backgroundSmoothPx % 2 === 0) {
    invalid(`backgroundSmoothPx must be an odd positive integer, got ${backgroundSmoothPx}.`);
  }
  return {
    spectralAxis: options.spectralAxis,
    dark,
    signal: options.signal,
    background: options.background,
    lineShape,
    gain,
    readNoise,
    saturationLevel,
    rejectOutliers: options.rejectOutliers ?? true,
    outlierSigma,
    backgroundSmoothPx,
  };
}
