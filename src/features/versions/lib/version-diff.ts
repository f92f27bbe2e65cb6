/**
 * Differences between calibration versions, computed in the browser with the engine's
 * evaluateCalibration: at every pixel, how far the map moved, in pixels and in meV.
 */
import { HC_EV_NM } from '../../../../shared/engine/constants.ts';
import { calibrationWavelengthToPixel, evaluateCalibration } from '../../../../shared/engine/dispersion/index.ts';
import type { Calibration } from '../../../../shared/engine/types.ts';

export interface VersionDiff {
  pixel: Float64Array;
  /** E_b(p) − E_a(p): photon energy (first order) version b gives pixel p, minus version a's, meV. */
  shiftMeV: Float64Array;
  /** Where version b puts the wavelength version a gives pixel p, minus p: the spectrum's shift on the camera, px. */
  shiftPx: Float64Array;
}

/** Pixel positions 0 … pixelCount−1 in `steps` samples (the ends included). */
export function samplePixels(pixelCount: number, steps = 256): Float64Array {
  const n = Math.max(2, Math.min(steps, pixelCount));
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) out[i] = ((pixelCount - 1) * i) / (n - 1);
  return out;
}

/**
 * The shift from version a to version b across the camera. The pixel shift inverts b's map at
 * a's wavelengths (NaN where b cannot reach that wavelength on the camera).
 */
export function diffVersions(a: Calibration, b: Calibration, steps = 256): VersionDiff {
  const pixel = samplePixels(Math.max(a.pixelCount, b.pixelCount), steps);
  const la = evaluateCalibration(a, pixel).wavelengthNm;
  const lb = evaluateCalibration(b, pixel).wavelengthNm;
  const shiftMeV = new Float64Array(pixel.length);
  const shiftPx = new Float64Array(pixel.length);
  for (let i = 0; i < pixel.length; i++) {
    shiftMeV[i] = (HC_EV_NM / lb[i] - HC_EV_NM / la[i]) * 1000;
    let p = Number.NaN;
    try {
      p = calibrationWavelengthToPixel(b, la[i]);
    } catch {
      p = Number.NaN;
    }
    shiftPx[i] = p - pixel[i];
  }
  return { pixel, shiftMeV, shiftPx };
}

/** First-order wavelength (nm) of a calibration at given pixels, for the drift chart. */
export function wavelengthsAt(cal: Calibration, pixels: readonly number[]): number[] {
  return Array.from(evaluateCalibration(cal, pixels).wavelengthNm);
}
