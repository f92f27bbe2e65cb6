/**
 * A small bounded nonlinear least-squares fit for the evaluation's own checks, written here so
 * that the measuring instrument shares no fitting code with the engine it measures.
 *
 * Method: projected Levenberg–Marquardt with an active set (common practice). Parameters are
 * scaled to x ∈ [0, 1] over their bounds; each damped step solves min ‖[J; √λ·D] δ + [r; 0]‖ by
 * Householder QR (no normal equations; D = column norms, Marquardt's scaling) over the free
 * parameters only, and the trial is projected back onto the box. A parameter on a bound whose
 * gradient points outward is held for that step (otherwise the projection would eat every step
 * and the fit would stall short of the optimum). Jacobian by one-sided differences that stay
 * inside the box.
 */

export interface BoundedFitOptions {
  /** @default 200 */
  maxIterations?: number;
  /** Stop when an accepted step lowers χ² by less than this fraction. @default 1e-10 */
  relativeTolerance?: number;
  /** Stop when an accepted step lowers χ² by less than this amount. @default 0 */
  absoluteTolerance?: number;
}

export interface BoundedFitResult {
  parameters: number[];
  chiSquare: number;
  iterations: number;
}

/** Solves min ‖A x − b‖ (A m×k row-major in `a`, m ≥ k) by Householder QR; columns with no weight get 0. */
export function solveLeastSquares(a: Float64Array, b: Float64Array, m: number, k: number): Float64Array {
  const A = Float64Array.from(a);
  const y = Float64Array.from(b);
  const diagonal = new Float64Array(k);
  for (let j = 0; j < k; j += 1) {
    let norm = 0;
    for (let i = j; i < m; i += 1) norm += A[i * k + j] ** 2;
    norm = Math.sqrt(norm);
    if (norm === 0) {
      diagonal[j] = 0;
      continue;
    }
    const alpha = A[j * k + j] > 0 ? -norm : norm;
    // v = column − alpha·e_j, stored in place; H = I − 2 v vᵀ / (vᵀ v).
    A[j * k + j] -= alpha;
    let vv = 0;
    for (let i = j; i < m; i += 1) vv += A[i * k + j] ** 2;
    for (let c = j + 1; c < k; c += 1) {
      let dot = 0;
      for (let i = j; i < m; i += 1) dot += A[i * k + j] * A[i * k + c];
      const f = (2 * dot) / vv;
      for (let i = j; i < m; i += 1) A[i * k + c] -= f * A[i * k + j];
    }
    let dot = 0;
    for (let i = j; i < m; i += 1) dot += A[i * k + j] * y[i];
    const f = (2 * dot) / vv;
    for (let i = j; i < m; i += 1) y[i] -= f * A[i * k + j];
    diagonal[j] = alpha;
  }
  const x = new Float64Array(k);
  for (let j = k - 1; j >= 0; j -= 1) {
    if (diagonal[j] === 0) continue;
    let s = y[j];
    for (let c = j + 1; c < k; c += 1) s -= A[j * k + c] * x[c];
    x[j] = s / diagonal[j];
  }
  return x;
}

function sumSquares(r: readonly number[]): number {
  let s = 0;
  for (const v of r) s += v * v;
  return s;
}

function clamp01(v: number): number {
  return Math.min(1, Math.max(0, v));
}

/**
 * Minimises Σ r_i(p)² with lower[j] ≤ p[j] ≤ upper[j], from `start` (projected into the box).
 * `residuals` must return the same number of finite values on every call.
 */
export function boundedLeastSquares(
  residuals: (p: readonly number[]) => number[],
  start: readonly number[],
  lower: readonly number[],
  upper: readonly number[],
  options: BoundedFitOptions = {},
): BoundedFitResult {
  const k = start.length;
  if (lower.length !== k || upper.length !== k) throw new Error('boundedLeastSquares: start, lower and upper must have the same length');
  for (let j = 0; j < k; j += 1) if (!(upper[j] > lower[j])) throw new Error(`boundedLeastSquares: bound ${j} is empty ([${lower[j]}, ${upper[j]}])`);
  const maxIterations = options.maxIterations ?? 200;
  const tolerance = options.relativeTolerance ?? 1e-10;
  const absoluteTolerance = options.absoluteTolerance ?? 0;
  const external = (x: readonly number[]): number[] => x.map((v, j) => lower[j] + v * (upper[j] - lower[j]));
  let x = start.map((p, j) => clamp01((p - lower[j]) / (upper[j] - lower[j])));
  let r = residuals(external(x));
  let chi = sumSquares(r);
  const m = r.length;
  let lambda = 1e-3;
  let iterations = 0;
  const h = 1e-7;
  for (; iterations < maxIterations && chi > 1e-24; iterations += 1) {
    const J = new Float64Array(m * k);
    const gradient = new Float64Array(k);
    const scale = new Float64Array(k);
    for (let j = 0; j < k; j += 1) {
      const shifted = x.slice();
      const step = x[j] + h <= 1 ? h : -h;
      shifted[j] += step;
      const rj = residuals(external(shifted));
      let norm = 0;
      for (let i = 0; i < m; i += 1) {
        const d = (rj[i] - r[i]) / step;
        J[i * k + j] = d;
        norm += d * d;
        gradient[j] += d * r[i];
      }
      scale[j] = Math.max(Math.sqrt(norm), 1e-12);
    }
    // Held: on a bound with the descent direction (−gradient) pointing out of the box.
    const free: number[] = [];
    for (let j = 0; j < k; j += 1) {
      const heldLow = x[j] <= 0 && gradient[j] > 0;
      const heldHigh = x[j] >= 1 && gradient[j] < 0;
      if (!heldLow && !heldHigh) free.push(j);
    }
    if (free.length === 0) break;
    const f = free.length;
    let accepted = false;
    let improvement = 0;
    let drop = 0;
    for (let inner = 0; inner < 12; inner += 1) {
      const A = new Float64Array((m + f) * f);
      for (let i = 0; i < m; i += 1) for (let c = 0; c < f; c += 1) A[i * f + c] = J[i * k + free[c]];
      for (let c = 0; c < f; c += 1) A[(m + c) * f + c] = Math.sqrt(lambda) * scale[free[c]];
      const b = new Float64Array(m + f);
      for (let i = 0; i < m; i += 1) b[i] = -r[i];
      const delta = solveLeastSquares(A, b, m + f, f);
      const trial = x.slice();
      free.forEach((j, c) => {
        trial[j] = clamp01(x[j] + delta[c]);
      });
      const rt = residuals(external(trial));
      const chiTrial = sumSquares(rt);
      if (Number.isFinite(chiTrial) && chiTrial < chi) {
        improvement = (chi - chiTrial) / chi;
        drop = chi - chiTrial;
        x = trial;
        r = rt;
        chi = chiTrial;
        lambda = Math.max(lambda / 5, 1e-12);
        accepted = true;
        break;
      }
      lambda *= 8;
      if (lambda > 1e12) break;
    }
    if (!accepted || improvement < tolerance || drop < absoluteTolerance) break;
  }
  return { parameters: external(x), chiSquare: chi, iterations };
}
