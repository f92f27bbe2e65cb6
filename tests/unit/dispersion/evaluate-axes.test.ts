/**
 * The one-pass evaluation used by apply (evaluateCalibrationAxes, trig-free grating Jacobian)
 * against the straightforward calls: evaluateCalibration + calibrationDispersionNmPerPixel, and
 * grating.ts's own pixelToWavelengthNm (the forward model, written with atan2/sin directly).
 */
import { describe, expect, it } from 'vitest';
import { GRATING_PARAMETERS, calibrationDispersionNmPerPixel, evaluateCalibration, evaluateCalibrationAxes, gratingWavelengthAndJacobian, type GratingParameter } from '../../../shared/engine/dispersion/evaluate.ts';
import { pixelToWavelengthNm } from '../../../shared/engine/grating.ts';
import type { Calibration, GratingGeometry } from '../../../shared/engine/types.ts';

const base: Omit<Calibration, 'model'> = {
  format: 'orderly-calibration/1',
  spectralAxis: 'x',
  pixelCount: 2048,
  driverNm: 800,
  driverSigmaNm: 1,
  parity: 'odd',
  absoluteScale: 'anchored',
  scaleSigmaRelative: 2e-4,
  residualRmsNm: 0,
  reducedChiSquare: 1,
  points: [],
  filters: [],
  notes: [],
};

const geometries: GratingGeometry[] = [
  { grooveDensityPerMm: 1200, incidenceAngleDeg: 87, detectorDistanceMm: 235, pixelPitchUm: 13.5, wavelengthIncreasesWithPixel: false, detectorCenterPixel: 1024, detectorAngleDeg: 77, detectorTiltDeg: 0 },
  { grooveDensityPerMm: 600, incidenceAngleDeg: 85.3, detectorDistanceMm: 470, pixelPitchUm: 13.5, wavelengthIncreasesWithPixel: true, detectorCenterPixel: 1023.5, detectorAngleDeg: 72, detectorTiltDeg: 14 },
  { grooveDensityPerMm: 2400, incidenceAngleDeg: 88, detectorDistanceMm: 300, pixelPitchUm: 6.5, wavelengthIncreasesWithPixel: false, detectorCenterPixel: 900, detectorAngleDeg: 80, detectorTiltDeg: -20 },
];
const pixels = Float64Array.from({ length: 2048 }, (_, i) => i);

describe('evaluateCalibrationAxes equals the separate evaluations', () => {
  it.each(geometries.map((g, i) => [i, g] as const))('grating model, geometry %i', (_i, geometry) => {
    const cal: Calibration = {
      ...base,
      model: 'grating',
      grating: {
        geometry,
        parameterNames: ['incidenceAngleDeg', 'detectorAngleDeg', 'detectorDistanceMm', 'detectorTiltDeg', 'detectorCenterPixel'],
        parameters: [geometry.incidenceAngleDeg, geometry.detectorAngleDeg, geometry.detectorDistanceMm, geometry.detectorTiltDeg, geometry.detectorCenterPixel],
        covariance: [
          [1e-6, 0, 0, 0, 1e-5],
          [0, 4e-6, 1e-5, 0, 0],
          [0, 1e-5, 1e-2, 1e-4, 0],
          [0, 0, 1e-4, 4e-3, 0],
          [1e-5, 0, 0, 0, 0.25],
        ],
      },
    };
    const axes = evaluateCalibrationAxes(cal, pixels);
    const plain = evaluateCalibration(cal, pixels);
    expect(Array.from(axes.wavelengthNm)).toEqual(Array.from(plain.wavelengthNm));
    expect(Array.from(axes.wavelengthSigmaNm)).toEqual(Array.from(plain.wavelengthSigmaNm));
    expect(Array.from(axes.dispersionNmPerPixel)).toEqual(Array.from(calibrationDispersionNmPerPixel(cal, pixels)));
    // The trig-free form against the forward model's atan2/sin: equal to rounding (1e-12 relative).
    for (let p = 0; p < 2048; p += 7) {
      const forward = pixelToWavelengthNm(geometry, p);
      expect(Math.abs(axes.wavelengthNm[p] - forward)).toBeLessThan(1e-12 * Math.abs(forward));
    }
    // The expanded quadratic form against J Σ Jᵀ written plainly over the named parameters
    // (which the calibration lists in another order than the Jacobian), plus the scale term.
    const names = cal.grating!.parameterNames;
    const cov = cal.grating!.covariance;
    const jacobian = new Float64Array(GRATING_PARAMETERS.length);
    for (let p = 0; p < 2048; p += 5) {
      const lambda = gratingWavelengthAndJacobian(geometry, p, jacobian);
      const j = names.map((name) => jacobian[GRATING_PARAMETERS.indexOf(name as GratingParameter)]);
      let v = 0;
      for (let a = 0; a < j.length; a++) for (let b = 0; b < j.length; b++) v += j[a] * cov[a][b] * j[b];
      const expected = Math.sqrt(v + (lambda * 2e-4) ** 2);
      expect(Math.abs(axes.wavelengthSigmaNm[p] - expected)).toBeLessThan(1e-12 * expected);
      expect(Math.abs(axes.dispersionNmPerPixel[p] + jacobian[4])).toBeLessThanOrEqual(1e-12 * Math.abs(jacobian[4]));
    }
  });

  it('polynomial model', () => {
    const cal: Calibration = {
      ...base,
      model: 'polynomial',
      polynomial: {
        degree: 3,
        domainPx: [12, 2030],
        coefficients: [40, -12, 0.8, -0.05],
        covariance: [
          [1e-6, 0, 1e-7, 0],
          [0, 4e-6, 0, 0],
          [1e-7, 0, 1e-6, 0],
          [0, 0, 0, 1e-6],
        ],
        degreeCriterion: 'fixed degree 3',
      },
    };
    const axes = evaluateCalibrationAxes(cal, pixels);
    const plain = evaluateCalibration(cal, pixels);
    expect(Array.from(axes.wavelengthNm)).toEqual(Array.from(plain.wavelengthNm));
    expect(Array.from(axes.wavelengthSigmaNm)).toEqual(Array.from(plain.wavelengthSigmaNm));
    expect(Array.from(axes.dispersionNmPerPixel)).toEqual(Array.from(calibrationDispersionNmPerPixel(cal, pixels)));
  });
});
