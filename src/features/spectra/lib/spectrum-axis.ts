/**
 * The two views of one applied spectrum: counts per pixel against first-order wavelength, or
 * counts per eV (the server's intensityPerEv = intensity / |dE/dp|, the Jacobian) against photon
 * energy. Pure: no React, no uPlot; x is returned ascending because uPlot expects sorted x.
 */
import type { AppliedOrder, AppliedSpectrum } from '../../../../shared/engine/apply.ts';

export type SpectrumAxis = 'wavelength' | 'energy';

export interface AxisSeries {
  x: number[];
  y: number[];
  ySigma: number[];
  xLabel: string;
  yLabel: string;
  /** Position in `x`/`y` of each spectral pixel (x is reordered when the axis runs backwards). */
  indexOfPixel: number[];
}

type SpectrumArrays = Pick<AppliedSpectrum, 'wavelengthNm' | 'energyEv' | 'intensity' | 'intensitySigma' | 'intensityPerEv' | 'intensityPerEvSigma'>;

export const AXIS_LABELS: Record<SpectrumAxis, { x: string; y: string }> = {
  wavelength: { x: 'wavelength (nm, first order)', y: 'intensity (counts / pixel)' },
  energy: { x: 'photon energy (eV, first order)', y: 'intensity (counts / eV)' },
};

export function axisSeries(s: SpectrumArrays, axis: SpectrumAxis): AxisSeries {
  const n = s.wavelengthNm.length;
  const xs = axis === 'wavelength' ? s.wavelengthNm : s.energyEv;
  const ys = axis === 'wavelength' ? s.intensity : s.intensityPerEv;
  const sig = axis === 'wavelength' ? s.intensitySigma : s.intensityPerEvSigma;
  const ascending = n < 2 || xs[n - 1] >= xs[0];
  const order = Array.from({ length: n }, (_, i) => (ascending ? i : n - 1 - i));
  const indexOfPixel = new Array<number>(n);
  order.forEach((pixel, k) => (indexOfPixel[pixel] = k));
  return {
    x: order.map((i) => xs[i]),
    y: order.map((i) => ys[i]),
    ySigma: order.map((i) => sig[i]),
    xLabel: AXIS_LABELS[axis].x,
    yLabel: AXIS_LABELS[axis].y,
    indexOfPixel,
  };
}

/** Linear interpolation of a per-pixel array at a fractional pixel. */
export function atPixel(values: ArrayLike<number>, pixel: number): number {
  const n = values.length;
  if (n === 0) return Number.NaN;
  const p = Math.min(n - 1, Math.max(0, pixel));
  const i = Math.min(n - 2, Math.floor(p));
  if (n === 1) return values[0];
  const f = p - i;
  return values[i] * (1 - f) + values[i + 1] * f;
}

export interface OrderLabel {
  x: number;
  y: number;
  text: string;
  detected: boolean;
}

/** "H23" for first-order lines, "H11 (m=2)" for a second diffraction order image. */
export function orderName(o: Pick<AppliedOrder, 'harmonic' | 'diffractionOrder'>): string {
  return o.diffractionOrder === 1 ? `H${o.harmonic}` : `H${o.harmonic} (m=${o.diffractionOrder})`;
}

/**
 * A label at each detected order: x on the chosen axis at the line's pixel, y the highest value
 * within ±2 px (the label sits on the peak top, not on a flank).
 */
export function orderLabels(s: SpectrumArrays & Pick<AppliedSpectrum, 'orders'>, axis: SpectrumAxis): OrderLabel[] {
  const xs = axis === 'wavelength' ? s.wavelengthNm : s.energyEv;
  const ys = axis === 'wavelength' ? s.intensity : s.intensityPerEv;
  const n = xs.length;
  return s.orders
    .filter((o) => o.detected && o.pixel >= 0 && o.pixel <= n - 1)
    .map((o) => {
      let top = Number.NEGATIVE_INFINITY;
      for (let i = Math.max(0, Math.floor(o.pixel) - 2); i <= Math.min(n - 1, Math.ceil(o.pixel) + 2); i++) top = Math.max(top, ys[i]);
      return { x: atPixel(xs, o.pixel), y: top, text: orderName(o), detected: o.detected };
    });
}
