/**
 * The viewer's camera: image pixels → screen by a uniform scale and an offset. Pure kernels
 * (no React, no Konva) so zoom and pan are tested as tables.
 */

/** Screen = image · scale + offset (screen pixels). */
export interface ViewTransform {
  scale: number;
  offsetX: number;
  offsetY: number;
}

export const MIN_SCALE = 0.05;
export const MAX_SCALE = 64;

/** The transform that fits a width × height image inside a viewport, centred. */
export function fitView(imageWidthPx: number, imageHeightPx: number, viewportWidthPx: number, viewportHeightPx: number): ViewTransform {
  const scale = Math.min(MAX_SCALE, Math.max(MIN_SCALE, Math.min(viewportWidthPx / imageWidthPx, viewportHeightPx / imageHeightPx)));
  return {
    scale,
    // Pixel centres sit at integers, so the image spans [-0.5, width - 0.5].
    offsetX: (viewportWidthPx - imageWidthPx * scale) / 2 + 0.5 * scale,
    offsetY: (viewportHeightPx - imageHeightPx * scale) / 2 + 0.5 * scale,
  };
}

/**
 * Zooms by `factor` keeping the image point under the screen point (`screenX`, `screenY`) fixed,
 * the scale clamped to [MIN_SCALE, MAX_SCALE].
 */
export function zoomAbout(view: ViewTransform, factor: number, screenX: number, screenY: number): ViewTransform {
  const scale = Math.min(MAX_SCALE, Math.max(MIN_SCALE, view.scale * factor));
  const imageX = (screenX - view.offsetX) / view.scale;
  const imageY = (screenY - view.offsetY) / view.scale;
  return { scale, offsetX: screenX - imageX * scale, offsetY: screenY - imageY * scale };
}

/** Image coordinates (pixels, centres at integers) of a screen point. */
export function screenToImage(view: ViewTransform, screenX: number, screenY: number): { x: number; y: number } {
  return { x: (screenX - view.offsetX) / view.scale, y: (screenY - view.offsetY) / view.scale };
}

/** The wheel-zoom factor for a wheel delta (one notch ≈ 100 units ≈ ×1.2), smooth for trackpads. */
export function wheelZoomFactor(deltaY: number): number {
  return Math.exp(-deltaY * 0.0018);
}
