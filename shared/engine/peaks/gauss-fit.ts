/**
 * Weighted least-squares fit of a sum of Gaussians on a linear baseline, by the engine's
 * Levenberg–Marquardt (fit/levenberg-marquardt.ts) with the analytic Jacobian and hard box
 * bounds.
 *
 * Model: f(x) = Σ_k A_k·exp(−(x − μ_k)² / (2σ_k²)) + c0 + c1·(x − xRef).
 * Parameters are packed [A_0, μ_0, σ_0, A_1, μ_1, σ_1, …, c0, c1]; the residuals handed to the
 * solver are √w_i·(y_i − f(x_i)).
 *
 * Why not ml-levenberg-marquardt 5.1 (which the tests use as an independent check): it stops
 * only on maxIterations or an absolute chi² below errorTolerance, so it always runs every
 * iteration on real data; its damping is additive (λ·I), which mixes parameters of very
 * different scale (amplitudes of 1e4 counts, centres in pixels); and it returns no covariance,
 * which is what the centre uncertainty is made of.
 */
import { levenbergMarquardt } from '../fit/levenberg-marquardt.ts';

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

/**
 * Stopping: χ² to 1e-7 relative (MINPACK's ftol). On the 966 windows findPeaks fits on our
 * simulated frames and lineouts, the centres then lie within 2e-4 σ of a fit run to ftol 1e-15
 * for 99 % of lines (1.9e-3 σ at worst): a centre's own uncertainty dwarfs that, and each decade
 * tighter costs about one more iteration per line.
 */
const FTOL = 1e-7;

/**
 * Scratch kept between fits (√w, and the Gaussians of the last residual evaluation with the
 * parameters they belong to): the solver asks for the Jacobian at the point it has just accepted,
 * so the exponentials need not be computed twice. fitGaussians never runs inside itself.
 */
let scratch = new Float64Array(1024);

/** Fits the model; returns null when the Jacobian is rank-deficient at the solution. */
export function fitGaussians(input: GaussFitInput): GaussFitResult | null {
  const { x, y, count, xRef } = input;
  const n = input.initial.length;
  const m = x.length;
  // Layout of the scratch: √w [0, m), Gaussians [m, m + count·m) row k·m + i, their parameters after.
  const gAt = m;
  const pAt = m + count * m;
  if (scratch.length < pAt + n) scratch = new Float64Array(2 * (pAt + n));
  const w = scratch;
  for (let i = 0; i < m; i++) w[i] = Math.sqrt(input.weight[i]);
  w[pAt] = Number.NaN; // no Gaussians cached yet
  const problem = {
    residualCount: m,
    residuals(p: Float64Array, out: Float64Array): void {
      const c0 = p[3 * count];
      const c1 = p[3 * count + 1];
      for (let i = 0; i < m; i++) out[i] = c0 + c1 * (x[i] - xRef);
      for (let k = 0; k < count; k++) {
        const a = p[3 * k];
        const mu = p[3 * k + 1];
        const s = p[3 * k + 2];
        const inv = 1 / (s * s);
        const row = gAt + k * m;
        for (let i = 0; i < m; i++) {
          const d = x[i] - mu;
          const g = Math.exp(-0.5 * d * d * inv);
          w[row + i] = g;
          out[i] += a * g;
        }
      }
      for (let i = 0; i < m; i++) out[i] = w[i] * (y[i] - out[i]);
      for (let j = 0; j < n; j++) w[pAt + j] = p[j];
    },
    /** ∂r/∂p = −√w·∂f/∂p, column-major. */
    jacobian(p: Float64Array, out: Float64Array): void {
      let cached = true;
      for (let j = 0; j < n; j++) if (w[pAt + j] !== p[j]) cached = false;
      for (let k = 0; k < count; k++) {
        const a = p[3 * k];
        const mu = p[3 * k + 1];
        const s = p[3 * k + 2];
        const inv = 1 / (s * s);
        const row = gAt + k * m;
        const colA = 3 * k * m;
        const colMu = colA + m;
        const colS = colMu + m;
        for (let i = 0; i < m; i++) {
          const d = x[i] - mu;
          const g = cached ? w[row + i] : Math.exp(-0.5 * d * d * inv);
          const wg = -w[i] * g;
          out[colA + i] = wg;
          out[colMu + i] = wg * a * d * inv;
          out[colS + i] = (wg * a * d * d * inv) / s;
        }
      }
      const col0 = 3 * count * m;
      const col1 = col0 + m;
      for (let i = 0; i < m; i++) {
        out[col0 + i] = -w[i];
        out[col1 + i] = -w[i] * (x[i] - xRef);
      }
    },
  };
  const fit = levenbergMarquardt(problem, input.initial, {
    lower: input.lower,
    upper: input.upper,
    maxIterations: input.maxIterations ?? 100,
    ftol: FTOL,
    xtol: FTOL,
  });
  if (!fit.covariance) return null;
  return { params: fit.parameters, covariance: fit.covariance, chiSquare: fit.chiSquare, degreesOfFreedom: m - n, converged: fit.converged };
}
