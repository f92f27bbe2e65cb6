/**
 * levenbergMarquardt on problems whose exact minimiser is known in closed form, and its contract
 * (bounds, stopping, covariance rows, the pooled workspace). The NIST StRD nonlinear problems are
 * in nist-strd-nonlinear.test.ts.
 */
import { describe, expect, it } from 'vitest';
import { type LeastSquaresProblem, levenbergMarquardt } from '../../../shared/engine/fit/levenberg-marquardt.ts';

/**
 * Rosenbrock as least squares, r = (10(x2 − x1²), 1 − x1), from (−1.2, 1); minimiser (1, 1) with
 * χ² = 0 (Moré, Garbow & Hillstrom, ACM TOMS 7, 17 (1981), problem 1; from memory).
 */
function rosenbrock(analytic: boolean): LeastSquaresProblem {
  return {
    residualCount: 2,
    residuals(p, out) {
      out[0] = 10 * (p[1] - p[0] * p[0]);
      out[1] = 1 - p[0];
    },
    ...(analytic && {
      jacobian(p: Float64Array, out: Float64Array) {
        out[0] = -20 * p[0];
        out[1] = -1;
        out[2] = 10;
        out[3] = 0;
      },
    }),
  };
}

const T = Float64Array.from({ length: 12 }, (_, i) => i);
const A_TRUE = 2.5;
const K_TRUE = 0.3;

/**
 * Exponential decay f(t) = A·exp(−k·t) whose data are f at (A, k) = (2.5, 0.3) plus a residual
 * vector orthogonal to both columns of the Jacobian there: (2.5, 0.3) is then a stationary point
 * with χ² = ‖e‖², and for a residual this small the minimiser (the first-order condition Jᵀr = 0
 * holds exactly and JᵀJ dominates the Hessian; a construction from memory, common practice for
 * testing solvers on non-zero-residual problems with a known answer).
 */
function decayData(): { y: Float64Array; residual: Float64Array; jTrue: Float64Array[] } {
  const ja = T.map((t) => Math.exp(-K_TRUE * t));
  const jk = T.map((t) => -A_TRUE * t * Math.exp(-K_TRUE * t));
  const v = T.map((t) => 0.01 * Math.sin(2.3 * t + 0.4));
  // Remove v's projection onto span(ja, jk) (2×2 normal equations; well conditioned here).
  const dot = (a: Float64Array, b: Float64Array) => a.reduce((s, ai, i) => s + ai * b[i], 0);
  const [aa, ak, kk, av, kv] = [dot(ja, ja), dot(ja, jk), dot(jk, jk), dot(ja, v), dot(jk, v)];
  const det = aa * kk - ak * ak;
  const ca = (kk * av - ak * kv) / det;
  const ck = (aa * kv - ak * av) / det;
  const residual = v.map((vi, i) => vi - ca * ja[i] - ck * jk[i]);
  const y = T.map((t, i) => A_TRUE * Math.exp(-K_TRUE * t) + residual[i]);
  return { y, residual, jTrue: [ja, jk] };
}

function decay(y: Float64Array, analytic: boolean): LeastSquaresProblem {
  return {
    residualCount: T.length,
    residuals(p, out) {
      for (let i = 0; i < T.length; i++) out[i] = y[i] - p[0] * Math.exp(-p[1] * T[i]);
    },
    ...(analytic && {
      jacobian(p: Float64Array, out: Float64Array) {
        for (let i = 0; i < T.length; i++) {
          const e = Math.exp(-p[1] * T[i]);
          out[i] = -e;
          out[T.length + i] = p[0] * T[i] * e;
        }
      },
    }),
  };
}

/** A straight line y = a + b·x: least squares and (XᵀX)⁻¹ in closed form (common practice). */
const X = [0, 1, 2, 3, 4, 5, 6, 7];
const Y = [1.3, 2.9, 5.2, 6.8, 9.1, 11.2, 12.8, 15.1];
function line(extraRows = 0, prior?: { mean: number; sigma: number }): LeastSquaresProblem {
  return {
    residualCount: X.length + extraRows,
    residuals(p, out) {
      X.forEach((x, i) => (out[i] = Y[i] - (p[0] + p[1] * x)));
      if (prior) out[X.length] = (p[1] - prior.mean) / prior.sigma;
    },
  };
}
/** The same line with its exact Jacobian: forward differences would stop the fit some 1e-10 off (J off by ~√ε, r ≠ 0). */
function exactLine(): LeastSquaresProblem {
  const m = X.length;
  return {
    ...line(),
    jacobian(_p, out) {
      X.forEach((x, i) => {
        out[i] = -1;
        out[m + i] = -x;
      });
    },
  };
}
function lineClosedForm() {
  const n = X.length;
  const xm = X.reduce((s, x) => s + x, 0) / n;
  const ym = Y.reduce((s, y) => s + y, 0) / n;
  const sxx = X.reduce((s, x) => s + (x - xm) ** 2, 0);
  const sxy = X.reduce((s, x, i) => s + (x - xm) * (Y[i] - ym), 0);
  const b = sxy / sxx;
  return { a: ym - b * xm, b, varA: 1 / n + (xm * xm) / sxx, varB: 1 / sxx, cov: -xm / sxx };
}

describe('levenbergMarquardt: closed-form minimisers', () => {
  it.each([
    ['analytic', true, 'forward'],
    ['forward differences', false, 'forward'],
    ['central differences', false, 'central'],
  ] as const)('Rosenbrock from (−1.2, 1) reaches (1, 1), %s', (_label, analytic, difference) => {
    const fit = levenbergMarquardt(rosenbrock(analytic), [-1.2, 1], { difference, ftol: 1e-14, xtol: 1e-14, maxIterations: 200 });
    expect(fit.converged).toBe(true);
    expect(Math.abs(fit.parameters[0] - 1)).toBeLessThan(1e-9);
    expect(Math.abs(fit.parameters[1] - 1)).toBeLessThan(1e-9);
    expect(fit.chiSquare).toBeLessThan(1e-18);
  });

  it.each([
    ['analytic', true],
    ['forward differences', false],
  ] as const)('exponential decay with a residual orthogonal to the tangent plane: the known minimiser, χ² and (JᵀJ)⁻¹ (%s)', (_label, analytic) => {
    const { y, residual, jTrue } = decayData();
    const fit = levenbergMarquardt(decay(y, analytic), [1, 0.1], { ftol: 1e-15, xtol: 1e-15 });
    expect(fit.converged).toBe(true);
    expect(Math.abs(fit.parameters[0] / A_TRUE - 1)).toBeLessThan(1e-9);
    expect(Math.abs(fit.parameters[1] / K_TRUE - 1)).toBeLessThan(1e-9);
    const rss = residual.reduce((s, r) => s + r * r, 0);
    expect(Math.abs(fit.chiSquare / rss - 1)).toBeLessThan(1e-9);
    // (JᵀJ)⁻¹ at the minimiser, inverted by hand.
    const [ja, jk] = jTrue;
    const aa = ja.reduce((s, v) => s + v * v, 0);
    const kk = jk.reduce((s, v) => s + v * v, 0);
    const ak = ja.reduce((s, v, i) => s + v * jk[i], 0);
    const det = aa * kk - ak * ak;
    const expected = [kk / det, -ak / det, -ak / det, aa / det];
    const cov = fit.covariance as Float64Array;
    // Forward differences carry an error of order √ε in J, hence the looser bound.
    const tolerance = analytic ? 1e-9 : 1e-6;
    const scale = Math.sqrt(expected[0] * expected[3]);
    expected.forEach((v, i) => expect(Math.abs(cov[i] - v) / scale).toBeLessThan(tolerance));
  });

  it('a straight line: the least-squares line and (XᵀX)⁻¹ of the closed form', () => {
    const c = lineClosedForm();
    const fit = levenbergMarquardt(exactLine(), [0, 0], { ftol: 1e-14 });
    expect(fit.parameters[0]).toBeCloseTo(c.a, 10);
    expect(fit.parameters[1]).toBeCloseTo(c.b, 10);
    const cov = fit.covariance as Float64Array;
    expect(cov[0]).toBeCloseTo(c.varA, 8);
    expect(cov[3]).toBeCloseTo(c.varB, 8);
    expect(cov[1]).toBeCloseTo(c.cov, 8);
    expect(cov[2]).toBe(cov[1]);
  });
});

describe('levenbergMarquardt: contract', () => {
  it('hard bounds: Rosenbrock with x1 ≤ 0.5 ends on the bound at (0.5, 0.25), χ² = 0.25; a start outside the box is moved onto it', () => {
    // With x1 held at 0.5 the first residual vanishes at x2 = 0.25 and χ² = (1 − 0.5)²; χ² still falls as x1 grows, so the bound is active.
    const fit = levenbergMarquardt(rosenbrock(true), [0.9, 1], { lower: [-2, -Infinity], upper: [0.5, Infinity], ftol: 1e-14, xtol: 1e-14 });
    expect(fit.converged).toBe(true);
    expect(fit.parameters[0]).toBe(0.5);
    expect(fit.parameters[1]).toBeCloseTo(0.25, 10);
    expect(fit.chiSquare).toBeCloseTo(0.25, 12);
  });

  it('started at its minimum it stops in the first iteration, after one trial', () => {
    const c = lineClosedForm();
    const fit = levenbergMarquardt(line(), [c.a, c.b]);
    expect(fit.converged).toBe(true);
    expect(fit.iterations).toBe(1);
    // the start, two forward-difference columns, one trial
    expect(fit.residualEvaluations).toBe(4);
  });

  it('gtol: at the minimum the residual is orthogonal to J and the fit stops before any trial', () => {
    const c = lineClosedForm();
    const fit = levenbergMarquardt(line(), [c.a, c.b], { gtol: 1e-6 });
    expect(fit.stop).toBe('gtol');
    expect(fit.residualEvaluations).toBe(3);
  });

  it('a start where χ² is not finite returns it untouched, without a covariance', () => {
    const fit = levenbergMarquardt({ residualCount: 1, residuals: (p, out) => (out[0] = Math.log(p[0])) }, [-1]);
    expect(fit.stop).toBe('nonFinite');
    expect(fit.converged).toBe(false);
    expect(fit.chiSquare).toBe(Number.POSITIVE_INFINITY);
    expect(Array.from(fit.parameters)).toEqual([-1]);
    expect(fit.covariance).toBeNull();
  });

  it('parameters that enter only as their sum: the fit converges, the covariance is null (rank-deficient J)', () => {
    const fit = levenbergMarquardt({ residualCount: 3, residuals: (p, out) => [1, 2, 4].forEach((y, i) => (out[i] = y - (p[0] + p[1]))) }, [0, 0]);
    expect(fit.converged).toBe(true);
    expect(fit.parameters[0] + fit.parameters[1]).toBeCloseTo(7 / 3, 10);
    expect(fit.covariance).toBeNull();
  });

  it('covarianceRows leaves an appended prior out of the covariance, not out of the fit', () => {
    const c = lineClosedForm();
    const prior = { mean: c.b + 1, sigma: 0.05 };
    const withPrior = levenbergMarquardt(line(1, prior), [0, 0], { covarianceRows: X.length });
    // The prior pulls the slope...
    expect(withPrior.parameters[1]).toBeGreaterThan(c.b + 0.1);
    // ...but the covariance is the data's (XᵀX)⁻¹, which does not depend on where the line is.
    const cov = withPrior.covariance as Float64Array;
    expect(cov[3]).toBeCloseTo(c.varB, 8);
    const all = levenbergMarquardt(line(1, prior), [0, 0]);
    expect((all.covariance as Float64Array)[3]).toBeLessThan(prior.sigma ** 2);
  });

  it('maxIterations 0 evaluates the start only, and gives the covariance there', () => {
    const fit = levenbergMarquardt(line(), [1, 2], { maxIterations: 0 });
    expect(fit.stop).toBe('maxIterations');
    expect(fit.converged).toBe(false);
    expect(Array.from(fit.parameters)).toEqual([1, 2]);
    expect((fit.covariance as Float64Array)[3]).toBeCloseTo(lineClosedForm().varB, 8);
  });

  it('keepJacobian returns J at the solution, column-major', () => {
    const fit = levenbergMarquardt(line(), [0, 0], { keepJacobian: true });
    const j = fit.jacobian as Float64Array;
    expect(j).toHaveLength(2 * X.length);
    X.forEach((x, i) => {
      expect(j[i]).toBeCloseTo(-1, 6);
      expect(j[X.length + i]).toBeCloseTo(-x, 6);
    });
    expect(levenbergMarquardt(line(), [0, 0]).jacobian).toBeNull();
  });

  it('the pooled workspace: results do not alias it, fits of other shapes and fits run inside a residual function leave it intact', () => {
    const { y } = decayData();
    const first = levenbergMarquardt(decay(y, true), [1, 0.1]);
    const copy = Float64Array.from(first.parameters);
    // Another shape, then a residual function that runs a fit of its own on every call.
    levenbergMarquardt(rosenbrock(false), [-1.2, 1]);
    const nested = levenbergMarquardt(
      {
        residualCount: 1,
        residuals(p, out) {
          const inner = levenbergMarquardt(line(), [0, 0]);
          out[0] = p[0] - inner.parameters[1];
        },
      },
      [0],
    );
    expect(nested.parameters[0]).toBeCloseTo(levenbergMarquardt(line(), [0, 0]).parameters[1], 12);
    const again = levenbergMarquardt(decay(y, true), [1, 0.1]);
    expect(Array.from(first.parameters)).toEqual(Array.from(copy));
    expect(Array.from(again.parameters)).toEqual(Array.from(first.parameters));
    expect(again.chiSquare).toBe(first.chiSquare);
  });
});
