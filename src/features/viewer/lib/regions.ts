/**
 * Region maths for the viewer: bands across the spatial axis (inclusive start, exclusive end,
 * in rows of the spatial axis), and the line shape (tilt, curvature) from two handles. Pure
 * kernels: each takes the current state and returns a new one, never mutating its input.
 */
import type { LineShape, SpatialBand } from '../../../../shared/engine/types.ts';

/** The regions saved with a frame or as an instrument's default (contract: frames.regions). */
export interface Regions {
  signal: SpatialBand;
  background: SpatialBand[];
  lineShape: LineShape;
}

export const NO_LINE_SHAPE: LineShape = { tiltPxPerPx: 0, curvaturePxPerPx2: 0 };

/** A band from a drag between two spatial coordinates (pixel centres at integers), at least one row, inside [0, spatialLength). */
export function bandFromDrag(fromPx: number, toPx: number, spatialLength: number): SpatialBand {
  const a = Math.round(Math.min(fromPx, toPx));
  const b = Math.round(Math.max(fromPx, toPx)) + 1;
  const start = Math.min(Math.max(0, a), spatialLength - 1);
  const end = Math.max(start + 1, Math.min(spatialLength, b));
  return { start, end };
}

/** The band shifted by `deltaPx` rows (rounded), kept whole inside [0, spatialLength). */
export function moveBand(band: SpatialBand, deltaPx: number, spatialLength: number): SpatialBand {
  const height = band.end - band.start;
  const start = Math.min(Math.max(0, band.start + Math.round(deltaPx)), spatialLength - height);
  return { start, end: start + height };
}

/** The band with one edge moved to `edgePx` (a boundary between rows), at least one row high. */
export function resizeBand(band: SpatialBand, edge: 'start' | 'end', edgePx: number, spatialLength: number): SpatialBand {
  const at = Math.round(edgePx);
  if (edge === 'start') return { start: Math.min(Math.max(0, at), band.end - 1), end: band.end };
  return { start: band.start, end: Math.max(band.start + 1, Math.min(spatialLength, at)) };
}

/** Whether two bands share a row. */
export function bandsOverlap(a: SpatialBand, b: SpatialBand): boolean {
  return a.start < b.end && b.start < a.end;
}

/** Background bands that would overlap the signal, which the engine refuses: named for the user. */
export function overlappingBackground(regions: Regions): SpatialBand[] {
  return regions.background.filter((b) => bandsOverlap(b, regions.signal));
}

/** Centre of a band along the spatial axis (the line shape's s = 0), in pixel coordinates. */
export function bandCentrePx(band: SpatialBand): number {
  return (band.start + band.end - 1) / 2;
}

/**
 * Spectral shift of a line at spatial offset `s` from the signal band centre:
 * tilt·s + curvature·s² (the engine's LineShape convention, shared/engine/types.ts).
 */
export function lineShiftPx(shape: LineShape, sPx: number): number {
  return shape.tiltPxPerPx * sPx + shape.curvaturePxPerPx2 * sPx * sPx;
}

/**
 * The line shape through two handles at offsets −h and +h from the band centre whose spectral
 * shifts from the centre point are `shiftTopPx` (at −h) and `shiftBottomPx` (at +h):
 * tilt = (b − t)/(2h), curvature = (b + t)/(2h²).
 */
export function lineShapeFromHandles(shiftTopPx: number, shiftBottomPx: number, halfHeightPx: number): LineShape {
  if (!(halfHeightPx > 0)) return NO_LINE_SHAPE;
  return {
    tiltPxPerPx: (shiftBottomPx - shiftTopPx) / (2 * halfHeightPx),
    curvaturePxPerPx2: (shiftBottomPx + shiftTopPx) / (2 * halfHeightPx * halfHeightPx),
  };
}

/** Default regions when nothing is saved: the middle third as signal, a band near each edge as background. */
export function defaultRegions(spatialLength: number): Regions {
  const third = Math.max(1, Math.floor(spatialLength / 3));
  const edge = Math.max(1, Math.floor(spatialLength / 10));
  const signal = { start: third, end: Math.min(spatialLength, 2 * third) };
  const background: SpatialBand[] = [];
  if (signal.start - edge >= 1) background.push({ start: 0, end: edge });
  if (spatialLength - edge >= signal.end + 1) background.push({ start: spatialLength - edge, end: spatialLength });
  return { signal, background, lineShape: NO_LINE_SHAPE };
}

/** Spectral and spatial lengths of a frame for a spectral axis. */
export function axisLengths(widthPx: number, heightPx: number, spectralAxis: 'x' | 'y'): { spectralLength: number; spatialLength: number } {
  return spectralAxis === 'x' ? { spectralLength: widthPx, spatialLength: heightPx } : { spectralLength: heightPx, spatialLength: widthPx };
}
