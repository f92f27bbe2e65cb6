/**
 * The spectrum CSV (`GET /api/frames/:frameId/spectrum.csv`, and the browser's export): one row
 * per spectral pixel, columns documented in the README ("Spectra export"). Numbers are written in
 * JavaScript's shortest round-trip form, so parsing the file gives back the API's numbers exactly.
 */
import type { AppliedSpectrum } from '../engine/apply.ts';

export const SPECTRUM_CSV_COLUMNS = [
  'pixel',
  'wavelength_nm',
  'wavelength_sigma_nm',
  'energy_ev',
  'intensity',
  'intensity_sigma',
  'intensity_per_ev',
  'intensity_per_ev_sigma',
] as const;

function cell(v: number): string {
  return Number.isFinite(v) ? String(v) : '';
}

export function spectrumToCsv(s: Pick<AppliedSpectrum, 'pixel' | 'wavelengthNm' | 'wavelengthSigmaNm' | 'energyEv' | 'intensity' | 'intensitySigma' | 'intensityPerEv' | 'intensityPerEvSigma'>): string {
  const lines = [SPECTRUM_CSV_COLUMNS.join(',')];
  for (let i = 0; i < s.pixel.length; i++) {
    lines.push(
      [s.pixel[i], s.wavelengthNm[i], s.wavelengthSigmaNm[i], s.energyEv[i], s.intensity[i], s.intensitySigma[i], s.intensityPerEv[i], s.intensityPerEvSigma[i]].map(cell).join(','),
    );
  }
  return `${lines.join('\r\n')}\r\n`;
}
