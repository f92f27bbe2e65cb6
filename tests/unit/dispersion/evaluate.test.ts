/**
 * evaluateCalibration / calibrationWavelengthToPixel: values against grating.ts (the forward
 * model), the σ band against a brute-force J Σ Jᵀ with finite differences and against Monte Carlo
 * draws of the parameters, inverses by round-trip. (Speed is measured in `npm run bench`, not here.)
 */
import { describe, expect, it } from 'vitest';
import {
  calibrationDispersionNmPerPixel,
  calibrationWavelengthToPixel,
  evaluateCalibration,
  gratingWavelengthAndJacobian,
} from '../../../shared/engine/dispersion/evaluate.ts';
import { chebyshevValue } from '../../../shared/engine/dispersion/chebyshev.ts';
import { pixelToWavelengthNm, wavelengthToPixel } from '../../../shared/engine/grating.ts';
import type { Calibration, GratingGeometry } from '../../../shared/engine/types.ts';
import { normalRandom } from './random.ts';

const geometry: GratingGeometry = {
  grooveDensityPerMm: 1200,
  incidenceAngleDeg: 87,
  detectorDistanceMm: 470,
  pixelPitchUm: 13.5,
  wavelengthIncreasesWithPixel: true,
  detectorCenterPixel: 1023.5,
  detectorAngleDeg: 72,
  detectorTiltDeg: 5,
};

function calibration(partial: Partial<Calibration>): Calibration {
  return {
    format: 'orderly-calibration/1',
    model: 'polynomial',
    spectralAxis: 'x',
    pixelCount: 2048,
    driverNm: 800,
    driverSigmaNm: 1,
    parity: 'odd',
    absoluteScale: 'anchored',
    scaleSigmaRelative: 0,
    residualRmsNm: 0,
    reducedChiSquare: 1,
    points: [],
    filters: [],
    notes: [],
    ...partial,
  };
}

const gratingCal = calibration({
  model: 'grating',
  grating: {
    geometry,
    parameterNames: ['detectorAngleDeg', 'detectorDistanceMm', 'detectorTiltDeg'],
    parameters: [72, 470, 5],
    covariance: [
      [1e-6, 2e-6, 0],
      [2e-6, 1e-2, 1e-4],
      [0, 1e-4, 4e-3],
    ],
  },
});

const polyCal = calibration({
  polynomial: {
    degree: 3,
    domainPx: [0, 2047],
    coefficients: [40, -12, 0.8, -0.05],
    covariance: [
      [1e-6, 0, 1e-7, 0],
      [0, 4e-6, 0, 0],
      [1e-7, 0, 1e-6, 0],
      [0, 0, 0, 1e-6],
    ],
    degreeCriterion: 'fixed degree 3',
  },
});

const pixels = Float64Array.from({ length: 2048 }, (_, i) => i);

describe('evaluateCalibration', () => {
  it('grating model equals grating.ts pixelToWavelengthNm', () => {
    const { wavelengthNm } = evaluateCalibration(gratingCal, pixels);
    for (const p of [0, 511, 1023.5, 2047]) expect(wavelengthNm[Math.floor(p)]).toBeCloseTo(pixelToWavelengthNm(geometry, Math.floor(p)), 12);
  });

  it('analytic grating Jacobian equals central differences of grating.ts', () => {
    const jac = new Float64Array(5);
    const names = ['incidenceAngleDeg', 'detectorDistanceMm', 'detectorAngleDeg', 'detectorTiltDeg', 'detectorCenterPixel'] as const;
    for (const g of [geometry, { ...geometry, wavelengthIncreasesWithPixel: false, detectorTiltDeg: -15 }]) {
      for (const p of [3, 900, 2000]) {
        gratingWavelengthAndJacobian(g, p, jac);
        names.forEach((name, j) => {
          const h = 1e-5 * Math.max(1, Math.abs(g[name]));
          const fd = (pixelToWavelengthNm({ ...g, [name]: g[name] + h }, p) - pixelToWavelengthNm({ ...g, [name]: g[name] - h }, p)) / (2 * h);
          expect(Math.abs(jac[j] - fd)).toBeLessThan(1e-6 * Math.max(1, Math.abs(fd)));
        });
      }
    }
  });

  it('grating σ band matches Monte Carlo draws of the parameters', () => {
    const rand = normalRandom(42);
    // Cholesky of the 3×3 covariance by hand (lower triangular L with L Lᵀ = Σ).
    const s = gratingCal.grating!.covariance;
    const l11 = Math.sqrt(s[0][0]);
    const l21 = s[1][0] / l11;
    const l22 = Math.sqrt(s[1][1] - l21 * l21);
    const l31 = s[2][0] / l11;
    const l32 = (s[2][1] - l31 * l21) / l22;
    const l33 = Math.sqrt(s[2][2] - l31 * l31 - l32 * l32);
    const p = 1900;
    const draws: number[] = [];
    for (let i = 0; i < 4000; i++) {
      const z = [rand(), rand(), rand()];
      const g = { ...geometry, detectorAngleDeg: 72 + l11 * z[0], detectorDistanceMm: 470 + l21 * z[0] + l22 * z[1], detectorTiltDeg: 5 + l31 * z[0] + l32 * z[1] + l33 * z[2] };
      draws.push(pixelToWavelengthNm(g, p));
    }
    const mean = draws.reduce((a, b) => a + b, 0) / draws.length;
    const sd = Math.sqrt(draws.reduce((a, b) => a + (b - mean) ** 2, 0) / (draws.length - 1));
    const { wavelengthSigmaNm } = evaluateCalibration(gratingCal, [p]);
    expect(wavelengthSigmaNm[0] / sd).toBeGreaterThan(0.95);
    expect(wavelengthSigmaNm[0] / sd).toBeLessThan(1.05);
  });

  it('polynomial value by Clenshaw and σ² = tᵀ Σ t + (λ·s)²', () => {
    const cal = { ...polyCal, scaleSigmaRelative: 1e-4 };
    const { wavelengthNm, wavelengthSigmaNm } = evaluateCalibration(cal, [0, 1000, 2047]);
    [0, 1000, 2047].forEach((p, i) => {
      const u = (2 * p - 2047) / 2047;
      const lambda = 40 - 12 * u + 0.8 * (2 * u * u - 1) - 0.05 * (4 * u ** 3 - 3 * u);
      expect(wavelengthNm[i]).toBeCloseTo(lambda, 12);
      const t = [1, u, 2 * u * u - 1, 4 * u ** 3 - 3 * u];
      let v = 0;
      for (let a = 0; a < 4; a++) for (let b = 0; b < 4; b++) v += t[a] * cal.polynomial!.covariance[a][b] * t[b];
      expect(wavelengthSigmaNm[i]).toBeCloseTo(Math.sqrt(v + (lambda * 1e-4) ** 2), 14);
    });
  });

  it('dispersion dλ/dp matches finite differences for both models', () => {
    const probe = [10, 1024, 2030];
    const dPoly = calibrationDispersionNmPerPixel(polyCal, probe);
    const dGrating = calibrationDispersionNmPerPixel(gratingCal, probe);
    probe.forEach((p, i) => {
      const fdPoly = (chebyshevValue(polyCal.polynomial!.coefficients, (2 * (p + 0.01) - 2047) / 2047) - chebyshevValue(polyCal.polynomial!.coefficients, (2 * (p - 0.01) - 2047) / 2047)) / 0.02;
      expect(dPoly[i]).toBeCloseTo(fdPoly, 9);
      const fdGrating = (pixelToWavelengthNm(geometry, p + 0.01) - pixelToWavelengthNm(geometry, p - 0.01)) / 0.02;
      expect(dGrating[i]).toBeCloseTo(fdGrating, 8);
    });
  });
});

describe('calibrationWavelengthToPixel', () => {
  it('grating: exact inverse, and order m of λ lands where m·λ lands', () => {
    for (const q of [19, 23, 29]) {
      const lambda = 800 / q;
      expect(calibrationWavelengthToPixel(gratingCal, lambda)).toBeCloseTo(wavelengthToPixel(geometry, lambda), 9);
      expect(calibrationWavelengthToPixel(gratingCal, lambda / 2, 2)).toBeCloseTo(wavelengthToPixel(geometry, lambda), 9);
    }
  });

  it('polynomial: round-trips pixel → λ → pixel to 1e-8 px, in orders 1 and 2', () => {
    const { wavelengthNm } = evaluateCalibration(polyCal, pixels);
    for (const p of [0, 1, 333, 1024, 1999, 2047]) {
      expect(Math.abs(calibrationWavelengthToPixel(polyCal, wavelengthNm[p]) - p)).toBeLessThan(1e-8);
      expect(Math.abs(calibrationWavelengthToPixel(polyCal, wavelengthNm[p] / 2, 2) - p)).toBeLessThan(1e-8);
    }
  });

  it('polynomial: NaN when no pixel reaches the wavelength; NaN for nonsense input', () => {
    expect(calibrationWavelengthToPixel(polyCal, 500)).toBeNaN();
    expect(calibrationWavelengthToPixel(polyCal, -1)).toBeNaN();
  });
});
