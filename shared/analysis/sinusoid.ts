/**
 * Sinusoidal modulation y = a + b·cos(ωx + φ) with a known period, as the linear problem
 * y = a + c·cos ωx + s·sin ωx (c = b cos φ, s = −b sin φ), solved by weighted least squares.
 * Amplitude and phase uncertainties follow from the 2×2 covariance of (c, s) by first-order
 * propagation (e.g. Bevington & Robinson, Data Reduction and Error Analysis, 3rd ed., §3.2):
 *   σ_b² = (c²σ_c² + s²σ_s² + 2cs·cov_cs)/b²,  σ_φ² = (s²σ_c² + c²σ_s² − 2cs·cov_cs)/b⁴.
 * The period is given (default 2π: x is a phase in rad), or detected with a least-squares
 * periodogram (the reduction in χ² of the sinusoid over the constant, on a frequency grid).
 */
import { AnalysisError } from './errors.ts';
import { linearLeastSquares } from './linear-least-squares.ts';

export interface SinusoidOptions {
  /** Period in units of x, or 'detect' for the periodogram. @default 2π (x is a phase in radians) */
  period?: number | 'detect';
  /**
   * With σ given, multiply the parameter σ by √(χ²/dof) when that exceeds 1 (Birge ratio), for data
   * that scatter more than their stated σ (shot-to-shot source fluctuations). @default false
   */
  inflateByReducedChiSquare?: boolean;
}

export interface SinusoidFit {
  offset: number;
  offsetSigma: number;
  /** b ≥ 0. */
  amplitude: number;
  amplitudeSigma: number;
  /** φ in (−π, π], radians. */
  phaseRad: number;
  phaseSigmaRad: number;
  /** b/a, the modulation depth, when a ≠ 0. */
  modulationDepth: number | null;
  period: number;
  periodFrom: 'given' | 'default' | 'periodogram';
  chiSquare: number;
  degreesOfFreedom: number;
  covarianceFrom: 'sigma' | 'residuals';
  /** Factor applied to the σ from the covariance (1, or the Birge ratio when inflated). */
  sigmaScale: number;
}

function fixedPeriodFit(x: ArrayLike<number>, y: ArrayLike<number>, sigma: ArrayLike<number> | undefined, period: number) {
  const w = (2 * Math.PI) / period;
  const ones = Array.from(x, () => 1);
  const cos = Array.from(x, (v) => Math.cos(w * v));
  const sin = Array.from(x, (v) => Math.sin(w * v));
  return linearLeastSquares([ones, cos, sin], y, sigma);
}

/**
 * The period (in x units) that most lowers χ² on a grid from the span of x (one cycle) to twice the
 * mean sampling step (Nyquist for even sampling), 20 grid steps per unit of span·frequency.
 */
export function detectPeriod(x: ArrayLike<number>, y: ArrayLike<number>, sigma?: ArrayLike<number>): number {
  const xs = Array.from(x);
  const span = Math.max(...xs) - Math.min(...xs);
  if (!(span > 0)) throw new AnalysisError('Cannot detect a period: every point has the same x.');
  const fMin = 1 / span;
  const fMax = (xs.length - 1) / (2 * span);
  const steps = Math.max(10, Math.ceil((fMax - fMin) * span * 20));
  let best = { f: fMin, chi: Number.POSITIVE_INFINITY };
  for (let k = 0; k <= steps; k++) {
    const f = fMin + ((fMax - fMin) * k) / steps;
    try {
      const fit = fixedPeriodFit(x, y, sigma, 1 / f);
      if (fit.chiSquare < best.chi) best = { f, chi: fit.chiSquare };
    } catch {
      // A frequency where cos and sin alias onto the constant at these x: skip it.
    }
  }
  if (!Number.isFinite(best.chi)) throw new AnalysisError('Cannot detect a period: no trial period gives a well-posed fit.');
  return 1 / best.f;
}

/** Fit y = a + b·cos(2πx/period + φ). Needs at least 4 points (3 parameters + 1). */
export function fitSinusoid(x: ArrayLike<number>, y: ArrayLike<number>, sigma?: ArrayLike<number>, options: SinusoidOptions = {}): SinusoidFit {
  if (x.length !== y.length) throw new AnalysisError(`Got ${x.length} x values and ${y.length} y values.`);
  if (x.length < 4) throw new AnalysisError(`A sinusoidal fit needs at least 4 points, got ${x.length}.`);
  const requested = options.period;
  if (typeof requested === 'number' && !(requested > 0 && Number.isFinite(requested))) throw new AnalysisError(`The period must be a positive number, got ${requested}.`);
  const period = requested === 'detect' ? detectPeriod(x, y, sigma) : (requested ?? 2 * Math.PI);
  const periodFrom = requested === 'detect' ? 'periodogram' : requested === undefined ? 'default' : 'given';
  const fit = fixedPeriodFit(x, y, sigma, period);
  const [a, c, s] = fit.parameters;
  const reduced = fit.chiSquare / fit.degreesOfFreedom;
  const sigmaScale = options.inflateByReducedChiSquare && fit.covarianceFrom === 'sigma' && reduced > 1 ? Math.sqrt(reduced) : 1;
  const cov = fit.covariance.map((row) => row.map((v) => v * sigmaScale * sigmaScale));
  const b = Math.hypot(c, s);
  const varB = b > 0 ? (c * c * cov[1][1] + s * s * cov[2][2] + 2 * c * s * cov[1][2]) / (b * b) : cov[1][1];
  const varPhi = b > 0 ? (s * s * cov[1][1] + c * c * cov[2][2] - 2 * c * s * cov[1][2]) / b ** 4 : Number.POSITIVE_INFINITY;
  return {
    offset: a,
    offsetSigma: Math.sqrt(cov[0][0]),
    amplitude: b,
    amplitudeSigma: Math.sqrt(Math.max(0, varB)),
    phaseRad: Math.atan2(-s, c),
    phaseSigmaRad: Math.sqrt(Math.max(0, varPhi)),
    modulationDepth: a !== 0 ? b / a : null,
    period,
    periodFrom,
    chiSquare: fit.chiSquare,
    degreesOfFreedom: fit.degreesOfFreedom,
    covarianceFrom: fit.covarianceFrom,
    sigmaScale,
  };
}
