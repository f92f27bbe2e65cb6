/**
 * The model curves of a filter edge on the pixel axis, for the continuum-edge fit: the stack's
 * tabulated transmission on the low- and high-energy side of the edge energy, as the provisional
 * map lays them on the pixels, each blurred by the instrument's line profile (a Gaussian) and
 * integrated over the pixel, on a lattice of 1/SUB px so that shifting the pattern by s is a read
 * with cubic interpolation.
 */
import { HC_EV_NM } from '../constants.ts';
import { evaluateCalibration } from '../dispersion/evaluate.ts';
import { stackTransmission, type Foil } from '../filters/transmission.ts';
import type { Calibration } from '../types.ts';

/** A provisional pixel → first-order wavelength (nm) map: a calibration, or a function. */
export type ProvisionalMap = Calibration | ((pixel: number) => number);

/** Sub-samples per pixel of the model's source: an edge sharper than a pixel is placed to 1/16 px. */
export const SUB = 16;
/** The line profile is summed out to this many σ. */
const PROFILE_SIGMA = 5;

/** First-order wavelengths (nm) of the provisional map at `pixels`. */
export function provisionalWavelengthsNm(map: ProvisionalMap, pixels: Float64Array): Float64Array {
  if (typeof map === 'function') return Float64Array.from(pixels, (p) => map(p));
  return evaluateCalibration(map, pixels).wavelengthNm;
}

/** Standard normal CDF (erf by Abramowitz & Stegun 7.1.26, |error| < 1.5e-7). */
export function phi(z: number): number {
  const x = z / Math.SQRT2;
  const a = Math.abs(x);
  const t = 1 / (1 + 0.3275911 * a);
  const erf = 1 - t * (0.254829592 + t * (-0.284496736 + t * (1.421413741 + t * (-1.453152027 + t * 1.061405429)))) * Math.exp(-a * a);
  return 0.5 * (1 + (x < 0 ? -erf : erf));
}

/** Where `energyEv` falls on the pixel axis of `energies` (linear between pixels), or NaN. */
export function pixelOfEnergy(energies: Float64Array, energyEv: number): number {
  for (let p = 1; p < energies.length; p++) {
    const a = energies[p - 1];
    const b = energies[p];
    if (!Number.isFinite(a) || !Number.isFinite(b) || a === b) continue;
    if ((a - energyEv) * (b - energyEv) <= 0) return p - 1 + (a - energyEv) / (a - b);
  }
  return Number.NaN;
}

/**
 * The blurred low- and high-energy parts of the stack's transmission on a lattice of 1/SUB px:
 * lattice point i sits at pixel x0 + i/SUB of the provisional axis.
 */
export interface EdgeProfiles {
  x0: number;
  low: Float64Array;
  high: Float64Array;
}

export function edgeProfiles(map: ProvisionalMap, foils: readonly Foil[], edgeEv: number, fromPx: number, toPx: number, sigmaPx: number): EdgeProfiles {
  const reach = Math.ceil(PROFILE_SIGMA * sigmaPx) + 1;
  const x0 = Math.floor(fromPx) - reach;
  const cells = (Math.ceil(toPx) + reach - x0) * SUB + 1;
  // Cell j is centred on x0 + j/SUB; its bounds are at x0 + (j ∓ ½)/SUB.
  const bounds = new Float64Array(cells + 1);
  for (let j = 0; j <= cells; j++) bounds[j] = x0 + (j - 0.5) / SUB;
  const boundEv = Float64Array.from(provisionalWavelengthsNm(map, bounds), (nm) => (nm > 0 ? HC_EV_NM / nm : Number.NaN));
  const lowRaw = new Float64Array(cells);
  const highRaw = new Float64Array(cells);
  const justBelow = stackTransmission(foils, edgeEv * (1 - 1e-9));
  const justAbove = stackTransmission(foils, edgeEv * (1 + 1e-9));
  for (let j = 0; j < cells; j++) {
    const e1 = boundEv[j];
    const e2 = boundEv[j + 1];
    if (!Number.isFinite(e1) || !Number.isFinite(e2)) continue;
    const lo = Math.min(e1, e2);
    const hi = Math.max(e1, e2);
    // Each cell carries 1/SUB of a pixel's worth of source; a cell the edge crosses is split.
    if (hi < edgeEv) lowRaw[j] = stackTransmission(foils, (e1 + e2) / 2) / SUB;
    else if (lo >= edgeEv) highRaw[j] = stackTransmission(foils, (e1 + e2) / 2) / SUB;
    else {
      const below = (edgeEv - lo) / (hi - lo);
      lowRaw[j] = (justBelow * below) / SUB;
      highRaw[j] = (justAbove * (1 - below)) / SUB;
    }
  }
  // Pixel response to a point source at offset d (source → pixel centre): a Gaussian integrated over the pixel.
  const half = reach * SUB;
  const kernel = new Float64Array(2 * half + 1);
  for (let m = -half; m <= half; m++) kernel[m + half] = phi((m / SUB + 0.5) / sigmaPx) - phi((m / SUB - 0.5) / sigmaPx);
  const low = new Float64Array(cells);
  const high = new Float64Array(cells);
  for (let i = 0; i < cells; i++) {
    let l = 0;
    let h = 0;
    const jLo = Math.max(0, i - half);
    const jHi = Math.min(cells - 1, i + half);
    for (let j = jLo; j <= jHi; j++) {
      const k = kernel[i - j + half];
      l += lowRaw[j] * k;
      h += highRaw[j] * k;
    }
    low[i] = l;
    high[i] = h;
  }
  return { x0, low, high };
}

/** Catmull-Rom value and derivative (per lattice step) of `f` at fractional index t. */
export function cubicAt(f: Float64Array, t: number): [number, number] {
  const i = Math.floor(t);
  const x = t - i;
  const last = f.length - 1;
  // Clamped neighbours (no closure: this runs for every pixel of every trial).
  const p0 = f[i - 1 < 0 ? 0 : i - 1 > last ? last : i - 1];
  const p1 = f[i < 0 ? 0 : i > last ? last : i];
  const p2 = f[i + 1 < 0 ? 0 : i + 1 > last ? last : i + 1];
  const p3 = f[i + 2 < 0 ? 0 : i + 2 > last ? last : i + 2];
  const a = -0.5 * p0 + 1.5 * p1 - 1.5 * p2 + 0.5 * p3;
  const b = p0 - 2.5 * p1 + 2 * p2 - 0.5 * p3;
  const c = -0.5 * p0 + 0.5 * p2;
  return [((a * x + b) * x + c) * x + p1, (3 * a * x + 2 * b) * x + c];
}
