/**
 * Power law y = A·x^k fitted as the straight line ln y = ln A + k·ln x (log-log least squares),
 * weighted by σ_ln y = σ_y / y (first-order propagation). Reports k, A and their covariance.
 */
import { AnalysisError } from './errors.ts';
import { linearLeastSquares } from './linear-least-squares.ts';

export interface PowerLawFit {
  exponent: number;
  exponentSigma: number;
  /** A, in y units at x = 1. */
  prefactor: number;
  /** σ_A = A·σ_lnA. */
  prefactorSigma: number;
  /** Correlation of ln A and k (strong unless x is centred near 1). */
  correlation: number;
  chiSquare: number;
  degreesOfFreedom: number;
  covarianceFrom: 'sigma' | 'residuals';
}

/** Needs ≥ 3 points with x > 0 and y > 0. */
export function fitPowerLaw(x: ArrayLike<number>, y: ArrayLike<number>, ySigma?: ArrayLike<number>): PowerLawFit {
  if (x.length !== y.length) throw new AnalysisError(`Got ${x.length} x values and ${y.length} y values.`);
  if (x.length < 3) throw new AnalysisError(`A power-law fit needs at least 3 points, got ${x.length}.`);
  for (let i = 0; i < x.length; i++) {
    if (!(x[i] > 0) || !(y[i] > 0)) throw new AnalysisError(`A power law needs x > 0 and y > 0; point ${i} has x = ${x[i]}, y = ${y[i]}.`);
  }
  const lx = Array.from(x, Math.log);
  const ly = Array.from(y, Math.log);
  const sigma = ySigma ? Array.from(y, (v, i) => ySigma[i] / v) : undefined;
  const fit = linearLeastSquares([lx.map(() => 1), lx], ly, sigma);
  const [lnA, k] = fit.parameters;
  const cov = fit.covariance;
  const prefactor = Math.exp(lnA);
  return {
    exponent: k,
    exponentSigma: Math.sqrt(cov[1][1]),
    prefactor,
    prefactorSigma: prefactor * Math.sqrt(cov[0][0]),
    correlation: cov[0][1] / Math.sqrt(cov[0][0] * cov[1][1]),
    chiSquare: fit.chiSquare,
    degreesOfFreedom: fit.degreesOfFreedom,
    covarianceFrom: fit.covarianceFrom,
  };
}
