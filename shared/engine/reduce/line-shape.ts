import { EngineError } from '../errors.ts';
import { findPeaks } from '../peaks/index.ts';
import type { Frame, LineShape } from '../types.ts';
import type { ReduceOptions } from './options.ts';
import { reduceFrame } from './reduce-frame.ts';

/** Options of {@link estimateLineShape}: the reduction options (its lineShape is ignored) and a few more. */
export interface LineShapeOptions extends ReduceOptions {
  /** Use at most this many of the strongest unsaturated lines. @default 8 */
  maxLines?: number;
  /** Band rows summed per centroid point. @default about a sixteenth of the band, at least 1 */
  rowsPerBin?: number;
  /** Lines need at least this snr in the lineout. @default 10 */
  minSnr?: number;
}

/** A measured line shape with its 1-sigma uncertainties; usable directly as a {@link LineShape}. */
export interface LineShapeEstimate extends LineShape {
  tiltSigmaPxPerPx: number;
  curvatureSigmaPxPerPx2: number;
  linesUsed: number;
  pointsUsed: number;
}

interface Point {
  line: number;
  offset: number;
  centroid: number;
  weight: number;
}

/** Windowed centroid of `profile` around `guess`, recentred a few times; null when the window holds no flux. */
function centroid(profile: Float64Array, guess: number, halfWidth: number): { centre: number; flux: number; second: number } | null {
  let centre = guess;
  let flux = 0;
  let second = 0;
  for (let iter = 0; iter < 4; iter++) {
    const lo = Math.max(0, Math.round(centre - halfWidth));
    const hi = Math.min(profile.length - 1, Math.round(centre + halfWidth));
    let s0 = 0;
    let s1 = 0;
    let s2 = 0;
    for (let p = lo; p <= hi; p++) {
      const v = profile[p] > 0 ? profile[p] : 0;
      s0 += v;
      s1 += v * p;
      s2 += v * p * p;
    }
    if (!(s0 > 0)) return null;
    centre = s1 / s0;
    flux = s0;
    second = Math.max(s2 / s0 - centre * centre, 0.01);
  }
  return { centre, flux, second };
}

/**
 * Measures line tilt and curvature from the bright lines of a frame: reduce without correction,
 * take the strongest unsaturated peaks, follow each line's windowed centroid through bins of
 * band rows (outward from the band centre, each bin starting from its neighbour's centroid), and
 * fit centroid = p_line + tilt·o + curvature·o² jointly over all lines (one intercept per line)
 * by weighted least squares, weights ∝ flux / second moment (centroid variance ≈ σ²/N).
 * Uncertainties are scaled by the reduced chi².
 *
 * @throws EngineError 'no_peaks' when no line is bright enough; 'fit_failed' when too few
 *   centroid points remain; and whatever {@link reduceFrame} throws.
 */
export function estimateLineShape(frame: Frame, options: LineShapeOptions): LineShapeEstimate {
  const lineout = reduceFrame(frame, { ...options, lineShape: { tiltPxPerPx: 0, curvaturePxPerPx2: 0 } });
  const maxLines = options.maxLines ?? 8;
  const peaks = findPeaks(lineout, { minSnr: options.minSnr ?? 10 })
    .filter((p) => !p.saturated)
    .sort((a, b) => b.area - a.area)
    .slice(0, maxLines);
  if (peaks.length === 0) {
    throw new EngineError('no_peaks', 'No unsaturated line is bright enough to measure the line tilt; give the line shape by hand.');
  }
  const L = lineout.counts.length;
  const rows = lineout.bandRows;
  const binRows = Math.max(1, options.rowsPerBin ?? Math.round(rows / 16));
  const nBins = Math.floor(rows / binRows);
  const centreRow = 0.5 * (rows - 1);
  const bins: { offset: number; profile: Float64Array }[] = [];
  for (let b = 0; b < nBins; b++) {
    const profile = new Float64Array(L);
    let offset = 0;
    for (let r = b * binRows; r < (b + 1) * binRows; r++) {
      offset += r - centreRow;
      const base = r * L;
      for (let p = 0; p < L; p++) profile[p] += lineout.band[base + p];
    }
    bins.push({ offset: offset / binRows, profile });
  }
  const middle = bins.reduce((best, bin, i) => (Math.abs(bin.offset) < Math.abs(bins[best].offset) ? i : best), 0);
  const points: Point[] = [];
  const floor2 = (lineout.noiseFloorCounts ?? 0) ** 2;
  peaks.forEach((peak, line) => {
    const halfWidth = Math.max(3, 1.5 * peak.fwhmPx);
    const follow = (from: number, to: number, stepDir: number) => {
      let guess = peak.pixel;
      for (let b = from; b !== to; b += stepDir) {
        const c = centroid(bins[b].profile, guess, halfWidth);
        if (!c) continue;
        // Only points with the line clearly above the noise of the window.
        const noise = Math.sqrt((2 * halfWidth + 1) * binRows * floor2 + c.flux);
        if (c.flux < 5 * noise) continue;
        guess = c.centre;
        points.push({ line, offset: bins[b].offset, centroid: c.centre, weight: c.flux / c.second });
      }
    };
    follow(middle, bins.length, 1);
    follow(middle - 1, -1, -1);
  });
  const nLines = peaks.length;
  if (points.length < nLines + 3) {
    throw new EngineError(
      'fit_failed',
      `Only ${points.length} centroid points from ${nLines} lines; at least ${nLines + 3} are needed to fit tilt and curvature.`,
    );
  }
  // Remove each line's weighted means (its intercept), then solve the 2x2 system for tilt, curvature.
  const sums = Array.from({ length: nLines }, () => ({ w: 0, o: 0, o2: 0, c: 0 }));
  for (const pt of points) {
    const s = sums[pt.line];
    s.w += pt.weight;
    s.o += pt.weight * pt.offset;
    s.o2 += pt.weight * pt.offset * pt.offset;
    s.c += pt.weight * pt.centroid;
  }
  let a11 = 0;
  let a12 = 0;
  let a22 = 0;
  let b1 = 0;
  let b2 = 0;
  const centred = points.map((pt) => {
    const s = sums[pt.line];
    const u = pt.offset - s.o / s.w;
    const v = pt.offset * pt.offset - s.o2 / s.w;
    const c = pt.centroid - s.c / s.w;
    a11 += pt.weight * u * u;
    a12 += pt.weight * u * v;
    a22 += pt.weight * v * v;
    b1 += pt.weight * u * c;
    b2 += pt.weight * v * c;
    return { u, v, c, w: pt.weight };
  });
  const det = a11 * a22 - a12 * a12;
  if (!(det > 1e-12 * a11 * a22)) {
    throw new EngineError('fit_failed', 'The centroid offsets do not span enough of the band to separate tilt from curvature.');
  }
  const tilt = (a22 * b1 - a12 * b2) / det;
  const curvature = (a11 * b2 - a12 * b1) / det;
  let chi = 0;
  for (const q of centred) chi += q.w * (q.c - tilt * q.u - curvature * q.v) ** 2;
  const dof = points.length - nLines - 2;
  const scale = dof > 0 ? chi / dof : 1;
  return {
    tiltPxPerPx: tilt,
    curvaturePxPerPx2: curvature,
    tiltSigmaPxPerPx: Math.sqrt((a22 / det) * scale),
    curvatureSigmaPxPerPx2: Math.sqrt((a11 / det) * scale),
    linesUsed: new Set(points.map((p) => p.line)).size,
    pointsUsed: points.length,
  };
}
