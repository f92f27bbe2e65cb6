/**
 * Leave-one-out (deleted) residuals from a single least-squares fit, by the leverage formula.
 *
 * For weighted linear least squares with whitened design M (rows m_i = √w_i·a_i) and whitened
 * residuals r, deleting point i moves the solution by
 *   x̂_(i) − x̂ = −(MᵀM)⁻¹ m_iᵀ r_i / (1 − h_ii),   h_ii = m_i (MᵀM)⁻¹ m_iᵀ,
 * and its deleted residual is r_i / (1 − h_ii) (Sherman–Morrison; Cook & Weisberg, "Residuals and
 * Influence in Regression", 1982, §2.2; Belsley, Kuh & Welsch 1980, eq. 2.1). Exact for a linear
 * model. For a nonlinear model linearised at the optimum (Jacobian J of the residuals) the same
 * shift is exactly one Gauss–Newton step of the leave-i-out problem from the full solution, so
 * it is first-order accurate (Cook & Weisberg's "one-step" approximation).
 *
 * Everything comes from the Householder QR already computed for the fit: with M·S⁻¹ = Q₁R,
 * h_ii = ‖q_i‖² and (MᵀM)⁻¹ m_iᵀ = S⁻¹ R⁻¹ q_iᵀ, so MᵀM is never formed nor inverted.
 */
import type { QrFactors } from './householder.ts';

export interface DeletionShifts {
  /** h_ii for the first `dataRows` rows (rows after those, e.g. penalty rows, are never deleted). */
  leverage: Float64Array;
  /**
   * Row-major dataRows × cols: (MᵀM)⁻¹ m_iᵀ r_i / (1 − h_ii) in the original (unscaled) columns;
   * NaN where h_ii is 1 to rounding (the point alone fixes a direction of the fit).
   */
  shifts: Float64Array;
}

/** Q₁ of the factored (column-scaled) matrix, column-major rows × cols. */
function thinQ(f: QrFactors): Float64Array {
  const { rows, cols, qr } = f;
  const q = new Float64Array(rows * cols);
  for (let k = 0; k < cols; k++) {
    const e = q.subarray(k * rows, (k + 1) * rows);
    e[k] = 1;
    // Q e_k = H_0 H_1 … H_{cols−1} e_k: apply the reflectors last first.
    for (let j = cols - 1; j >= 0; j--) {
      const d = qr[j * rows + j];
      if (d === 0) continue;
      let s = 0;
      for (let i = j; i < rows; i++) s += qr[j * rows + i] * e[i];
      s = -s / d;
      for (let i = j; i < rows; i++) e[i] += s * qr[j * rows + i];
    }
  }
  return q;
}

/**
 * Leverages and deletion shifts of the first `dataRows` rows of the factored matrix M, given the
 * residuals r at the solution (in the same whitened units as M's rows). The sign convention is
 * the caller's: if M = ∂r/∂x (r = observed − model, so M = −design), x̂_(i) = x̂ + shift_i; if M is
 * the design itself, x̂_(i) = x̂ − shift_i.
 */
export function deletionShifts(f: QrFactors, residuals: ArrayLike<number>, dataRows: number): DeletionShifts {
  const { rows, cols, qr, rDiag, colScale } = f;
  const q = thinQ(f);
  const leverage = new Float64Array(dataRows);
  const shifts = new Float64Array(dataRows * cols);
  const z = new Float64Array(cols);
  for (let i = 0; i < dataRows; i++) {
    let h = 0;
    for (let k = 0; k < cols; k++) h += q[k * rows + i] ** 2;
    leverage[i] = h;
    const out = shifts.subarray(i * cols, (i + 1) * cols);
    const denom = 1 - h;
    if (!(denom > 1e-12)) {
      out.fill(Number.NaN);
      continue;
    }
    // Back-substitute R z = q_iᵀ, then undo the column scaling.
    for (let k = cols - 1; k >= 0; k--) {
      let s = q[k * rows + i];
      for (let j = k + 1; j < cols; j++) s -= qr[j * rows + k] * z[j];
      z[k] = s / rDiag[k];
    }
    const factor = residuals[i] / denom;
    for (let k = 0; k < cols; k++) out[k] = (z[k] / colScale[k]) * factor;
  }
  return { leverage, shifts };
}
