// The field peak-list helper for the assigner's regime tests: the regimes it is asked for are the
// ones it builds, and its peaks sit where the grating equation puts them.
import { describe, expect, it } from 'vitest';
import { HC_EV_NM } from '../../../shared/engine/constants.ts';
import { pixelToWavelengthNm } from '../../../shared/engine/grating.ts';
import { FIELD_XUV_PROFILE, fieldPeakList } from './field-peaks.ts';

describe('fieldPeakList', () => {
  it('defaults: odd harmonics on the 2048 px detector (about 23-59 of 800 nm), a 12° tilt the profile does not state', () => {
    const f = fieldPeakList();
    const harmonics = f.truth.map((t) => t.harmonic as number);
    expect(harmonics.every((q) => q % 2 === 1 && q >= 15 && q <= 61)).toBe(true);
    expect(Math.min(...harmonics)).toBeGreaterThanOrEqual(21);
    expect(Math.max(...harmonics)).toBeLessThanOrEqual(61);
    expect(f.peaks.length).toBeGreaterThanOrEqual(15);
    expect(f.geometry.detectorTiltDeg).toBe(12);
    expect(f.profile.detectorTiltDeg).toBeUndefined();
    expect(f.input).toMatchObject({ driverNm: 800, driverTolerancePct: 0.3, parity: 'odd', pixelCount: 2048 });
    expect(f.profile.grooveDensityPerMm).toBe(1200);
  });

  it('each first-order peak sits within 5σ of where the grating equation puts λ0_eff/q (first-order wavelength read back at the peak)', () => {
    const f = fieldPeakList({ tiltDeg: 14, driverTrueNm: 805, distanceRelative: 0.08, angleOffsetDeg: 0.3, seed: 9 });
    f.peaks.forEach((p, i) => {
      const q = f.truth[i].harmonic as number;
      const nm = pixelToWavelengthNm(f.geometry, p.pixel, 1);
      const dispersion = Math.abs(pixelToWavelengthNm(f.geometry, p.pixel + 0.5, 1) - pixelToWavelengthNm(f.geometry, p.pixel - 0.5, 1));
      expect(Math.abs(nm - 805 / q) / dispersion).toBeLessThan(5 * p.pixelSigma + 1e-9);
    });
  });

  it('builds the regime asked for: stated tilt, angle offset with the angle given, distance off, a laser off its nameplate, blue shift', () => {
    const f = fieldPeakList({ tiltDeg: 14, statedTiltDeg: 12.5, angleOffsetDeg: -0.3, distanceRelative: 0.08, driverTrueNm: 805, blueShiftRelative: 0.005 });
    expect(f.profile.detectorTiltDeg).toBe(12.5);
    expect(f.profile.detectorAngleDeg).toBe(FIELD_XUV_PROFILE.detectorAngleDeg);
    expect(f.geometry.detectorAngleDeg).toBeCloseTo((FIELD_XUV_PROFILE.detectorAngleDeg as number) - 0.3, 12);
    expect(f.geometry.detectorDistanceMm).toBeCloseTo(235 * 1.08, 9);
    expect(f.effectiveDriverNm).toBeCloseTo(805 * 0.995, 9);
    expect(f.input.driverNm).toBe(800);
    expect(fieldPeakList({ statesDetectorAngle: false }).profile.detectorAngleDeg).toBeUndefined();
  });

  it('adds m = 2 lines, parity-all evens, stray peaks and filters on request, and drops missing orders', () => {
    const f = fieldPeakList({ parity: 'all', secondOrderRelativeStrength: 0.2, spurious: [400.2], missing: [31], seed: 2 });
    expect(f.truth.some((t) => t.diffractionOrder === 2)).toBe(true);
    expect(f.truth.some((t) => t.harmonic !== null && t.harmonic % 2 === 0)).toBe(true);
    expect(f.truth.filter((t) => t.harmonic === null).length).toBe(1);
    expect(f.truth.some((t) => t.harmonic === 31)).toBe(false);
    // A filter that blocks above 72.7 eV (the Al L2,3 edge, PRODUCT.md domain notes) leaves no harmonic above it.
    const blocked = fieldPeakList({ transmission: (e) => (e > 72.7 ? 0 : 1) });
    expect(blocked.truth.every((t) => ((t.harmonic as number) * HC_EV_NM) / blocked.effectiveDriverNm <= 72.7)).toBe(true);
  });

  it('is a function of its seed', () => {
    expect(JSON.stringify(fieldPeakList({ seed: 5 }))).toBe(JSON.stringify(fieldPeakList({ seed: 5 })));
    expect(JSON.stringify(fieldPeakList({ seed: 5 }).peaks)).not.toBe(JSON.stringify(fieldPeakList({ seed: 6 }).peaks));
  });
});
