/**
 * Full width at half maximum of a line in a lineout, measured where the counts first fall below
 * half the peak value on each side (linear interpolation between pixels), and converted to eV
 * with the local |dE/dp|. The engine's output holds centroids and yields, not widths, so the
 * width is measured here from the same numbers the chart shows.
 */
export interface LineWidth {
  fwhmPx: number;
  fwhmEv: number;
}

/**
 * @param counts background-subtracted counts per pixel
 * @param energyEv photon energy at each pixel (first order)
 * @param pixel the line's centre (fractional)
 * @param maxHalfWidthPx give up (null) when half maximum is not reached within this distance
 */
export function lineFwhm(counts: ArrayLike<number>, energyEv: ArrayLike<number>, pixel: number, maxHalfWidthPx = 40): LineWidth | null {
  const n = counts.length;
  if (n < 3 || !(pixel >= 0 && pixel <= n - 1)) return null;
  // The top within ±2 px of the given centre.
  let top = Math.round(pixel);
  for (let i = Math.max(0, Math.round(pixel) - 2); i <= Math.min(n - 1, Math.round(pixel) + 2); i++) if (counts[i] > counts[top]) top = i;
  const peak = counts[top];
  if (!(peak > 0)) return null;
  const half = peak / 2;
  const crossing = (step: 1 | -1): number | null => {
    for (let k = 1; k <= maxHalfWidthPx; k++) {
      const i = top + step * k;
      if (i < 0 || i >= n) return null;
      if (counts[i] <= half) {
        const prev = counts[i - step];
        const f = (prev - half) / (prev - counts[i]);
        return i - step + step * f;
      }
    }
    return null;
  };
  const left = crossing(-1);
  const right = crossing(1);
  if (left === null || right === null) return null;
  const fwhmPx = right - left;
  const i = Math.min(n - 2, Math.max(0, Math.floor(top)));
  const dEdp = Math.abs(energyEv[i + 1] - energyEv[i]);
  return { fwhmPx, fwhmEv: fwhmPx * dEdp };
}
