/**
 * Physical dispersion map: fit the free entries of a GratingGeometry so that the grating equation
 * (grating.ts) puts each line where it was seen.
 *
 * Residuals are in pixels: (observed pixel − wavelengthToPixel(g, λ, m)) / pixelSigma. The
 * minimiser is the engine's Levenberg–Marquardt (fit/levenberg-marquardt.ts: Marquardt's diagonal
 * scaling, each step from the QR of the augmented system [J; √μ·D] rather than the normal
 * equations, MINPACK-style stopping) with a central-difference Jacobian, which it also returns at
 * the solution for the covariance and the leverages. Not ml-levenberg-marquardt: that library
 * inverts JᵀJ, offers only hard box bounds and a fixed damping schedule.
 *
 * Soft bounds: outside [lo, hi] a parameter pays a penalty residual excess / (1e-6·(hi − lo)), a
 * steep quadratic wall that stays differentiable for LM; penalties never enter the reported χ²,
 * and the covariance (data Jacobian only) ignores an active bound. The central diffraction angle and the detector centre
 * pixel move the spectrum the same way: freeing both is refused.
 *
 * Leave-one-out residuals by default come from the single fit: e_(i) = r_i/(1 − h_ii), with
 * h_ii = ‖row i of Q₁‖² from the Householder QR of the weighted Jacobian at the optimum
 * (Sherman–Morrison; Cook & Weisberg, "Residuals and Influence in Regression", 1982, §2.2).
 * Exact for a linear model; for this one first order: it sees only the model's tangent plane,
 * so it is untouched by the large parameter-effects curvature of correlated geometry entries
 * (Bates & Watts 1980), which is why it beats evaluating the model at the one-step deleted
 * parameters θ̂ + (JᵀJ)⁻¹J_iᵀr_i/(1 − h_ii) (off by ~0.3 σ on the bench frames, against ~1e-4 σ
 * here). Points with h_ii > 0.5 are refitted exactly; `leaveOneOut: 'refit'` refits all.
 */
import { EngineError } from '../errors.ts';
import { pixelToWavelengthNm, wavelengthToPixel } from '../grating.ts';
import type { Calibration, GratingGeometry } from '../types.ts';
import { type GratingParameter, GRATING_PARAMETERS, parameterStep, withParameters } from './evaluate.ts';
import { levenbergMarquardt, type LevenbergMarquardtResult } from '../fit/levenberg-marquardt.ts';
import { householderQr, leverages } from './householder.ts';
import { conditionOfQr } from './polynomial-fit.ts';

export interface GratingMapPoint {
  pixel: number;
  pixelSigma: number;
  /** True wavelength of the line, nm. */
  wavelengthNm: number;
  /** Diffraction order m ≥ 1 the line was seen in. */
  diffractionOrder: number;
}

export interface GratingMapOptions {
  /** Geometry entries to fit; the others stay at the start geometry's values. */
  free: GratingParameter[];
  /** Soft bounds per free parameter. @default none */
  bounds?: Partial<Record<GratingParameter, [number, number]>>;
  /** Extra starts besides `start` (deterministic offsets). @default 4 */
  restarts?: number;
  /** LM iteration limit per start. @default 200 */
  maxIterations?: number;
  /**
   * Leave-one-out residuals: 'leverage' takes them from the one fit, r_i/(1 − h_ii) linearised at
   * the optimum, and refits exactly only points with leverage above 0.5;
   * 'refit' refits without each point in turn (n more fits). @default 'leverage'
   */
  leaveOneOut?: 'leverage' | 'refit';
}

export interface GratingMapFit {
  grating: NonNullable<Calibration['grating']>;
  /** Observed − predicted pixel. */
  residualsPx: number[];
  /** λ_i − λ(p_i) in true-wavelength terms (first-order map / m), nm. */
  residualsNm: number[];
  /** Observed − predicted pixel with the point left out of the fit. */
  leaveOneOutResidualsPx: number[];
  leaveOneOutResidualsNm: number[];
  /** Leverage h_ii of each point at the solution (diagonal of the hat matrix). */
  leverages: number[];
  chiSquare: number;
  /** χ² / (n − free parameters). */
  reducedChiSquare: number;
  residualRmsNm: number;
  /** Condition number of the equilibrated weighted Jacobian at the solution. */
  conditionNumber: number;
  /** False when the free parameters are nearly degenerate (condition number > 1e8). */
  wellConditioned: boolean;
  iterations: number;
  /** Passes of the forward model over the points in the fit from the starts (Jacobian columns count two). */
  evaluations: number;
  /** Points whose leave-one-out residual came from an exact refit. */
  leaveOneOutRefits: number;
  /** How many starts were tried and which won (0 = the given start). */
  starts: number;
  bestStart: number;
}

/** Typical scale of each parameter, for restart offsets (common practice for such spectrometers). */
const RESTART_SCALE: Record<GratingParameter, (g: GratingGeometry) => number> = {
  incidenceAngleDeg: () => 0.5,
  detectorDistanceMm: (g) => 0.03 * g.detectorDistanceMm,
  detectorAngleDeg: () => 0.5,
  detectorTiltDeg: () => 3,
  detectorCenterPixel: () => 30,
};

const NAN_RESIDUAL = 1e6;
/** Above this leverage the leave-one-out residual comes from an exact refit (see leaveOneOut). */
const HIGH_LEVERAGE = 0.5;

interface Problem {
  points: readonly GratingMapPoint[];
  start: GratingGeometry;
  names: GratingParameter[];
  bounds: Array<[number, number] | undefined>;
}

/** Weighted pixel residuals at theta into out[0, n) (0 for the skipped point). */
function pixelResiduals(problem: Problem, theta: ArrayLike<number>, skip: number, out: Float64Array): void {
  const g = withParameters(problem.start, problem.names, theta);
  const { points } = problem;
  for (let i = 0; i < points.length; i++) {
    if (i === skip) {
      out[i] = 0;
      continue;
    }
    const pt = points[i];
    const predicted = wavelengthToPixel(g, pt.wavelengthNm, pt.diffractionOrder);
    out[i] = Number.isFinite(predicted) ? (pt.pixel - predicted) / pt.pixelSigma : NAN_RESIDUAL;
  }
}

/** Soft-bound penalties into out[offset, offset + k). */
function penalties(problem: Problem, theta: ArrayLike<number>, out: Float64Array, offset: number): void {
  problem.bounds.forEach((b, j) => {
    let v = 0;
    if (b) {
      const width = Math.max(1e-15, 1e-6 * (b[1] - b[0]));
      if (theta[j] < b[0]) v = (b[0] - theta[j]) / width;
      else if (theta[j] > b[1]) v = (theta[j] - b[1]) / width;
    }
    out[offset + j] = v;
  });
}

/**
 * Stopping (the solver's MINPACK rules): FTOL = 1e-10 on χ², so ‖Jδ‖ ≤ √(FTOL·χ²) at the end;
 * with weighted residuals ‖Jδ‖ is the step's length in standard errors and |δ_j| ≤ ‖Jδ‖·σ_j by
 * Cauchy–Schwarz, ~1e-5·√χ² of an error bar. On the bench frames χ² itself is only good to a few
 * 1e-10, so a trial or two at the optimum may be rejected on rounding before that holds, and the
 * solver's μ cap ends such a run.
 */
const FTOL = 1e-10;
const XTOL = 1e-10;

/** One Levenberg–Marquardt run from theta0 on [pixel residuals; penalties], point `skip` left out (−1: none). */
function solve(problem: Problem, theta0: Float64Array, skip: number, maxIterations: number, covariance: boolean): LevenbergMarquardtResult {
  const n = problem.points.length;
  return levenbergMarquardt(
    {
      residualCount: n + problem.names.length,
      residuals(theta, out) {
        pixelResiduals(problem, theta, skip, out);
        penalties(problem, theta, out, n);
      },
    },
    theta0,
    { difference: 'central', steps: (_j, value) => parameterStep(value), maxIterations, ftol: FTOL, xtol: XTOL, covariance, keepJacobian: covariance, covarianceRows: n },
  );
}

function resolve(points: readonly GratingMapPoint[], start: GratingGeometry, options: GratingMapOptions): Problem {
  const names = [...new Set(options.free)];
  if (names.length === 0) throw new EngineError('invalid_input', 'Name at least one free geometry parameter.');
  for (const name of names) {
    if (!GRATING_PARAMETERS.includes(name)) throw new EngineError('invalid_input', `Unknown grating parameter "${name}"; choose from ${GRATING_PARAMETERS.join(', ')}.`);
    if (!Number.isFinite(start[name])) throw new EngineError('invalid_input', `The start geometry's ${name} is ${start[name]}; give a finite starting value.`);
  }
  if (names.includes('detectorAngleDeg') && names.includes('detectorCenterPixel')) {
    throw new EngineError('invalid_input', 'detectorAngleDeg and detectorCenterPixel move the spectrum the same way; free one of them, not both.');
  }
  if (points.length < names.length + 1) throw new EngineError('invalid_input', `Fitting ${names.length} geometry parameters needs at least ${names.length + 1} points, got ${points.length}.`);
  points.forEach((pt, i) => {
    if (!Number.isFinite(pt.pixel) || !(pt.pixelSigma > 0) || !(pt.wavelengthNm > 0) || !(Number.isInteger(pt.diffractionOrder) && pt.diffractionOrder >= 1)) {
      throw new EngineError('invalid_input', `Point ${i} needs a finite pixel, pixelSigma > 0, a positive wavelength and a whole diffraction order ≥ 1.`);
    }
  });
  const bounds = names.map((name) => {
    const b = options.bounds?.[name];
    if (b && !(b[0] < b[1])) throw new EngineError('invalid_input', `Bounds for ${name} must be [low, high] with low < high.`);
    return b;
  });
  return { points, start, names, bounds };
}

/**
 * Fit the free geometry parameters to the points. The covariance is (JᵀJ)⁻¹ of the weighted
 * pixel residuals at the solution, multiplied by the reduced χ² when that exceeds 1.
 */
export function fitGratingMap(points: readonly GratingMapPoint[], start: GratingGeometry, options: GratingMapOptions): GratingMapFit {
  const problem = resolve(points, start, options);
  const { names } = problem;
  const k = names.length;
  const n = points.length;
  const maxIterations = options.maxIterations ?? 200;
  const restarts = options.restarts ?? 4;
  const theta0 = Float64Array.from(names, (name) => start[name]);
  const starts: Float64Array[] = [theta0];
  for (let s = 0; s < restarts; s++) {
    // Offsets alternate sign per parameter and grow with s: +1, −1, +2, −2 scales…
    const magnitude = Math.floor(s / 2) + 1;
    const sign = s % 2 === 0 ? 1 : -1;
    starts.push(Float64Array.from(names, (name, j) => start[name] + sign * (j % 2 === 0 ? 1 : -1) * magnitude * RESTART_SCALE[name](start)));
  }
  let best: LevenbergMarquardtResult | null = null;
  let bestStart = 0;
  let totalIterations = 0;
  let evaluations = 0;
  starts.forEach((t, s) => {
    const result = solve(problem, t, -1, maxIterations, true);
    totalIterations += result.iterations;
    evaluations += result.residualEvaluations;
    if (result.chiSquare < (best?.chiSquare ?? Number.POSITIVE_INFINITY)) {
      best = result;
      bestStart = s;
    }
  });
  const found = best as LevenbergMarquardtResult | null;
  if (!found?.jacobian) throw new EngineError('fit_failed', 'The grating fit found no geometry that puts the lines on the detector.');
  const theta = found.parameters;
  const geometry = withParameters(start, names, theta);

  const rw = found.residuals.subarray(0, n);
  if (rw.some((v) => Math.abs(v) >= NAN_RESIDUAL)) throw new EngineError('fit_failed', 'At the best geometry some lines do not reach the detector plane.');
  let chiSquare = 0;
  for (const r of rw) chiSquare += r * r;
  const dof = n - k;
  const reducedChiSquare = chiSquare / dof;
  // The solver's Jacobian at the solution has the penalty rows: the leave-one-out shifts must
  // respect an active soft bound as a refit would; the covariance (the solver's, over the data
  // rows only) and the condition number ignore them.
  const rowsPen = n + k;
  const aPen = found.jacobian;
  const a = new Float64Array(n * k);
  for (let j = 0; j < k; j++) a.set(aPen.subarray(j * rowsPen, j * rowsPen + n), j * n);
  const conditionNumber = conditionOfQr(householderQr({ rows: n, cols: k, a }));
  if (!found.covariance) throw new EngineError('fit_failed', `The grating fit's free parameters (${names.join(', ')}) are degenerate at the solution: no covariance can be stated.`);
  const inflate = Math.max(1, reducedChiSquare);
  const unscaled = found.covariance;
  const covariance = Array.from({ length: k }, (_, i) => Array.from({ length: k }, (_, j) => unscaled[i * k + j] * inflate));

  const residualsPx: number[] = [];
  const residualsNm: number[] = [];
  let sumSq = 0;
  points.forEach((pt, i) => {
    residualsPx.push(rw[i] * pt.pixelSigma);
    const r = pt.wavelengthNm - pixelToWavelengthNm(geometry, pt.pixel, pt.diffractionOrder);
    residualsNm.push(r);
    sumSq += r * r;
  });

  // Hat-matrix leverages of the linearised problem, penalty rows included so that an active soft
  // bound holds in the deleted fits as it would in a refit (the penalty rows are never deleted).
  const leverage = leverages(householderQr({ rows: rowsPen, cols: k, a: aPen })).subarray(0, n);
  const exactAll = (options.leaveOneOut ?? 'leverage') === 'refit';
  const leaveOneOutResidualsPx: number[] = [];
  const leaveOneOutResidualsNm: number[] = [];
  let leaveOneOutRefits = 0;
  points.forEach((pt, i) => {
    const denom = 1 - leverage[i];
    // High leverage: the point pulls the fit hard and the linearisation is weakest, so refit.
    if (exactAll || !(leverage[i] <= HIGH_LEVERAGE)) {
      const loo = solve(problem, theta, i, maxIterations, false);
      leaveOneOutRefits++;
      const g = withParameters(start, names, loo.parameters);
      leaveOneOutResidualsPx.push(pt.pixel - wavelengthToPixel(g, pt.wavelengthNm, pt.diffractionOrder));
      leaveOneOutResidualsNm.push(pt.wavelengthNm - pixelToWavelengthNm(g, pt.pixel, pt.diffractionOrder));
      return;
    }
    // Deleted residual r_i/(1 − h_ii); the wavelength residual scales alike, since to first order
    // it is −(dλ/dp)·(pixel residual) at the same point.
    leaveOneOutResidualsPx.push(residualsPx[i] / denom);
    leaveOneOutResidualsNm.push(residualsNm[i] / denom);
  });
  return {
    grating: { geometry, parameterNames: [...names], parameters: Array.from(theta), covariance },
    residualsPx,
    residualsNm,
    leaveOneOutResidualsPx,
    leaveOneOutResidualsNm,
    leverages: Array.from(leverage),
    chiSquare,
    reducedChiSquare,
    residualRmsNm: Math.sqrt(sumSq / n),
    conditionNumber,
    wellConditioned: conditionNumber <= 1e8,
    iterations: totalIterations,
    evaluations,
    leaveOneOutRefits,
    starts: starts.length,
    bestStart,
  };
}
