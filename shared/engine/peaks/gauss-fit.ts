/**
 * Weighted least-squares fit of a sum of Gaussians on a linear baseline, by Levenberg–Marquardt
 * with Marquardt's diagonal scaling and the analytic Jacobian.
 *
 * Model: f(x) = Σ_k A_k·exp(−(x − μ_k)² / (2σ_k²)) + c0 + c1·(x − xRef).
 * Parameters are packed [A_0, μ_0, σ_0, A_1, μ_1, σ_1, …, c0, c1].
 *
 * Why our own solver and not ml-levenberg-marquardt 5.1 (which the tests use as an independent
 * check): that one stops only on maxIterations or an absolute chi² below errorTolerance, so it
 * always runs every iteration on real data; its damping is additive (λ·I), which mixes
 * parameters of very different scale (amplitudes of 1e4 counts, centres in pixels); and it
 * returns no covariance, which is what the centre uncertainty is made of.
 */

export interface GaussFitInput {
  x: Float64Array;
  y: Float64Array;
  /** Weights 1/variance per point. */
  weight: Float64Array;
  /** Number of Gaussians. */
  count: number;
  initial: Float64Array;
  lower: Float64Array;
  upper: Float64Array;
  xRef: number;
  maxIterations?: number;
}

export interface GaussFitResult {
  params: Float64Array;
  /** (JᵀWJ)⁻¹ at the solution, row-major n×n, not scaled by chi². */
  covariance: Float64Array;
  chiSquare: number;
  degreesOfFreedom: number;
  converged: boolean;
}

/** Evaluates the model and its Jacobian rows at every point. */
function evaluate(input: GaussFitInput, params: Float64Array, model: Float64Array, jac: Float64Array | null): void {
  const { x, count, xRef } = input;
  const n = params.length;
  const c0 = params[3 * count];
  const c1 = params[3 * count + 1];
  for (let i = 0; i < x.length; i++) {
    const xi = x[i];
    let f = c0 + c1 * (xi - xRef);
    const row = i * n;
    for (let k = 0; k < count; k++) {
      const a = params[3 * k];
      const mu = params[3 * k + 1];
      const s = params[3 * k + 2];
      const d = xi - mu;
      const inv = 1 / (s * s);
      const g = Math.exp(-0.5 * d * d * inv);
      f += a * g;
      if (jac) {
        jac[row + 3 * k] = g;
        jac[row + 3 * k + 1] = a * g * d * inv;
        jac[row + 3 * k + 2] = (a * g * d * d * inv) / s;
      }
    }
    if (jac) {
      jac[row + 3 * count] = 1;
      jac[row + 3 * count + 1] = xi - xRef;
    }
    model[i] = f;
  }
}

/** In-place Cholesky of a symmetric n×n matrix (lower triangle); false when not positive definite. */
function cholesky(a: Float64Array, n: number): boolean {
  for (let j = 0; j < n; j++) {
    let d = a[j * n + j];
    for (let k = 0; k < j; k++) d -= a[j * n + k] * a[j * n + k];
    if (!(d > 0)) return false;
    const ljj = Math.sqrt(d);
    a[j * n + j] = ljj;
    for (let i = j + 1; i < n; i++) {
      let s = a[i * n + j];
      for (let k = 0; k < j; k++) s -= a[i * n + k] * a[j * n + k];
      a[i * n + j] = s / ljj;
    }
  }
  return true;
}

/** Solves L·Lᵀ·x = b with the factor from {@link cholesky}, in place on b. */
function choleskySolve(l: Float64Array, n: number, b: Float64Array): void {
  for (let i = 0; i < n; i++) {
    let s = b[i];
    for (let k = 0; k < i; k++) s -= l[i * n + k] * b[k];
    b[i] = s / l[i * n + i];
  }
  for (let i = n - 1; i >= 0; i--) {
    let s = b[i];
    for (let k = i + 1; k < n; k++) s -= l[k * n + i] * b[k];
    b[i] = s / l[i * n + i];
  }
}

function normalEquations(input: GaussFitInput, jac: Float64Array, resid: Float64Array, n: number, jtj: Float64Array, jtr: Float64Array): void {
  jtj.fill(0);
  jtr.fill(0);
  const w = input.weight;
  for (let i = 0; i < resid.length; i++) {
    const row = i * n;
    const wi = w[i];
    for (let a = 0; a < n; a++) {
      const ja = jac[row + a] * wi;
      if (ja === 0) continue;
      jtr[a] += ja * resid[i];
      for (let b = 0; b <= a; b++) jtj[a * n + b] += ja * jac[row + b];
    }
  }
  for (let a = 0; a < n; a++) for (let b = 0; b < a; b++) jtj[b * n + a] = jtj[a * n + b];
}

function chiSquare(input: GaussFitInput, model: Float64Array, resid: Float64Array): number {
  let chi = 0;
  for (let i = 0; i < model.length; i++) {
    const r = input.y[i] - model[i];
    resid[i] = r;
    chi += r * r * input.weight[i];
  }
  return chi;
}

/** Fits the model; returns null when the normal matrix is singular at the solution. */
export function fitGaussians(input: GaussFitInput): GaussFitResult | null {
  const n = input.initial.length;
  const m = input.x.length;
  const maxIterations = input.maxIterations ?? 100;
  const params = Float64Array.from(input.initial);
  const trial = new Float64Array(n);
  const model = new Float64Array(m);
  const resid = new Float64Array(m);
  const jac = new Float64Array(m * n);
  const jtj = new Float64Array(n * n);
  const jtr = new Float64Array(n);
  const system = new Float64Array(n * n);
  const step = new Float64Array(n);
  evaluate(input, params, model, jac);
  let chi = chiSquare(input, model, resid);
  let lambda = 1e-3;
  let converged = false;
  for (let iter = 0; iter < maxIterations && !converged; iter++) {
    normalEquations(input, jac, resid, n, jtj, jtr);
    let accepted = false;
    for (let tries = 0; tries < 12 && !accepted; tries++) {
      system.set(jtj);
      for (let a = 0; a < n; a++) system[a * n + a] = jtj[a * n + a] * (1 + lambda) + 1e-300;
      step.set(jtr);
      if (!cholesky(system, n)) {
        lambda *= 10;
        continue;
      }
      choleskySolve(system, n, step);
      for (let a = 0; a < n; a++) {
        const v = params[a] + step[a];
        trial[a] = Math.min(input.upper[a], Math.max(input.lower[a], v));
      }
      evaluate(input, trial, model, null);
      const trialChi = chiSquare(input, model, resid);
      if (trialChi <= chi) {
        const improvement = chi - trialChi;
        params.set(trial);
        evaluate(input, params, model, jac);
        chi = chiSquare(input, model, resid);
        lambda = Math.max(lambda / 10, 1e-12);
        accepted = true;
        // Converged when chi² no longer moves (relative to its size and to one unit of chi²).
        // (a tiny gain at heavy damping is only a short step, not convergence).
        if (improvement <= 1e-7 * Math.max(chi, 1) && lambda <= 1e-2) converged = true;
      } else {
        lambda *= 10;
      }
    }
    if (!accepted) {
      // No downhill step at any damping: we sit at a minimum (within the bounds).
      converged = true;
      evaluate(input, params, model, jac);
      chi = chiSquare(input, model, resid);
    }
  }
  normalEquations(input, jac, resid, n, jtj, jtr);
  const factor = Float64Array.from(jtj);
  if (!cholesky(factor, n)) return null;
  const covariance = new Float64Array(n * n);
  const col = new Float64Array(n);
  for (let j = 0; j < n; j++) {
    col.fill(0);
    col[j] = 1;
    choleskySolve(factor, n, col);
    for (let i = 0; i < n; i++) covariance[i * n + j] = col[i];
  }
  return { params, covariance, chiSquare: chi, degreesOfFreedom: m - n, converged };
}
