/**
 * The engine's one nonlinear least-squares solver: Levenberg–Marquardt minimising χ² = Σ r_i(p)²
 * over n parameters, with the covariance (JᵀJ)⁻¹ at the solution. Used by the Gaussian peak fit
 * (analytic Jacobian, hard box bounds), the assigner's grating model (forward differences, soft
 * walls appended by the caller as residuals) and the grating dispersion fit (central
 * differences, soft bounds as residuals, the Jacobian reused for leverages). See README.md.
 *
 * Each iteration: the Jacobian J (analytic, or forward/central differences), its Householder QR
 * J = QR, then for each trial damping μ the step δ = argmin ‖[R; √μ·D]δ + [Qᵀr; 0]‖ (damped-qr.ts,
 * MINPACK's qrsolv), i.e. the augmented-Jacobian least-squares problem, never JᵀJ: the grating
 * fit's correlated geometry reaches condition numbers of 1e8, where normal equations (cond²)
 * would keep no digit. D holds Marquardt's scaling, the largest column norm of J seen so far
 * (MINPACK's mode 1), which makes the steps independent of the parameters' units. μ follows
 * Nielsen's rule (accept: μ·max(1/3, 1 − (2ρ − 1)³); reject: μ·ν, ν doubling; Madsen, Nielsen &
 * Tingleff, "Methods for Non-Linear Least Squares Problems", IMM DTU 2004, §3.2).
 *
 * Stopping, after MINPACK lmder (Moré, Garbow & Hillstrom, "User Guide for MINPACK-1", ANL-80-74,
 * 1980, §2.3, info 1, 2, 4, 6/7), with actred = 1 − χ²_trial/χ² and the linear model's predicted
 * reduction prered = (‖Jδ‖² + 2μ‖Dδ‖²)/χ²:
 * - 'ftol': |actred| ≤ tol, prered ≤ tol and actred/prered ≤ 2, tol = ftol + ftolAbsolute/χ²
 *   (ftolAbsolute, 0 by default, is our addition for fits that may reach χ² ≈ 0 and only care
 *   about χ² to an absolute amount); tested on rejected trials too, so that a fit started at its
 *   optimum stops after one trial;
 * - 'xtol': ‖Dδ‖ ≤ xtol·‖Dp‖ on a trial that gained no more than tol;
 * - 'gtol': every column of J is within gtol (cosine) of orthogonal to r (off by default, as in
 *   MINPACK; bound-active components of the gradient are left out);
 * - 'noProgress': μ passed 1e16 after consecutive rejections (no decrease left at this
 *   precision); counted as converged, the point is a minimum to rounding;
 * - 'maxIterations' (not converged), 'nonFinite' (the start has a non-finite χ²).
 *
 * Bounds: a hard box, by projection of every trial point (and of the start) onto it; the
 * predicted reduction of a projected step comes from the linear model itself. Soft walls are the
 * caller's residuals, since their shape is part of the caller's statistics.
 *
 * Cost: the iterations allocate nothing; the arrays live in a workspace kept per problem shape.
 */
import { EngineError } from '../errors.ts';
import { columnNorm, covarianceFromR, factorJacobian, modelNormSquared, normOfRTimesSquared, solveDampedStep } from './damped-qr.ts';

export interface LeastSquaresProblem {
  /** Number of residuals m (≥ 1). */
  residualCount: number;
  /**
   * Residuals at `p` into `out` (length m), already weighted: the solver minimises Σ out_i².
   * Both arrays belong to the solver and change after the call: read them, never keep them.
   */
  residuals(p: Float64Array, out: Float64Array): void;
  /** Analytic Jacobian ∂r_i/∂p_j into `out[j·m + i]` (column-major). Without it, finite differences. */
  jacobian?(p: Float64Array, out: Float64Array): void;
}

export interface LevenbergMarquardtOptions {
  /**
   * Finite-difference Jacobian: 'forward' (n residual passes, error ~h) or 'central' (2n passes,
   * error ~h²). Ignored when the problem has an analytic Jacobian. @default 'forward'
   */
  difference?: 'forward' | 'central';
  /**
   * Difference step per parameter: absolute steps, or a function of the parameter's index and
   * current value. A forward step that would leave the box is taken backwards instead.
   * @default √ε·max(1, |p_j|) forward, ε^(1/3)·max(1, |p_j|) central
   */
  steps?: ArrayLike<number> | ((index: number, value: number) => number);
  /** Lower bounds (hard, by projection); −Infinity for none. @default unbounded */
  lower?: ArrayLike<number>;
  /** Upper bounds (hard, by projection); +Infinity for none. @default unbounded */
  upper?: ArrayLike<number>;
  /** Jacobian evaluations (iterations) at most. @default 100 */
  maxIterations?: number;
  /** Relative tolerance on χ² (MINPACK's ftol). @default 1.49e-8 (√ε, as MINPACK's lmder1) */
  ftol?: number;
  /** Absolute tolerance on χ², added to ftol·χ² (see the module comment). @default 0 */
  ftolAbsolute?: number;
  /** Relative tolerance on the scaled step (MINPACK's xtol). @default 1.49e-8 */
  xtol?: number;
  /** Orthogonality tolerance between r and the columns of J (MINPACK's gtol). @default 0 (off) */
  gtol?: number;
  /** Starting μ, relative to D² (Marquardt's scaling). @default 1e-3 */
  initialDamping?: number;
  /**
   * Residual rows [0, covarianceRows) make the covariance; rows after them (penalties, priors the
   * caller appended) are left out. @default all rows
   */
  covarianceRows?: number;
  /** Compute the covariance at the solution. @default true */
  covariance?: boolean;
  /** Return the Jacobian at the solution as well (needs `covariance`). @default false */
  keepJacobian?: boolean;
}

export type StopReason = 'ftol' | 'xtol' | 'gtol' | 'noProgress' | 'maxIterations' | 'nonFinite';

export interface LevenbergMarquardtResult {
  /** The best point reached (always inside the box). */
  parameters: Float64Array;
  /** Σ r² at `parameters` (+Infinity when the start was not finite). */
  chiSquare: number;
  /** r at `parameters`. */
  residuals: Float64Array;
  /** The Jacobian the covariance came from (column-major m×n, all rows), when `keepJacobian` was asked for; else null. */
  jacobian: Float64Array | null;
  /**
   * (JᵀJ)⁻¹ over the covariance rows, row-major n×n, NOT scaled: multiply by χ²/(m − n) when the
   * residual weights are only relative. J is the last Jacobian evaluated: at `parameters`, or,
   * when the fit converged on an accepted step, at the point that step started from, a step the
   * tolerances call negligible away (MINPACK's convention: lmder leaves that Jacobian for covar;
   * it saves a Jacobian and a QR per fit). After 'maxIterations' J is evaluated at `parameters`.
   * Null when J is rank-deficient, the start was not finite, or it was not asked for.
   */
  covariance: Float64Array | null;
  iterations: number;
  /** Calls of `residuals`, the finite-difference ones included. */
  residualEvaluations: number;
  /** Calls of the analytic `jacobian` (0 with finite differences). */
  jacobianEvaluations: number;
  converged: boolean;
  stop: StopReason;
}

const EPSILON = 2 ** -52;
const MU_CAP = 1e16;
const MU_FLOOR = 1e-12;

interface Resolved {
  n: number;
  m: number;
  central: boolean;
  step: (index: number, value: number) => number;
  lower: ArrayLike<number> | undefined;
  upper: ArrayLike<number> | undefined;
  bounded: boolean;
  maxIterations: number;
  ftol: number;
  ftolAbsolute: number;
  xtol: number;
  gtol: number;
  initialDamping: number;
  covarianceRows: number;
  covariance: boolean;
  keepJacobian: boolean;
}

function nonNegative(name: string, value: number | undefined, fallback: number): number {
  if (value === undefined) return fallback;
  if (!(value >= 0) || !Number.isFinite(value)) throw new EngineError('invalid_input', `Levenberg–Marquardt ${name} must be a finite number ≥ 0, got ${value}.`);
  return value;
}

function checkBounds(name: 'lower' | 'upper', values: ArrayLike<number> | undefined, n: number): void {
  if (!values) return;
  if (values.length !== n) throw new EngineError('invalid_input', `Levenberg–Marquardt ${name} bounds have ${values.length} entries for ${n} parameters.`);
  for (let j = 0; j < n; j++) {
    if (Number.isNaN(values[j])) throw new EngineError('invalid_input', `Levenberg–Marquardt ${name} bound ${j} is NaN.`);
  }
}

/** Every option checked in one place, with the defaults filled in. */
function resolve(problem: LeastSquaresProblem, start: ArrayLike<number>, options: LevenbergMarquardtOptions): Resolved {
  const n = start.length;
  const m = problem.residualCount;
  if (n < 1) throw new EngineError('invalid_input', 'Levenberg–Marquardt needs at least one parameter.');
  if (!(Number.isInteger(m) && m >= 1)) throw new EngineError('invalid_input', `Levenberg–Marquardt residualCount must be a whole number ≥ 1, got ${m}.`);
  for (let j = 0; j < n; j++) {
    if (!Number.isFinite(start[j])) throw new EngineError('invalid_input', `Levenberg–Marquardt start parameter ${j} is ${start[j]}; give a finite value.`);
  }
  const central = (options.difference ?? 'forward') === 'central';
  const relative = central ? Math.cbrt(EPSILON) : Math.sqrt(EPSILON);
  let step: (index: number, value: number) => number;
  const given = options.steps;
  if (typeof given === 'function') {
    step = given;
  } else if (given) {
    if (given.length !== n) throw new EngineError('invalid_input', `Levenberg–Marquardt steps have ${given.length} entries for ${n} parameters.`);
    for (let j = 0; j < n; j++) {
      if (!(Number.isFinite(given[j]) && given[j] !== 0)) throw new EngineError('invalid_input', `Levenberg–Marquardt step ${j} is ${given[j]}; steps must be finite and non-zero.`);
    }
    step = (j) => given[j];
  } else {
    step = (_j, value) => relative * Math.max(1, Math.abs(value));
  }
  const { lower, upper } = options;
  checkBounds('lower', lower, n);
  checkBounds('upper', upper, n);
  let bounded = false;
  for (let j = 0; j < n; j++) {
    const lo = lower ? lower[j] : Number.NEGATIVE_INFINITY;
    const hi = upper ? upper[j] : Number.POSITIVE_INFINITY;
    if (!(lo <= hi)) throw new EngineError('invalid_input', `Levenberg–Marquardt bounds for parameter ${j} are [${lo}, ${hi}]; the lower must not exceed the upper.`);
    if (Number.isFinite(lo) || Number.isFinite(hi)) bounded = true;
  }
  const maxIterations = options.maxIterations ?? 100;
  if (!(Number.isInteger(maxIterations) && maxIterations >= 0)) throw new EngineError('invalid_input', `Levenberg–Marquardt maxIterations must be a whole number ≥ 0, got ${maxIterations}.`);
  const covarianceRows = options.covarianceRows ?? m;
  if (!(Number.isInteger(covarianceRows) && covarianceRows >= 1 && covarianceRows <= m)) {
    throw new EngineError('invalid_input', `Levenberg–Marquardt covarianceRows must be a whole number in 1…${m}, got ${covarianceRows}.`);
  }
  const initialDamping = options.initialDamping ?? 1e-3;
  if (!(initialDamping > 0) || !Number.isFinite(initialDamping)) throw new EngineError('invalid_input', `Levenberg–Marquardt initialDamping must be a finite number > 0, got ${initialDamping}.`);
  return {
    n,
    m,
    central,
    step,
    lower,
    upper,
    bounded,
    maxIterations,
    ftol: nonNegative('ftol', options.ftol, Math.sqrt(EPSILON)),
    ftolAbsolute: nonNegative('ftolAbsolute', options.ftolAbsolute, 0),
    xtol: nonNegative('xtol', options.xtol, Math.sqrt(EPSILON)),
    gtol: nonNegative('gtol', options.gtol, 0),
    initialDamping,
    covarianceRows,
    covariance: options.covariance ?? true,
    keepJacobian: (options.covariance ?? true) && (options.keepJacobian ?? false),
  };
}

function sumOfSquares(r: Float64Array): number {
  let s = 0;
  for (let i = 0; i < r.length; i++) s += r[i] * r[i];
  return Number.isFinite(s) ? s : Number.POSITIVE_INFINITY;
}

/**
 * Minimise Σ r(p)² from `start`. Never throws on a difficult problem (it returns the best point
 * reached and says why it stopped); throws EngineError 'invalid_input' on malformed options.
 */
export function levenbergMarquardt(problem: LeastSquaresProblem, start: ArrayLike<number>, options: LevenbergMarquardtOptions = {}): LevenbergMarquardtResult {
  const o = resolve(problem, start, options);
  const ws = acquireWorkspace(o, !problem.jacobian, o.central && !problem.jacobian, !factorsInPlace(o));
  try {
    return solve(problem, start, o, ws);
  } finally {
    releaseWorkspace(ws);
  }
}

/** Every array one fit touches: views into one buffer, kept between fits (see acquireWorkspace). */
interface Workspace {
  /** A fit is using it now. */
  busy: boolean;
  lower: Float64Array;
  upper: Float64Array;
  p: Float64Array;
  trial: Float64Array;
  r: Float64Array;
  rTrial: Float64Array;
  delta: Float64Array;
  taken: Float64Array;
  scale: Float64Array;
  damped: Float64Array;
  columnNorms: Float64Array;
  jac: Float64Array;
  qr: Float64Array;
  rFactor: Float64Array;
  qtr: Float64Array;
  s: Float64Array;
  z: Float64Array;
  row: Float64Array;
  work: Float64Array;
  rPlus: Float64Array;
  rMinus: Float64Array;
}

/**
 * The QR may overwrite J (saving a copy per iteration) unless J is still wanted after it: for the
 * caller, or for a covariance over only some of the rows.
 */
function factorsInPlace(o: Resolved): boolean {
  return !o.keepJacobian && o.covarianceRows === o.m;
}

/**
 * Workspaces kept between fits, one per problem shape: the peak fit runs per line per frame on
 * windows of a few dozen pixels, and a dozen fresh arrays per fit (most above V8's on-heap size,
 * so each an off-heap allocation the collector must sweep) cost as much as its arithmetic, and
 * cutting the views afresh still costs a tenth. A frame's windows come in a handful of sizes;
 * past MAX_SHAPES the cache starts over. A residual function that itself runs a fit of the same
 * shape finds that workspace busy and gets one of its own.
 */
const workspaces = new Map<number, Workspace>();
const MAX_SHAPES = 32;

function acquireWorkspace(o: Resolved, differences: boolean, central: boolean, separateFactor: boolean): Workspace {
  const { m, n } = o;
  const flags = (differences ? 1 : 0) | (central ? 2 : 0) | (separateFactor ? 4 : 0);
  const key = (m * 4096 + n) * 8 + flags;
  let ws = workspaces.get(key);
  if (!ws || ws.busy) {
    const size = 3 * m + 12 * n + (separateFactor ? 2 : 1) * m * n + 2 * n * n + (differences ? m : 0) + (central ? m : 0);
    const fresh = cutWorkspace(new Float64Array(size), m, n, flags);
    if (!ws) {
      if (workspaces.size >= MAX_SHAPES) workspaces.clear();
      workspaces.set(key, fresh);
    }
    ws = fresh;
  }
  ws.busy = true;
  ws.scale.fill(0);
  for (let j = 0; j < n; j++) {
    ws.lower[j] = o.lower ? o.lower[j] : Number.NEGATIVE_INFINITY;
    ws.upper[j] = o.upper ? o.upper[j] : Number.POSITIVE_INFINITY;
  }
  return ws;
}

function cutWorkspace(buffer: Float64Array, m: number, n: number, flags: number): Workspace {
  const differences = (flags & 1) !== 0;
  const central = (flags & 2) !== 0;
  const separateFactor = (flags & 4) !== 0;
  let offset = 0;
  const take = (length: number): Float64Array => {
    const view = buffer.subarray(offset, offset + length);
    offset += length;
    return view;
  };
  const jac = take(m * n);
  const work = take(m);
  const rPlus = differences ? take(m) : work;
  return {
    busy: false,
    lower: take(n),
    upper: take(n),
    p: take(n),
    trial: take(n),
    r: take(m),
    rTrial: take(m),
    delta: take(n),
    taken: take(n),
    scale: take(n),
    damped: take(n),
    columnNorms: take(n),
    jac,
    qr: separateFactor ? take(m * n) : jac,
    rFactor: take(n * n),
    qtr: take(n),
    s: take(n * n),
    z: take(n),
    row: take(n),
    work,
    rPlus,
    rMinus: central ? take(m) : rPlus,
  };
}

function releaseWorkspace(ws: Workspace): void {
  ws.busy = false;
}

function solve(problem: LeastSquaresProblem, start: ArrayLike<number>, o: Resolved, ws: Workspace): LevenbergMarquardtResult {
  const { n, m, bounded } = o;
  let { p, trial, r, rTrial } = ws;
  const { lower, upper, delta, taken, scale, damped, columnNorms, jac, qr, rFactor, qtr, s, z, row, work, rPlus, rMinus } = ws;

  for (let j = 0; j < n; j++) p[j] = Math.min(upper[j], Math.max(lower[j], start[j]));
  let residualEvaluations = 1;
  let jacobianEvaluations = 0;
  problem.residuals(p, r);
  let chi = sumOfSquares(r);

  const evaluateJacobian = (): void => {
    if (problem.jacobian) {
      problem.jacobian(p, jac);
      jacobianEvaluations++;
      return;
    }
    for (let j = 0; j < n; j++) {
      const pj = p[j];
      let h = o.step(j, pj);
      if (!o.central && pj + h > upper[j]) h = -h;
      trial.set(p);
      trial[j] = pj + h;
      problem.residuals(trial, rPlus);
      let denominator = trial[j] - pj;
      if (o.central) {
        trial[j] = pj - h;
        problem.residuals(trial, rMinus);
        denominator = pj + h - trial[j];
        residualEvaluations += 2;
        for (let i = 0; i < m; i++) jac[j * m + i] = (rPlus[i] - rMinus[i]) / denominator;
      } else {
        residualEvaluations++;
        for (let i = 0; i < m; i++) jac[j * m + i] = (rPlus[i] - r[i]) / denominator;
      }
    }
  };

  /** `lastJacobianServes`: J (and its factor) from the last iteration may give the covariance. */
  const finish = (stop: StopReason, iterations: number, lastJacobianServes: boolean): LevenbergMarquardtResult => {
    const withCovariance = o.covariance && Number.isFinite(chi);
    // One allocation for everything returned (the workspace is kept for the next fit): an off-heap
    // array buffer each costs about as much as a small fit's arithmetic.
    const out = new Float64Array(n + m + (withCovariance ? n * n : 0) + (withCovariance && o.keepJacobian ? m * n : 0));
    const parameters = out.subarray(0, n);
    parameters.set(p);
    const residuals = out.subarray(n, n + m);
    residuals.set(r);
    let covariance: Float64Array | null = null;
    let jacobian: Float64Array | null = null;
    if (withCovariance) {
      if (!lastJacobianServes) evaluateJacobian();
      const rows = o.covarianceRows;
      // With a separate factor array J is intact here; factored in place, rows === m and the
      // factor of the last J is the one the iteration computed, or J was evaluated afresh above.
      if (o.keepJacobian) {
        jacobian = out.subarray(n + m + n * n);
        jacobian.set(jac);
      }
      if (!lastJacobianServes || rows !== m) {
        for (let j = 0; j < n; j++) columnNorms[j] = columnNorm(jac, j * m, j * m + rows);
        factorJacobian(jac, m, rows, n, qr, rFactor, null, qtr, work);
      }
      covariance = out.subarray(n + m, n + m + n * n);
      if (!covarianceFromR(n, rFactor, columnNorms, covariance, s)) covariance = null;
    }
    return {
      parameters,
      chiSquare: chi,
      residuals,
      jacobian,
      covariance,
      iterations,
      residualEvaluations,
      jacobianEvaluations,
      converged: stop === 'ftol' || stop === 'xtol' || stop === 'gtol' || stop === 'noProgress',
      stop,
    };
  };

  if (!Number.isFinite(chi)) return finish('nonFinite', 0, false);
  let mu = o.initialDamping;
  let nu = 2;
  let iterations = 0;
  while (iterations < o.maxIterations) {
    evaluateJacobian();
    iterations++;
    for (let j = 0; j < n; j++) {
      columnNorms[j] = columnNorm(jac, j * m, j * m + m);
      // Marquardt's scaling, never shrinking (MINPACK mode 1); a zero column scales by 1.
      scale[j] = Math.max(scale[j], columnNorms[j] > 0 ? columnNorms[j] : 1);
    }
    factorJacobian(jac, m, m, n, qr, rFactor, r, qtr, work);
    if (chi === 0) return finish('ftol', iterations, true);
    let xNorm = 0;
    for (let j = 0; j < n; j++) xNorm += (scale[j] * p[j]) ** 2;
    xNorm = Math.sqrt(xNorm);
    if (o.gtol > 0 && gradientIsOrthogonal(o, lower, upper, p, rFactor, qtr, columnNorms, Math.sqrt(chi))) return finish('gtol', iterations, true);
    let qtrSq = 0;
    for (let k = 0; k < n; k++) qtrSq += qtr[k] * qtr[k];
    for (;;) {
      const rootMu = Math.sqrt(mu);
      for (let j = 0; j < n; j++) damped[j] = rootMu * scale[j];
      solveDampedStep(n, rFactor, qtr, damped, s, z, row, delta);
      // A parameter on its bound whose step points out of the box is held there and the step
      // solved again for the others (a damping so large that its δ vanishes): projecting such a
      // step instead would keep the others' share of it, computed as if it could move.
      const held = bounded && holdBlocked(n, p, delta, lower, upper, damped);
      if (held) solveDampedStep(n, rFactor, qtr, damped, s, z, row, delta);
      let projected = false;
      for (let j = 0; j < n; j++) {
        const v = p[j] + delta[j];
        const c = bounded ? Math.min(upper[j], Math.max(lower[j], v)) : v;
        if (c !== v) projected = true;
        trial[j] = c;
        taken[j] = c - p[j];
      }
      problem.residuals(trial, rTrial);
      residualEvaluations++;
      const trialChi = sumOfSquares(rTrial);
      let stepNormSq = 0;
      for (let j = 0; j < n; j++) stepNormSq += (scale[j] * taken[j]) ** 2;
      let predicted: number;
      // The short form of the predicted reduction holds for the damped step itself only.
      if (projected || held) {
        predicted = (qtrSq - modelNormSquared(n, rFactor, qtr, taken)) / chi;
      } else {
        let dampedSq = 0;
        for (let j = 0; j < n; j++) dampedSq += (damped[j] * delta[j]) ** 2;
        predicted = (normOfRTimesSquared(n, rFactor, delta) + 2 * dampedSq) / chi;
      }
      const actual = Number.isFinite(trialChi) ? 1 - trialChi / chi : -1;
      const ratio = predicted > 0 ? actual / predicted : 0;
      const tol = o.ftol + o.ftolAbsolute / chi;
      const accepted = trialChi < chi;
      if (accepted) {
        const pOld = p;
        p = trial;
        trial = pOld;
        const rOld = r;
        r = rTrial;
        rTrial = rOld;
        chi = trialChi;
      }
      // Converged: the last Jacobian serves for the covariance even after an accepted step (see
      // LevenbergMarquardtResult.covariance).
      if (Math.abs(actual) <= tol && predicted <= tol && ratio <= 2) return finish('ftol', iterations, true);
      if (actual <= tol && Math.sqrt(stepNormSq) <= o.xtol * xNorm) return finish('xtol', iterations, true);
      if (accepted) {
        const t = 2 * ratio - 1;
        mu = Math.max(MU_FLOOR, mu * Math.max(1 / 3, 1 - t * t * t));
        nu = 2;
        break;
      }
      mu *= nu;
      nu *= 2;
      if (mu > MU_CAP) return finish('noProgress', iterations, true);
    }
  }
  return finish('maxIterations', iterations, false);
}

/** The damping that holds a parameter: its δ comes out below any representable change. */
const HELD = 1e150;

/**
 * Marks (damped = HELD) each parameter on a bound whose step δ leaves the box; true when any was
 * marked. One pass: a parameter the re-solved step then pushes out of the box is stopped at the
 * bound by the projection that follows.
 */
function holdBlocked(n: number, p: Float64Array, delta: Float64Array, lower: Float64Array, upper: Float64Array, damped: Float64Array): boolean {
  let held = false;
  for (let j = 0; j < n; j++) {
    if ((p[j] <= lower[j] && delta[j] < 0) || (p[j] >= upper[j] && delta[j] > 0)) {
      damped[j] = HELD;
      held = true;
    }
  }
  return held;
}

/**
 * MINPACK's gtol test: max_j |J_jᵀr| / (‖J_j‖·‖r‖) ≤ gtol, with Jᵀr = Rᵀ(Qᵀr). A component whose
 * descent direction leaves the box at an active bound does not count.
 */
function gradientIsOrthogonal(o: Resolved, lower: Float64Array, upper: Float64Array, p: Float64Array, rFactor: Float64Array, qtr: Float64Array, columnNorms: Float64Array, rNorm: number): boolean {
  const { n } = o;
  for (let j = 0; j < n; j++) {
    if (columnNorms[j] === 0) continue;
    let g = 0;
    for (let i = 0; i <= j; i++) g += rFactor[i * n + j] * qtr[i];
    if ((p[j] <= lower[j] && g > 0) || (p[j] >= upper[j] && g < 0)) continue;
    if (Math.abs(g) / (columnNorms[j] * rNorm) > o.gtol) return false;
  }
  return true;
}
