/**
 * The grating equation m·λ = d·(sin α − sin β) (common practice; any optics text) checked by a
 * worked example, and grating.ts's forward/inverse pair checked for round-trips.
 */
import { describe, expect, it } from 'vitest';
import { pixelToWavelengthNm, wavelengthToPixel } from '../../../shared/engine/grating.ts';
import type { GratingGeometry } from '../../../shared/engine/types.ts';

const base: GratingGeometry = {
  grooveDensityPerMm: 1200,
  incidenceAngleDeg: 87,
  detectorDistanceMm: 470,
  pixelPitchUm: 13.5,
  wavelengthIncreasesWithPixel: true,
  detectorCenterPixel: 1000,
  detectorAngleDeg: 80.66,
  detectorTiltDeg: 0,
};

describe('grating equation', () => {
  it('worked example: 1200 l/mm, α = 87°, β = 80.66° → λ = 9.9057 nm', () => {
    // By hand: d = 1e6/1200 = 833.333 nm; sin 87° = 0.998630; sin 80.66° = cos 9.34° = 0.986743
    // (cos x ≈ 1 − x²/2 + x⁴/24 with x = 0.163014 rad); λ = 833.333 × 0.011887 = 9.9057 nm.
    expect(pixelToWavelengthNm(base, 1000)).toBeCloseTo(9.9057, 3);
  });
  it('normal-incidence example: 600 l/mm, α = 10°, β = 5° → λ = 144.154 nm', () => {
    // By hand: d = 1666.667 nm; sin 10° = 0.173648, sin 5° = 0.087156; λ = 1666.667 × 0.086492 = 144.154 nm.
    const g = { ...base, grooveDensityPerMm: 600, incidenceAngleDeg: 10, detectorAngleDeg: 5 };
    expect(pixelToWavelengthNm(g, 1000)).toBeCloseTo(144.154, 2);
  });

  const geometries: Array<[string, GratingGeometry]> = [
    ['grazing, untilted', base],
    ['grazing, tilted 12°, wavelength falling with pixel', { ...base, detectorTiltDeg: 12, wavelengthIncreasesWithPixel: false, detectorAngleDeg: 78 }],
    ['near-normal incidence α = 10°', { ...base, grooveDensityPerMm: 600, incidenceAngleDeg: 10, detectorAngleDeg: 5, detectorDistanceMm: 1000 }],
    ['short arm, tilted −20°', { ...base, detectorDistanceMm: 235, detectorTiltDeg: -20, pixelPitchUm: 20 }],
  ];
  it.each(geometries)('%s: pixel → λ → pixel round-trips to 1e-9 px, also in order 2', (_name, g) => {
    for (const p of [0, 137.25, 1000, 1523.5, 2047]) {
      const lambda = pixelToWavelengthNm(g, p);
      expect(Math.abs(wavelengthToPixel(g, lambda) - p)).toBeLessThan(1e-9);
      // Order 2 of λ/2 lands where λ lands in first order.
      expect(Math.abs(wavelengthToPixel(g, lambda / 2, 2) - p)).toBeLessThan(1e-9);
      expect(pixelToWavelengthNm(g, p, 2)).toBeCloseTo(lambda / 2, 12);
    }
  });
});
