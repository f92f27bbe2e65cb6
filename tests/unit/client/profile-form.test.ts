import { describe, expect, it } from 'vitest';
import { parseInstrumentForm, toFormValues, type InstrumentFormValues } from '@/features/instruments/components/profile-form';

// Invented demo geometry (not a real instrument): a flat-field grazing-incidence XUV spectrometer
// with values typical of the trade (common practice: 1200 lines/mm, ~87° incidence, 13.5 µm pixels).
const valid: InstrumentFormValues = {
  name: 'Demo XUV flat-field (invented)',
  description: 'Invented for the tests',
  spectralAxis: 'x',
  grooveDensityPerMm: '1200',
  incidenceAngleDeg: '87',
  detectorDistanceMm: '235',
  pixelPitchUm: '13.5',
  wavelengthIncreasesWithPixel: 'false',
  detectorCenterPixel: '',
  detectorAngleDeg: '',
  detectorTiltDeg: '',
  pixelCount: '2048',
  notes: '',
};

describe('parseInstrumentForm', () => {
  it('turns typed text into the API body with numbers, leaving blank optionals out', () => {
    const result = parseInstrumentForm(valid);
    expect(result.ok).toBe(true);
    if (!result.ok) return;
    expect(result.body.profile).toEqual({
      spectralAxis: 'x',
      grooveDensityPerMm: 1200,
      incidenceAngleDeg: 87,
      detectorDistanceMm: 235,
      pixelPitchUm: 13.5,
      wavelengthIncreasesWithPixel: false,
      pixelCount: 2048,
    });
    expect(result.body.name).toBe('Demo XUV flat-field (invented)');
  });

  it.each([
    ['incidenceAngleDeg', '95', 'incidenceAngleDeg must be between 0 and 90 degrees'],
    ['pixelCount', '2048.5', 'pixelCount must be a whole number'],
    ['pixelPitchUm', '0', 'pixelPitchUm must be positive'],
    ['grooveDensityPerMm', 'abc', 'grooveDensityPerMm must be a number'],
    ['grooveDensityPerMm', '', 'grooveDensityPerMm must be a number'],
    ['detectorAngleDeg', '-120', 'detectorAngleDeg must be between -90 and 90 degrees'],
  ] as const)('reports %s = %j with the shared schema message', (field, text, message) => {
    const result = parseInstrumentForm({ ...valid, [field]: text });
    expect(result.ok).toBe(false);
    if (result.ok) return;
    expect(result.errors[`profile.${field}`]).toBe(message);
    expect(Object.keys(result.errors)).toEqual([`profile.${field}`]);
  });

  it('refuses an empty name', () => {
    const result = parseInstrumentForm({ ...valid, name: '   ' });
    expect(result.ok).toBe(false);
    if (!result.ok) expect(result.errors.name).toBe('name must not be empty');
  });

  it('round-trips an existing instrument through the form values', () => {
    const first = parseInstrumentForm({ ...valid, detectorCenterPixel: '1024', detectorAngleDeg: '-75.5', notes: 'Al filter' });
    if (!first.ok) throw new Error('fixture must be valid');
    const again = parseInstrumentForm(toFormValues(first.body));
    expect(again).toEqual(first);
  });
});
