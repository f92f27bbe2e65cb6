/**
 * Weighted linear least squares y ≈ X·β through Householder QR (never the normal equations), with
 * the textbook covariance: (XᵀWX)⁻¹ when the σ are known absolutely, else scaled by the residual
 * variance s² = χ²/(n − p) (e.g. Press et al., Numerical Recipes, 3rd ed., §15.4).
 */
import { householderQr, qrSolve, unscaledCovariance } from '../engine/dispersion/householder.ts';
import { AnalysisError } from './errors.ts';

export interface LinearFit {
  parameters: number[];
  /** Covariance of `parameters`. */
  covariance: number[][];
  /** Σ ((y − ŷ)/σ)²; plain residual sum of squares when no σ were given. */
  chiSquare: number;
  degreesOfFreedom: number;
  /** How the covariance was scaled: by the given σ, or by the residual variance when σ were not given. */
  covarianceFrom: 'sigma' | 'residuals';
}

/**
 * @param columns the basis functions evaluated at every point: `columns[j][i]` = f_j(x_i).
 * @param sigma 1-σ uncertainty of each y; omitted → unit weights and covariance from the residuals.
 */
export function linearLeastSquares(columns: ArrayLike<number>[], y: ArrayLike<number>, sigma?: ArrayLike<number>): LinearFit {
  const rows = y.length;
  const cols = columns.length;
  if (rows <= cols) throw new AnalysisError(`A fit of ${cols} parameters needs more than ${cols} points, got ${rows}.`);
  if (sigma && sigma.length !== rows) throw new AnalysisError(`Got ${sigma.length} uncertainties for ${rows} points.`);
  const a = new Float64Array(rows * cols);
  const b = new Float64Array(rows);
  for (let i = 0; i < rows; i++) {
    const s = sigma ? sigma[i] : 1;
    if (!(s > 0) || !Number.isFinite(s)) throw new AnalysisError(`Point ${i} has uncertainty ${s}; every uncertainty must be a positive number.`);
    if (!Number.isFinite(y[i])) throw new AnalysisError(`Point ${i} has value ${y[i]}; every value must be finite.`);
    b[i] = y[i] / s;
    for (let j = 0; j < cols; j++) {
      const v = columns[j][i];
      if (!Number.isFinite(v)) throw new AnalysisError(`Basis ${j} is not finite at point ${i}.`);
      a[j * rows + i] = v / s;
    }
  }
  const f = householderQr({ rows, cols, a });
  const scale = Math.max(...Array.from(f.rDiag, Math.abs));
  if (Array.from(f.rDiag).some((d) => !(Math.abs(d) > 1e-12 * scale))) {
    throw new AnalysisError('The basis functions are linearly dependent at these points (e.g. every point at the same value); the fit has no unique answer.');
  }
  const beta = qrSolve(f, b);
  let chiSquare = 0;
  for (let i = 0; i < rows; i++) {
    let r = b[i];
    for (let j = 0; j < cols; j++) r -= a[j * rows + i] * beta[j];
    chiSquare += r * r;
  }
  const dof = rows - cols;
  const unscaled = unscaledCovariance(f);
  const factor = sigma ? 1 : chiSquare / dof;
  return {
    parameters: Array.from(beta),
    covariance: unscaled.map((row) => row.map((v) => v * factor)),
    chiSquare,
    degreesOfFreedom: dof,
    covarianceFrom: sigma ? 'sigma' : 'residuals',
  };
}
