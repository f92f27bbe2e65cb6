/**
 * fitPolynomialMap on contrived problems: points generated from the physical grating model
 * (grating.ts, an independent forward model) or from a known Chebyshev series, with seeded noise.
 */
import { describe, expect, it } from 'vitest';
import { chebyshevValue } from '../../../shared/engine/dispersion/chebyshev.ts';
import { fitPolynomialMap, type PolynomialMapPoint } from '../../../shared/engine/dispersion/polynomial-map.ts';
import { fitPolynomial } from '../../../shared/engine/dispersion/polynomial-fit.ts';
import { pixelToWavelengthNm, wavelengthToPixel } from '../../../shared/engine/grating.ts';
import type { GratingGeometry } from '../../../shared/engine/types.ts';
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

function combPoints(sigmaPx: number, seed: number): PolynomialMapPoint[] {
  const rand = normalRandom(seed);
  const points: PolynomialMapPoint[] = [];
  // A 1600 nm driver, every harmonic (parity 'all'): 14 lines across the detector.
  for (let q = 20; q <= 100; q += 1) {
    const lambda = 1600 / q;
    const p = wavelengthToPixel(geometry, lambda, 1);
    if (p > 5 && p < 2042) points.push({ pixel: p + sigmaPx * rand(), pixelSigma: sigmaPx, wavelengthNm: lambda });
  }
  return points;
}

describe('fitPolynomialMap', () => {
  it('recovers a known cubic Chebyshev series exactly (no noise) at a fixed degree', () => {
    const c = [40, -12, 0.8, -0.05];
    const points = Array.from({ length: 9 }, (_, i) => {
      const p = 50 + i * 240;
      return { pixel: p, pixelSigma: 0.1, wavelengthNm: chebyshevValue(c, (2 * p - 2047) / 2047) };
    });
    const fit = fitPolynomialMap(points, { pixelCount: 2048, degree: 3 });
    fit.polynomial.coefficients.forEach((v, k) => expect(v).toBeCloseTo(c[k], 10));
    expect(fit.polynomial.domainPx).toEqual([0, 2047]);
    expect(fit.polynomial.degreeCriterion).toBe('fixed degree 3');
  });

  it('maps the grating model to within the noise, with honest reduced χ² and residuals', () => {
    let chi = 0;
    const trials = 20;
    for (let s = 0; s < trials; s++) {
      const fit = fitPolynomialMap(combPoints(0.05, 100 + s), { pixelCount: 2048 });
      chi += fit.reducedChiSquare / trials;
      // The map agrees with the true grating model across the detector to a few pm.
      for (const p of [100, 700, 1300, 1900]) {
        const u = (2 * p - 2047) / 2047;
        expect(Math.abs(chebyshevValue(fit.polynomial.coefficients, u) - pixelToWavelengthNm(geometry, p))).toBeLessThan(0.003);
      }
    }
    // Mean reduced χ² of correctly weighted fits is ≈ 1 (± ~0.1 over 20 trials).
    expect(chi).toBeGreaterThan(0.75);
    expect(chi).toBeLessThan(1.3);
  });

  it('AICc picks degree 2 for exact-quadratic data with noise, and says so', () => {
    const rand = normalRandom(7);
    const c = [30, -8, 0.6];
    const points = Array.from({ length: 14 }, (_, i) => {
      const p = 40 + i * 150;
      const lambda = chebyshevValue(c, (2 * p - 2047) / 2047);
      return { pixel: p, pixelSigma: 1e-9, wavelengthNm: lambda + 0.001 * rand(), wavelengthSigmaNm: 0.001 };
    });
    const fit = fitPolynomialMap(points, { pixelCount: 2048, maxDegree: 5 });
    expect(fit.polynomial.degree).toBe(2);
    expect(fit.polynomial.degreeCriterion).toBe('AICc over degrees 1-5');
    expect(fit.degreeScores.map((d) => d.degree)).toEqual([1, 2, 3, 4, 5]);
  });

  it('leave-one-out residuals equal an explicit refit without the point', () => {
    const points = combPoints(0.05, 3);
    const fit = fitPolynomialMap(points, { pixelCount: 2048, degree: 3 });
    for (const i of [0, 4, points.length - 1]) {
      const rest = points.filter((_, j) => j !== i);
      const refit = fitPolynomialMap(rest, { pixelCount: 2048, degree: 3 });
      const u = (2 * points[i].pixel - 2047) / 2047;
      const direct = points[i].wavelengthNm - chebyshevValue(refit.polynomial.coefficients, u);
      // Equal up to the small change of effective-variance slopes between the two fits.
      expect(fit.leaveOneOutResidualsNm[i]).toBeCloseTo(direct, 6);
    }
  });

  it('agrees with fitPolynomial (the NIST-tested solver) on the same weighted problem', () => {
    const points = combPoints(0.05, 11).map((p) => ({ ...p, pixelSigma: 1e-12, wavelengthSigmaNm: 0.002 }));
    const fit = fitPolynomialMap(points, { pixelCount: 2048, degree: 3 });
    const ref = fitPolynomial(points.map((p) => p.pixel), points.map((p) => p.wavelengthNm), 3);
    for (const p of [0, 512, 1024, 2047]) {
      const mono = ref.coefficients.reduce((s, b, j) => s + b * p ** j, 0);
      expect(chebyshevValue(fit.polynomial.coefficients, (2 * p - 2047) / 2047)).toBeCloseTo(mono, 9);
    }
  });

  it('second-order points fit in first-order terms (m·λ) and report true-wavelength residuals', () => {
    const first = combPoints(0.02, 5);
    const second = first.slice(0, 3).map((p) => ({ ...p, wavelengthNm: p.wavelengthNm / 2, diffractionOrder: 2 }));
    const fit = fitPolynomialMap([...first, ...second], { pixelCount: 2048, degree: 3 });
    const onlyFirst = fitPolynomialMap(first, { pixelCount: 2048, degree: 3 });
    // The m = 2 points sit at the same pixels, so they change the fit little.
    expect(Math.abs(fit.polynomial.coefficients[0] - onlyFirst.polynomial.coefficients[0])).toBeLessThan(1e-3);
    const n = first.length;
    for (let j = 0; j < 3; j++) expect(fit.residualsNm[n + j]).toBeCloseTo(fit.residualsNm[j] / 2, 6);
  });

  it('covariance predicts the scatter of the fitted map (Monte Carlo, 200 draws)', () => {
    const p0 = 1200;
    const u0 = (2 * p0 - 2047) / 2047;
    const values: number[] = [];
    let predicted = 0;
    for (let s = 0; s < 200; s++) {
      const fit = fitPolynomialMap(combPoints(0.05, 1000 + s), { pixelCount: 2048, degree: 3 });
      values.push(chebyshevValue(fit.polynomial.coefficients, u0));
      const t = [1, u0, 2 * u0 * u0 - 1, 4 * u0 ** 3 - 3 * u0];
      // Undo the χ² inflation to compare like with like.
      const inflate = Math.max(1, fit.reducedChiSquare);
      predicted += Math.sqrt(t.reduce((acc, a, i) => acc + t.reduce((b, tj, j) => b + a * fit.polynomial.covariance[i][j] * tj, 0), 0) / inflate) / 200;
    }
    const mean = values.reduce((a, b) => a + b, 0) / values.length;
    const sd = Math.sqrt(values.reduce((a, b) => a + (b - mean) ** 2, 0) / (values.length - 1));
    expect(sd / predicted).toBeGreaterThan(0.8);
    expect(sd / predicted).toBeLessThan(1.2);
  });
});
