/**
 * Mapping between (spectral, spatial) coordinates and image (x, y) for either spectral axis,
 * so the overlay code is written once.
 */
export type SpectralAxis = 'x' | 'y';

/** Image (x, y) of a point given along the spectral and spatial axes. */
export function toImageXY(axis: SpectralAxis, spectralPx: number, spatialPx: number): { x: number; y: number } {
  return axis === 'x' ? { x: spectralPx, y: spatialPx } : { x: spatialPx, y: spectralPx };
}

/** Spectral and spatial coordinates of an image point. */
export function fromImageXY(axis: SpectralAxis, x: number, y: number): { spectralPx: number; spatialPx: number } {
  return axis === 'x' ? { spectralPx: x, spatialPx: y } : { spectralPx: y, spatialPx: x };
}

/** Image rectangle of a band [start, end) across the whole spectral axis (pixel centres at integers). */
export function bandRect(axis: SpectralAxis, start: number, end: number, spectralLength: number): { x: number; y: number; width: number; height: number } {
  return axis === 'x'
    ? { x: -0.5, y: start - 0.5, width: spectralLength, height: end - start }
    : { x: start - 0.5, y: -0.5, width: end - start, height: spectralLength };
}
