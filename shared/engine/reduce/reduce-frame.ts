import { EngineError } from '../errors.ts';
import type { Frame, Lineout, SpatialBand } from '../types.ts';
import { autoBackgroundBands, findSignalBand } from './bands.ts';
import { noiseFloorFromRows, type SourcedBand } from './noise.ts';
import { type ReduceOptions, resolveReduceOptions } from './options.ts';
import { RowCleaner, bandPedestal } from './outliers.ts';
import { type AxisGeometry, axisGeometry, frameCensus, frameRefusals, rowSource } from './strip.ts';
import { sumBand } from './sum-band.ts';
import { addCleanRows } from './sum-rows.ts';

/** Rows read beyond each band edge so that edge pixels have spatial neighbours for rejection. */
const MARGIN_ROWS = 2;

/** The band's rows and their neighbours, readable spectral-contiguously (a view for axis 'x'). */
function sourcedBand(frame: Frame, dark: Frame | undefined, geometry: AxisGeometry, band: SpatialBand): SourcedBand {
  return { source: rowSource(frame, dark, geometry, band.start - MARGIN_ROWS, band.end + MARGIN_ROWS), band };
}

/** Centred boxcar of odd width `size` (shrunk at the ends); returns the input when size is 1. */
function boxcar(values: Float64Array, size: number): Float64Array {
  if (size <= 1) return values;
  const half = size >> 1;
  const n = values.length;
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    let sum = 0;
    let count = 0;
    for (let j = Math.max(0, i - half); j <= Math.min(n - 1, i + half); j++) {
      sum += values[j];
      count++;
    }
    out[i] = sum / count;
  }
  return out;
}

/** `compute`, run at the first call only. */
function once(compute: () => number): () => number {
  let value: number | undefined;
  return () => (value ??= compute());
}

/** The frame-wide refusals: nothing but NaN, or nothing below the saturation level. */
function refuseUnusable(frame: Frame, refusals: { allNaN: boolean; allSaturated: boolean }, saturationLevel: number): void {
  if (refusals.allNaN) {
    throw new EngineError('invalid_input', `Every pixel of the ${frame.width}x${frame.height} frame is NaN; there is nothing to reduce.`);
  }
  if (refusals.allSaturated) {
    throw new EngineError(
      'invalid_input',
      `Every pixel of the ${frame.width}x${frame.height} frame is at or above the saturation level ${saturationLevel}; the exposure is unusable.`,
    );
  }
}

/**
 * Reduces a frame to a lineout: dark subtraction, rejection of hot/cosmic/NaN pixels in the bands,
 * background subtraction from the background bands, tilt/curvature-corrected summation of the
 * signal band, saturation flags and a variance per spectral pixel.
 *
 * Noise model (gain g counts per photon): var(counts) = g·counts + readNoise², per raw pixel.
 * With `readNoiseCounts` unset the floor (readNoise² plus the background's own shot noise) is
 * measured from the background rows; with it set the frame must be bias-free and the floor is
 * readNoise² + g·max(background, 0). The lineout variance is Σ over band rows of
 * (g·max(x − b, 0) + floor) through the tilt interpolation, plus n²·var(b) for the background
 * estimate b (mean of n_b background rows: var(b) = floor / (n_b · smoothing width)).
 *
 * Without background bands (no room beside the signal band) nothing is subtracted.
 *
 * @throws EngineError 'invalid_input' for a wrong dark size, bad bands or options, an all-NaN or
 *   all-saturated frame; 'no_signal' when no signal band can be found.
 */
export function reduceFrame(frame: Frame, options: ReduceOptions): Lineout {
  const opts = resolveReduceOptions(frame, options);
  const geometry = axisGeometry(frame, opts.spectralAxis);
  const L = geometry.spectralLength;
  // The full census pass is for the spatial profile; with the signal band given only its two
  // refusals are needed, and those settle at the first usable pixel.
  let signal: SpatialBand;
  if (opts.signal) {
    refuseUnusable(frame, frameRefusals(frame, opts.dark, opts.saturationLevel), opts.saturationLevel);
    signal = opts.signal;
  } else {
    const census = frameCensus(frame, opts.dark, geometry, opts.saturationLevel);
    refuseUnusable(frame, { allNaN: census.nanCount === census.pixelCount, allSaturated: census.allSaturated }, opts.saturationLevel);
    signal = findSignalBand(census.profile);
  }
  const background = opts.background ?? autoBackgroundBands(signal, geometry.spatialLength);
  for (const band of background) {
    if (band.start < signal.end && signal.start < band.end) {
      throw new EngineError(
        'invalid_input',
        `The background band ${band.start}..${band.end} overlaps the signal band ${signal.start}..${signal.end}.`,
      );
    }
  }

  const sig = sourcedBand(frame, opts.dark, geometry, signal);
  const bgs = background.map((band) => sourcedBand(frame, opts.dark, geometry, band));
  const bgRowCount = background.reduce((n, band) => n + band.end - band.start, 0);

  // Noise floor first (MAD is robust to the hits that rejection will remove).
  // Pedestals are medians of 20 000 samples: taken only when something reads them (the outlier
  // test, a given read noise, a NaN pixel with no finite neighbour).
  const bgPedestal = once(() => (bgs.length > 0 ? bandPedestal(bgs[0].source, bgs[0].band.start, bgs[0].band.end) : 0));
  let floorSigma: number;
  if (opts.readNoise !== undefined) {
    floorSigma = Math.sqrt(opts.readNoise ** 2 + opts.gain * Math.max(bgPedestal(), 0));
  } else {
    floorSigma = noiseFloorFromRows(bgs);
    // No usable background rows: fall back to the signal band's own row differences (lines are
    // smooth along the spatial axis, so the MAD still sees mostly noise).
    if (!Number.isFinite(floorSigma)) floorSigma = noiseFloorFromRows([sig]);
    if (!Number.isFinite(floorSigma)) floorSigma = 0;
  }
  const floorVarScalar = floorSigma * floorSigma;
  const cleanerFor = (s: SourcedBand, pedestal: () => number) =>
    new RowCleaner(s.source, {
      gain: opts.gain,
      floorVariance: floorVarScalar,
      pedestal,
      sigmas: opts.outlierSigma,
      rejectHot: opts.rejectOutliers,
      saturationLevel: opts.saturationLevel,
    });

  // Background per spectral pixel: mean of the cleaned background rows, cleaned row by row.
  let rejected = 0;
  let bg: Float64Array = new Float64Array(L);
  if (bgRowCount > 0) {
    for (const s of bgs) {
      rejected += addCleanRows(cleanerFor(s, bgPedestal), s.band.start, s.band.end, bg);
    }
    for (let p = 0; p < L; p++) bg[p] /= bgRowCount;
    bg = boxcar(bg, opts.backgroundSmoothPx);
  }
  const floorVariance = new Float64Array(L);
  const bgVariance = new Float64Array(L);
  for (let p = 0; p < L; p++) {
    floorVariance[p] = opts.readNoise !== undefined ? opts.readNoise ** 2 + opts.gain * Math.max(bg[p], 0) : floorVarScalar;
    bgVariance[p] = bgRowCount > 0 ? floorVariance[p] / (bgRowCount * opts.backgroundSmoothPx) : 0;
  }

  const summed = sumBand({
    cleaner: cleanerFor(sig, once(() => bandPedestal(sig.source, signal.start, signal.end))),
    signal,
    lineShape: opts.lineShape,
    background: bg,
    backgroundVariance: bgVariance,
    floorVariance,
    gain: opts.gain,
    saturationLevel: opts.saturationLevel,
  });
  rejected += summed.rejected;
  return {
    counts: summed.counts,
    variance: summed.variance,
    saturated: summed.saturated,
    band: summed.band,
    bandRows: summed.bandRows,
    bandBinRows: summed.bandBinRows,
    signal: { ...signal },
    background: background.map((b) => ({ ...b })),
    lineShape: { ...opts.lineShape },
    rejectedPixels: rejected,
    noiseFloorCounts: floorSigma,
  };
}
