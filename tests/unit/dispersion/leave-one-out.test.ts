/**
 * Leave-one-out residuals from the leverage (hat-matrix) formula, e_(i) = r_i / (1 − h_ii), against
 * brute force: the fit redone without each point in turn. For a linear model the two are equal
 * (Sherman–Morrison; Cook & Weisberg, "Residuals and Influence in Regression", 1982, §2.2); the
 * brute-force refits there use ml-matrix 6.15.1's least-squares solve, not our QR. For the grating
 * model the formula is first order, so it must agree with refits to a small fraction of the pixel σ.
 */
import { Matrix, solve } from 'ml-matrix';
import { describe, expect, it } from 'vitest';
import { chebyshevBasis, toUnit } from '../../../shared/engine/dispersion/chebyshev.ts';
import { fitGratingMap, type GratingMapOptions, type GratingMapPoint } from '../../../shared/engine/dispersion/grating-fit.ts';
import { fitPolynomialMap, type PolynomialMapPoint } from '../../../shared/engine/dispersion/polynomial-map.ts';
import { dispersionNmPerPixel, pixelToWavelengthNm, wavelengthToPixel } from '../../../shared/engine/grating.ts';
import type { GratingGeometry } from '../../../shared/engine/types.ts';
import { normalRandom } from './random.ts';

/** The bench frame's geometry (tests/bench/bench-frame.ts): 1200 l/mm at 87°, 235 mm, β0 = 77°. */
const bench: GratingGeometry = {
  grooveDensityPerMm: 1200,
  incidenceAngleDeg: 87,
  detectorDistanceMm: 235,
  pixelPitchUm: 13.5,
  wavelengthIncreasesWithPixel: false,
  detectorCenterPixel: 1024,
  detectorAngleDeg: 77,
  detectorTiltDeg: 0.3,
};

/** Odd harmonics of an 800 nm driver on the detector, first order, plus a few in second order. */
function benchPoints(sigmaPx: number, seed: number): GratingMapPoint[] {
  const rand = normalRandom(seed);
  const out: GratingMapPoint[] = [];
  for (const [m, qs] of [
    [1, Array.from({ length: 30 }, (_, i) => 11 + 2 * i)],
    [2, [15, 17, 19]],
  ] as const) {
    for (const q of qs) {
      const lambda = 800 / q;
      const p = wavelengthToPixel(bench, lambda, m);
      if (p > 5 && p < 2042) out.push({ pixel: p + sigmaPx * rand(), pixelSigma: sigmaPx * (1 + 0.3 * Math.abs(rand())), wavelengthNm: lambda, diffractionOrder: m });
    }
  }
  return out;
}

/** As calibrate.ts sets the final fit up: four free entries, soft bounds, from a nearby start. */
function calibrateOptions(g: GratingGeometry): GratingMapOptions {
  return {
    restarts: 0,
    maxIterations: 25,
    free: ['detectorAngleDeg', 'detectorDistanceMm', 'detectorTiltDeg', 'incidenceAngleDeg'],
    bounds: {
      detectorAngleDeg: [g.detectorAngleDeg - 2, g.detectorAngleDeg + 2],
      detectorDistanceMm: [g.detectorDistanceMm * 0.9, g.detectorDistanceMm * 1.1],
      detectorTiltDeg: [g.detectorTiltDeg - 10, g.detectorTiltDeg + 10],
      incidenceAngleDeg: [g.incidenceAngleDeg - 1, g.incidenceAngleDeg + 1],
    },
  };
}

describe('leave-one-out residuals of the polynomial map (linear least squares)', () => {
  it('equal brute-force weighted refits to 1e-9 relative', () => {
    const rand = normalRandom(21);
    // Fixed weights (pixelSigma 0, σ from the wavelength only), so the model is exactly linear.
    const points: PolynomialMapPoint[] = Array.from({ length: 15 }, (_, i) => {
      const pixel = 30 + i * 140 + 20 * rand();
      const lambda = 60 - 0.02 * pixel + 2e-6 * pixel ** 2 - 3e-10 * pixel ** 3;
      const sigma = 0.002 * (1 + 0.5 * Math.abs(rand()));
      return { pixel, pixelSigma: 0, wavelengthNm: lambda + sigma * rand(), wavelengthSigmaNm: sigma };
    });
    const degree = 3;
    const fit = fitPolynomialMap(points, { pixelCount: 2048, degree });
    const basis = new Float64Array(degree + 1);
    points.forEach((left, i) => {
      const rest = points.filter((_, j) => j !== i);
      const a = new Matrix(rest.length, degree + 1);
      const b = new Matrix(rest.length, 1);
      rest.forEach((pt, r) => {
        chebyshevBasis(toUnit(pt.pixel, 0, 2047), degree, basis);
        basis.forEach((v, c) => a.set(r, c, v / pt.wavelengthSigmaNm!));
        b.set(r, 0, pt.wavelengthNm / pt.wavelengthSigmaNm!);
      });
      const c = solve(a, b).getColumn(0);
      chebyshevBasis(toUnit(left.pixel, 0, 2047), degree, basis);
      const predicted = c.reduce((s, v, k) => s + v * basis[k], 0);
      const bruteForce = left.wavelengthNm - predicted;
      expect(Math.abs(fit.leaveOneOutResidualsNm[i] - bruteForce)).toBeLessThanOrEqual(1e-9 * Math.abs(bruteForce));
    });
  });
});

describe('leave-one-out residuals of the grating map (leverage formula, first order)', () => {
  const sigmaPx = 0.005;
  const points = benchPoints(sigmaPx, 5);
  // The assigner hands over a geometry near, not at, the least-squares one.
  const start = { ...bench, detectorAngleDeg: 77.02, detectorDistanceMm: 236, detectorTiltDeg: 0, incidenceAngleDeg: 86.99 };
  const fit = fitGratingMap(points, start, calibrateOptions(start));

  it('agree with brute-force refits (fitGratingMap on the other points) to 0.2 % of the pixel σ', () => {
    expect(points.length).toBeGreaterThan(20);
    let worst = 0;
    points.forEach((left, i) => {
      const refit = fitGratingMap(
        points.filter((_, j) => j !== i),
        start,
        calibrateOptions(start),
      );
      const g = refit.grating.geometry;
      const loPx = left.pixel - wavelengthToPixel(g, left.wavelengthNm, left.diffractionOrder);
      worst = Math.max(worst, Math.abs(fit.leaveOneOutResidualsPx[i] - loPx) / left.pixelSigma);
      expect(Math.abs(fit.leaveOneOutResidualsPx[i] - loPx)).toBeLessThan(0.002 * left.pixelSigma);
      // The wavelength residual likewise, to the same fraction of σ in wavelength terms.
      const nmPerPx = Math.abs(dispersionNmPerPixel(g, left.pixel, left.diffractionOrder)) / left.diffractionOrder;
      const loNm = left.wavelengthNm - pixelToWavelengthNm(g, left.pixel, left.diffractionOrder);
      expect(Math.abs(fit.leaveOneOutResidualsNm[i] - loNm)).toBeLessThan(0.002 * left.pixelSigma * nmPerPx);
    });
    console.info(`grating leave-one-out: leverage formula vs brute-force refits, worst |Δ| = ${worst.toExponential(2)} pixel σ over ${points.length} points`);
  });

  it("matches the built-in exact refits ('refit') and refits the high-leverage points itself", () => {
    const exact = fitGratingMap(points, start, { ...calibrateOptions(start), leaveOneOut: 'refit' });
    expect(exact.grating.parameters).toEqual(fit.grating.parameters);
    const high = fit.leverages.flatMap((h, i) => (h > 0.5 ? [i] : []));
    expect(high.length).toBeGreaterThan(0);
    for (const i of high) expect(fit.leaveOneOutResidualsPx[i]).toBe(exact.leaveOneOutResidualsPx[i]);
    expect(fit.leaveOneOutRefits).toBe(high.length);
    expect(exact.leaveOneOutRefits).toBe(points.length);
    // Leverages of a k-parameter fit sum to k (trace of the hat matrix).
    expect(fit.leverages.reduce((s, h) => s + h, 0)).toBeCloseTo(4, 9);
  });

  it('stops at once when started at its own optimum (stopping rule)', () => {
    const again = fitGratingMap(points, fit.grating.geometry, calibrateOptions(fit.grating.geometry));
    // One or two iterations of a Jacobian (2k = 8 passes) and a trial or two, not ~30 rejected trials.
    expect(again.iterations).toBeLessThanOrEqual(2);
    expect(again.evaluations).toBeLessThanOrEqual(24);
    const sd = fit.grating.covariance.map((row, j) => Math.sqrt(row[j]));
    again.grating.parameters.forEach((v, j) => expect(Math.abs(v - fit.grating.parameters[j])).toBeLessThan(1e-4 * sd[j]));
  });
});
