/**
 * A small damped Gauss–Newton (Levenberg–Marquardt) solver for the assigner's few-parameter
 * grating fits (2–6 parameters, a few dozen residuals). Written here rather than taken from a
 * library because the search calls it thousands of times per frame: it works on plain
 * Float64Arrays, builds the forward-difference Jacobian itself and solves the normal equations
 * by Cholesky, so one call costs microseconds.
 *
 * Soft walls (bounds) are not handled here: the caller appends them to the residual vector as
 * extra residuals, which keeps the problem smooth (plain clipping at bounds stalled in the
 * prototype; see ENGINE-NOTES.md).
 */

export interface LmProblem {
  /** Residuals (already divided by their standard deviations) at parameters `p`; write into `out`. */
  residuals(p: Float64Array, out: Float64Array): void;
  residualCount: number;
  /** Forward-difference step per parameter (absolute). */
  steps: Float64Array;
}

export interface LmResult {
  parameters: Float64Array;
  chiSquare: number;
  /** JᵀJ at the solution (row-major, n×n), for the covariance. */
  normalMatrix: Float64Array;
  iterations: number;
  converged: boolean;
}

/** Cholesky solve of the symmetric positive-definite n×n system A x = b; false when A is not SPD. */
export function choleskySolve(a: Float64Array, b: Float64Array, n: number, x: Float64Array): boolean {
  const l = new Float64Array(n * n);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j <= i; j++) {
      let sum = a[i * n + j];
      for (let k = 0; k < j; k++) sum -= l[i * n + k] * l[j * n + k];
      if (i === j) {
        if (!(sum > 0)) return false;
        l[i * n + i] = Math.sqrt(sum);
      } else {
        l[i * n + j] = sum / l[j * n + j];
      }
    }
  }
  const y = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    let sum = b[i];
    for (let k = 0; k < i; k++) sum -= l[i * n + k] * y[k];
    y[i] = sum / l[i * n + i];
  }
  for (let i = n - 1; i >= 0; i--) {
    let sum = y[i];
    for (let k = i + 1; k < n; k++) sum -= l[k * n + i] * x[k];
    x[i] = sum / l[i * n + i];
  }
  return true;
}

/** Inverse of a symmetric positive-definite matrix (row-major); null when singular. */
export function invertSpd(a: Float64Array, n: number): Float64Array | null {
  const inv = new Float64Array(n * n);
  const e = new Float64Array(n);
  const col = new Float64Array(n);
  for (let j = 0; j < n; j++) {
    e.fill(0);
    e[j] = 1;
    if (!choleskySolve(a, e, n, col)) return null;
    for (let i = 0; i < n; i++) inv[i * n + j] = col[i];
  }
  return inv;
}

function sumSquares(r: Float64Array): number {
  let s = 0;
  for (let i = 0; i < r.length; i++) s += r[i] * r[i];
  return s;
}

/** Minimise Σ r² from `start`; never throws, returns the best point reached. */
export function levenbergMarquardt(problem: LmProblem, start: Float64Array, maxIterations = 60): LmResult {
  const n = start.length;
  const m = problem.residualCount;
  let p = Float64Array.from(start);
  const r = new Float64Array(m);
  const rTrial = new Float64Array(m);
  const jac = new Float64Array(m * n);
  const jtj = new Float64Array(n * n);
  const jtr = new Float64Array(n);
  const a = new Float64Array(n * n);
  const delta = new Float64Array(n);
  const trial = new Float64Array(n);
  problem.residuals(p, r);
  let chi = sumSquares(r);
  if (!Number.isFinite(chi)) chi = Number.POSITIVE_INFINITY;
  let lambda = 1e-3;
  let iterations = 0;
  let converged = false;

  const buildJacobian = (): void => {
    const pert = Float64Array.from(p);
    for (let j = 0; j < n; j++) {
      const h = problem.steps[j];
      pert[j] = p[j] + h;
      problem.residuals(pert, rTrial);
      for (let i = 0; i < m; i++) jac[i * n + j] = (rTrial[i] - r[i]) / h;
      pert[j] = p[j];
    }
    jtj.fill(0);
    jtr.fill(0);
    for (let i = 0; i < m; i++) {
      for (let j = 0; j < n; j++) {
        const jij = jac[i * n + j];
        if (jij === 0) continue;
        jtr[j] += jij * r[i];
        for (let k = 0; k <= j; k++) jtj[j * n + k] += jij * jac[i * n + k];
      }
    }
    for (let j = 0; j < n; j++) for (let k = 0; k < j; k++) jtj[k * n + j] = jtj[j * n + k];
  };

  if (Number.isFinite(chi)) buildJacobian();
  while (iterations < maxIterations && Number.isFinite(chi)) {
    iterations++;
    let improved = false;
    for (let attempt = 0; attempt < 12; attempt++) {
      for (let j = 0; j < n * n; j++) a[j] = jtj[j];
      for (let j = 0; j < n; j++) a[j * n + j] += lambda * Math.max(jtj[j * n + j], 1e-12) + 1e-15;
      for (let j = 0; j < n; j++) jtr[j] = -jtr[j];
      const ok = choleskySolve(a, jtr, n, delta);
      for (let j = 0; j < n; j++) jtr[j] = -jtr[j];
      if (!ok) {
        lambda *= 10;
        continue;
      }
      for (let j = 0; j < n; j++) trial[j] = p[j] + delta[j];
      problem.residuals(trial, rTrial);
      const chiTrial = sumSquares(rTrial);
      if (Number.isFinite(chiTrial) && chiTrial < chi) {
        const gain = chi - chiTrial;
        p = Float64Array.from(trial);
        r.set(rTrial);
        chi = chiTrial;
        lambda = Math.max(lambda / 5, 1e-9);
        improved = true;
        // Converged when a step gains less than 1e-6 of χ² (+1): far below the 1-unit changes that matter for scores.
        if (gain < 1e-6 * (1 + chi)) converged = true;
        break;
      }
      lambda *= 8;
    }
    if (!improved) {
      converged = true;
      break;
    }
    buildJacobian();
    if (converged) break;
  }
  if (Number.isFinite(chi)) buildJacobian();
  return { parameters: p, chiSquare: chi, normalMatrix: Float64Array.from(jtj), iterations, converged };
}
