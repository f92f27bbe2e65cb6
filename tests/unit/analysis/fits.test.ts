/**
 * shared/analysis fits against published and textbook values. Each expected number names its source.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { AnalysisError, fitPowerLaw, fitSinusoid, linearLeastSquares, detectPeriod } from '../../../shared/analysis/index.ts';
import { createRandom } from '../../../shared/engine/simulate/index.ts';

interface StrdFile {
  x: number[];
  y: number[];
  certified: { coefficients: number[]; stdDev: number[]; residualStdDev: number };
}
const norris = JSON.parse(readFileSync('tests/fixtures/reference/nist-strd/Norris.json', 'utf8')) as StrdFile;

function relErr(a: number, b: number): number {
  return Math.abs(a - b) / Math.abs(b);
}

describe('linearLeastSquares', () => {
  it('reproduces NIST StRD Norris (certified coefficients and standard deviations)', () => {
    // Source: NIST/ITL StRD, Linear Least Squares Regression, "Norris" (certified values in the file).
    const fit = linearLeastSquares([norris.x.map(() => 1), norris.x], norris.y);
    fit.parameters.forEach((p, i) => expect(relErr(p, norris.certified.coefficients[i])).toBeLessThan(1e-10));
    fit.covariance.forEach((row, i) => expect(relErr(Math.sqrt(row[i]), norris.certified.stdDev[i])).toBeLessThan(1e-9));
    expect(relErr(Math.sqrt(fit.chiSquare / fit.degreesOfFreedom), norris.certified.residualStdDev)).toBeLessThan(1e-10);
    expect(fit.covarianceFrom).toBe('residuals');
  });

  it('with given σ the covariance is (XᵀWX)⁻¹ and does not depend on the scatter', () => {
    // Textbook: a straight line through x = 0..4 with σ = 2: Var(b1) = σ²/Σ(x−x̄)² = 4/10 (Bevington §6.3).
    const x = [0, 1, 2, 3, 4];
    const fit = linearLeastSquares([x.map(() => 1), x], [1, 3.5, 4.5, 7.5, 9], x.map(() => 2));
    expect(fit.covariance[1][1]).toBeCloseTo(0.4, 12);
    expect(fit.covarianceFrom).toBe('sigma');
  });

  it('refuses too few points and dependent columns with a plain message', () => {
    expect(() => linearLeastSquares([[1, 1], [1, 2]], [1, 2])).toThrow('needs more than 2 points');
    expect(() => linearLeastSquares([[1, 1, 1], [2, 2, 2]], [1, 2, 3])).toThrow(AnalysisError);
    expect(() => linearLeastSquares([[1, 1, 1]], [1, 2, 3], [1, 0, 1])).toThrow('Point 1 has uncertainty 0');
  });
});

describe('fitSinusoid', () => {
  // Contrived problem: y = a + b·cos(x + φ) sampled at N phases evenly over whole periods.
  const N = 24;
  const truth = { a: 1000, b: 250, phi: 0.7 };
  const x = Array.from({ length: N }, (_, i) => (2 * Math.PI * i) / 12); // two periods
  const exact = x.map((v) => truth.a + truth.b * Math.cos(v + truth.phi));

  it('recovers amplitude and phase exactly from noise-free data (default period 2π)', () => {
    const fit = fitSinusoid(x, exact);
    expect(fit.offset).toBeCloseTo(truth.a, 9);
    expect(fit.amplitude).toBeCloseTo(truth.b, 9);
    expect(fit.phaseRad).toBeCloseTo(truth.phi, 12);
    expect(fit.period).toBeCloseTo(2 * Math.PI, 15);
    expect(fit.periodFrom).toBe('default');
  });

  it('gives the textbook uncertainties for evenly spaced whole periods', () => {
    // With Σcos² = Σsin² = N/2 and no cross terms, Var(c) = Var(s) = 2σ²/N and Var(a) = σ²/N, so
    // σ_b = σ√(2/N) and σ_φ = σ√(2/N)/b (first-order propagation, Bevington & Robinson §3.2).
    const sigma = 20;
    const fit = fitSinusoid(x, exact, x.map(() => sigma));
    expect(fit.offsetSigma).toBeCloseTo(sigma / Math.sqrt(N), 10);
    expect(fit.amplitudeSigma).toBeCloseTo(sigma * Math.sqrt(2 / N), 10);
    expect(fit.phaseSigmaRad).toBeCloseTo((sigma * Math.sqrt(2 / N)) / truth.b, 10);
  });

  it('its stated σ match the scatter of fits over many noisy repeats (seeded)', () => {
    const sigma = 20;
    const rng = createRandom(20261202);
    const amps: number[] = [];
    const phases: number[] = [];
    for (let k = 0; k < 400; k++) {
      const y = exact.map((v) => v + sigma * rng.normal());
      const fit = fitSinusoid(x, y, x.map(() => sigma));
      amps.push(fit.amplitude);
      phases.push(fit.phaseRad);
    }
    const sd = (v: number[]) => {
      const m = v.reduce((a, b) => a + b, 0) / v.length;
      return Math.sqrt(v.reduce((a, b) => a + (b - m) ** 2, 0) / (v.length - 1));
    };
    // 400 repeats: the sample SD is within ±10 % of the true SD at ~3.5σ of its own scatter (1/√(2·399) ≈ 3.5 %).
    expect(relErr(sd(amps), sigma * Math.sqrt(2 / N))).toBeLessThan(0.12);
    expect(relErr(sd(phases), (sigma * Math.sqrt(2 / N)) / truth.b)).toBeLessThan(0.12);
  });

  it('uses a given period and can detect it with the periodogram', () => {
    const xs = Array.from({ length: 30 }, (_, i) => i * 0.5); // fs delay, 0..14.5
    const period = 2.67; // e.g. half the 800 nm optical period in fs (common practice: 2ω–ω delay scans repeat at λ/2c)
    const ys = xs.map((v) => 50 + 10 * Math.cos((2 * Math.PI * v) / period - 1.2));
    const given = fitSinusoid(xs, ys, undefined, { period });
    expect(given.amplitude).toBeCloseTo(10, 9);
    expect(given.phaseRad).toBeCloseTo(-1.2, 9);
    expect(given.periodFrom).toBe('given');
    expect(relErr(detectPeriod(xs, ys), period)).toBeLessThan(0.01);
    const detected = fitSinusoid(xs, ys, undefined, { period: 'detect' });
    expect(detected.periodFrom).toBe('periodogram');
    expect(detected.amplitude).toBeGreaterThan(9.5);
  });

  it('refuses fewer than 4 points and a bad period', () => {
    expect(() => fitSinusoid([0, 1, 2], [1, 2, 3])).toThrow('at least 4 points, got 3');
    expect(() => fitSinusoid(x, exact, undefined, { period: -1 })).toThrow('positive number, got -1');
  });
});

describe('fitPowerLaw', () => {
  it('recovers exponent and prefactor from an exact power law', () => {
    // Cutoff ∝ I^1 (E_c = Ip + 3.17·Up, Up ∝ I; here with Ip = 0 for a pure power law).
    const x = [1, 2, 3, 5, 8];
    const y = x.map((v) => 42 * v ** 1.5);
    const fit = fitPowerLaw(x, y);
    expect(fit.exponent).toBeCloseTo(1.5, 12);
    expect(fit.prefactor).toBeCloseTo(42, 10);
  });

  it('the exponent σ is the straight-line slope σ in log-log space', () => {
    // Textbook (Bevington §6.3): with σ_lny = σ_y/y given, Var(k) = 1 / (S·Sxx − Sx²)·S with sums weighted by 1/σ².
    const x = [1, 2, 4, 8];
    const y = [10, 21, 39, 82];
    const ys = y.map((v) => 0.05 * v); // 5 % each → σ_lny = 0.05
    const fit = fitPowerLaw(x, y, ys);
    const lx = x.map(Math.log);
    const w = 1 / 0.05 ** 2;
    const S = w * lx.length;
    const Sx = w * lx.reduce((a, b) => a + b, 0);
    const Sxx = w * lx.reduce((a, b) => a + b * b, 0);
    expect(fit.exponentSigma).toBeCloseTo(Math.sqrt(S / (S * Sxx - Sx * Sx)), 12);
  });

  it('refuses non-positive values', () => {
    expect(() => fitPowerLaw([1, 2, 0], [1, 2, 3])).toThrow('point 2 has x = 0');
  });
});
