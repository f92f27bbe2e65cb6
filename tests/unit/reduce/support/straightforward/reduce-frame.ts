/** Test reference only (see README.md): the first, copy-based reduction. */
import { EngineError } from '../../../../../shared/engine/errors.ts';
import type { Frame, Lineout, SpatialBand } from '../../../../../shared/engine/types.ts';
import { autoBackgroundBands, findSignalBand } from '../../../../../shared/engine/reduce/bands.ts';
import { noiseFloorFromRows } from './noise.ts';
import { type ReduceOptions, resolveReduceOptions } from '../../../../../shared/engine/reduce/options.ts';
import { rejectOutliers, stripPedestal } from './outliers.ts';
import { type AxisGeometry, type Strip, axisGeometry, extractStrip, frameCensus } from './strip.ts';
import { sumBand } from './sum-band.ts';


/** Rows read beyond each band edge so that edge pixels have spatial neighbours for rejection. */
const MARGIN_ROWS = 2;

interface BandStrip {
  strip: Strip;
  /** Strip rows [rowStart, rowEnd) are the band itself; the rest is margin. */
  rowStart: number;
  rowEnd: number;
}

function bandStrip(frame: Frame, dark: Frame | undefined, geometry: AxisGeometry, band: SpatialBand, saturationLevel: number): BandStrip {
  const start = Math.max(0, band.start - MARGIN_ROWS);
  const end = Math.min(geometry.spatialLength, band.end + MARGIN_ROWS);
  const strip = extractStrip(frame, dark, geometry, start, end, saturationLevel);
  return { strip, rowStart: band.start - start, rowEnd: band.end - start };
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
export function reduceFrameStraightforward(frame: Frame, options: ReduceOptions): Lineout {
  const opts = resolveReduceOptions(frame, options);
  const geometry = axisGeometry(frame, opts.spectralAxis);
  const L = geometry.spectralLength;
  const census = frameCensus(frame, opts.dark, geometry, opts.saturationLevel);
  if (census.nanCount === census.pixelCount) {
    throw new EngineError('invalid_input', `Every pixel of the ${frame.width}x${frame.height} frame is NaN; there is nothing to reduce.`);
  }
  if (census.allSaturated) {
    throw new EngineError(
      'invalid_input',
      `Every pixel of the ${frame.width}x${frame.height} frame is at or above the saturation level ${opts.saturationLevel}; the exposure is unusable.`,
    );
  }
  const signal = opts.signal ?? findSignalBand(census.profile);
  const background = opts.background ?? autoBackgroundBands(signal, geometry.spatialLength);
  for (const band of background) {
    if (band.start < signal.end && signal.start < band.end) {
      throw new EngineError(
        'invalid_input',
        `The background band ${band.start}..${band.end} overlaps the signal band ${signal.start}..${signal.end}.`,
      );
    }
  }

  const sig = bandStrip(frame, opts.dark, geometry, signal, opts.saturationLevel);
  const bgs = background.map((band) => bandStrip(frame, opts.dark, geometry, band, opts.saturationLevel));
  const bgRowCount = background.reduce((n, band) => n + band.end - band.start, 0);

  // Noise floor first (MAD is robust to the hits that rejection will remove).
  const bgPedestal = bgs.length > 0 ? stripPedestal(bgs[0].strip, bgs[0].rowStart, bgs[0].rowEnd) : 0;
  let floorSigma: number;
  if (opts.readNoise !== undefined) {
    floorSigma = Math.sqrt(opts.readNoise ** 2 + opts.gain * Math.max(bgPedestal, 0));
  } else {
    floorSigma = noiseFloorFromRows(bgs);
    // No usable background rows: fall back to the signal band's own row differences (lines are
    // smooth along the spatial axis, so the MAD still sees mostly noise).
    if (!Number.isFinite(floorSigma)) floorSigma = noiseFloorFromRows([sig]);
    if (!Number.isFinite(floorSigma)) floorSigma = 0;
  }
  const floorVarScalar = floorSigma * floorSigma;

  let rejected = 0;
  for (const s of [...bgs, sig]) {
    rejected += rejectOutliers(s.strip, {
      rowStart: s.rowStart,
      rowEnd: s.rowEnd,
      gain: opts.gain,
      floorVariance: floorVarScalar,
      pedestal: s === sig ? stripPedestal(s.strip, s.rowStart, s.rowEnd) : bgPedestal,
      sigmas: opts.outlierSigma,
      rejectHot: opts.rejectOutliers,
    });
  }

  // Background per spectral pixel: mean of the (cleaned) background rows.
  let bg: Float64Array = new Float64Array(L);
  if (bgRowCount > 0) {
    for (const s of bgs) {
      const v = s.strip.values;
      for (let r = s.rowStart; r < s.rowEnd; r++) {
        const base = r * L;
        for (let p = 0; p < L; p++) bg[p] += v[base + p];
      }
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
    strip: sig.strip,
    rowOffset: sig.rowStart,
    signal,
    lineShape: opts.lineShape,
    background: bg,
    backgroundVariance: bgVariance,
    floorVariance,
    gain: opts.gain,
  });
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
