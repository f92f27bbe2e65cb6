/** The demo lab's two instruments and who belongs to them (INVENTED demo data). */
import type { InstrumentProfileInput } from '../../../shared/api/instrument-profile.ts';
import type { Role } from '../../../shared/api/members.ts';

/** The demo sign-ins that hold roles on the demo instruments (seed.ts has the accounts). */
type DemoEmail = 'owner@orderly.test' | 'scientist@orderly.test' | 'student@orderly.test' | 'viewer@orderly.test';

/**
 * Nominal profiles, invented for the demo but of realistic size. XUV: a 1200 l/mm flat-field
 * grazing-incidence grating at 87° incidence, camera 235 mm away, 2048 × 13.5 µm pixels; the
 * central ray at β = 77.1° gives about 10–32 nm across the chip, wavelength falling with pixel.
 * VUV: a 300 l/mm normal-incidence grating at 10°, 1 m to the camera, about 44–136 nm (harmonics 7–17 of 800 nm).
 */
export const demoInstruments: { name: string; description: string; profile: InstrumentProfileInput; members: Partial<Record<DemoEmail, Role>> }[] = [
  {
    name: 'XUV flat-field spectrometer (demo)',
    description: 'Invented demo instrument of the fictional Lindqvist Attosecond Lab: grazing-incidence flat-field spectrometer behind the HHG gas cell.',
    profile: {
      spectralAxis: 'x',
      grooveDensityPerMm: 1200,
      incidenceAngleDeg: 87,
      detectorDistanceMm: 235,
      pixelPitchUm: 13.5,
      wavelengthIncreasesWithPixel: false,
      detectorCenterPixel: 1023.5,
      detectorAngleDeg: 77.1,
      pixelCount: 2048,
      notes: 'Invented demo data: nominal values only, not a real instrument.',
    },
    members: {
      'owner@orderly.test': 'owner',
      'scientist@orderly.test': 'scientist',
      'student@orderly.test': 'student',
      'viewer@orderly.test': 'viewer',
    },
  },
  {
    name: 'VUV normal-incidence spectrometer (demo)',
    description: 'Invented demo instrument of the fictional Lindqvist Attosecond Lab: 1 m normal-incidence spectrometer for low harmonics.',
    profile: {
      spectralAxis: 'x',
      grooveDensityPerMm: 300,
      incidenceAngleDeg: 10,
      detectorDistanceMm: 1000,
      pixelPitchUm: 13.5,
      wavelengthIncreasesWithPixel: true,
      detectorCenterPixel: 1023.5,
      detectorAngleDeg: 8.43,
      pixelCount: 2048,
      notes: 'Invented demo data: nominal values only, not a real instrument.',
    },
    members: { 'owner@orderly.test': 'owner', 'scientist@orderly.test': 'scientist' },
  },
];

