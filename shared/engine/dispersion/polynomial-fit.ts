/**
 * Weighted univariate polynomial least squares that keeps its digits.
 *
 * Method: x is mapped onto [−1, 1] and the fit is solved by Householder QR on the Chebyshev basis
 * (column-equilibrated); the result is converted to raw monomials in double-double and polished
 * by iterative refinement whose residuals are evaluated in double-double against the raw
 * monomial model. Without an intercept the basis is (x/s)^k, s = max|x|, k = 1…degree.
 *
 * Conditioning policy (decided here): the fit is REFUSED with EngineError 'ill_conditioned' when
 * the equilibrated basis is numerically rank-deficient (condition number > 1e13: fewer than
 * ~3 of 16 digits would survive the solve), and FLAGGED `wellConditioned: false` when the
 * condition number exceeds 1e8, i.e. the data barely determine the coefficients (more than 8
 * digits lost). Note the condition number is that of the basis actually solved, not of the raw
 * monomials: NIST Filip's raw Vandermonde is beyond 1e15, yet its coefficients come out right.
 */
import { SingularValueDecomposition, Matrix } from 'ml-matrix';
import { EngineError } from '../errors.ts';
import { type DD, dd, ddAdd, ddDiv, ddMul, ddToNumber } from './double-double.ts';
import { applyMap, chebyshevBasis, chebyshevToMonomialMap } from './chebyshev.ts';
import { type QrFactors, householderQr, qrSolve, unscaledCovariance } from './householder.ts';

export interface FitPolynomialOptions {
  /** Weights w_i (1/σ_i²). @default all 1 */
  weights?: ArrayLike<number>;
  /** Fit a constant term. @default true */
  intercept?: boolean;
}

export interface PolynomialFit {
  /** Monomial coefficients in raw x: y = Σ_j b_j x^j; without intercept b_0 = 0 is included. */
  coefficients: number[];
  /** Covariance of `coefficients`, scaled by the residual variance (NIST convention). */
  covariance: number[][];
  /** Standard deviations of the coefficients (√ of the covariance diagonal). */
  standardDeviations: number[];
  /** √(Σ w r² / (n − p)). */
  residualSd: number;
  /** 1 − SSR/SST (SST about the weighted mean; about zero without an intercept, as NIST does). */
  rSquared: number;
  /** 2-norm condition number of the column-equilibrated basis that was solved. */
  conditionNumber: number;
  /** log10(conditionNumber): digits of a double's ~16 at risk in the solve. */
  digitsLost: number;
  /** False when more than 8 digits are at risk; the coefficients may then carry little meaning. */
  wellConditioned: boolean;
  /** Residuals y − ŷ (unweighted). */
  residuals: Float64Array;
}

const REFUSE_CONDITION = 1e13;
const FLAG_CONDITION = 1e8;
const REFINEMENT_STEPS = 4;

function resolveOptions(n: number, degree: number, options: FitPolynomialOptions | undefined) {
  if (!Number.isInteger(degree) || degree < 0) throw new EngineError('invalid_input', `Polynomial degree must be a whole number ≥ 0, got ${degree}.`);
  const intercept = options?.intercept ?? true;
  if (!intercept && degree < 1) throw new EngineError('invalid_input', 'A fit without intercept needs degree ≥ 1.');
  const p = intercept ? degree + 1 : degree;
  if (n < p) throw new EngineError('invalid_input', `A degree-${degree} fit needs at least ${p} points, got ${n}.`);
  const weights = new Float64Array(n).fill(1);
  if (options?.weights) {
    if (options.weights.length !== n) throw new EngineError('invalid_input', `Got ${options.weights.length} weights for ${n} points.`);
    for (let i = 0; i < n; i++) {
      const w = options.weights[i];
      if (!(w >= 0) || !Number.isFinite(w)) throw new EngineError('invalid_input', `Weight ${i} is ${w}; weights must be finite and ≥ 0.`);
      weights[i] = w;
    }
  }
  return { intercept, p, weights };
}

/** Condition number of R from its singular values (R is small: p ≤ ~20). */
export function conditionOfQr(f: QrFactors): number {
  const n = f.cols;
  const r = new Matrix(n, n);
  for (let i = 0; i < n; i++) {
    r.set(i, i, f.rDiag[i]);
    for (let j = i + 1; j < n; j++) r.set(i, j, f.qr[j * f.rows + i]);
  }
  const s = new SingularValueDecomposition(r, { computeLeftSingularVectors: false, computeRightSingularVectors: false }).diagonal;
  const max = Math.max(...s);
  const min = Math.min(...s);
  return min > 0 ? max / min : Number.POSITIVE_INFINITY;
}

/** Σ b_j x^j in double-double (Horner). */
function hornerDd(b: DD[], x: number): DD {
  let acc: DD = b[b.length - 1];
  const xd = dd(x);
  for (let j = b.length - 2; j >= 0; j--) acc = ddAdd(ddMul(acc, xd), b[j]);
  return acc;
}

/**
 * Least-squares polynomial of `degree` through (x, y). See the module comment for the method and
 * the conditioning policy. Throws EngineError 'invalid_input' on bad arguments and
 * 'ill_conditioned' when the basis is numerically rank-deficient.
 */
export function fitPolynomial(x: ArrayLike<number>, y: ArrayLike<number>, degree: number, options?: FitPolynomialOptions): PolynomialFit {
  const n = x.length;
  if (y.length !== n) throw new EngineError('invalid_input', `x has ${n} values but y has ${y.length}.`);
  for (let i = 0; i < n; i++) {
    if (!Number.isFinite(x[i]) || !Number.isFinite(y[i])) throw new EngineError('invalid_input', `Point ${i} is not finite (x=${x[i]}, y=${y[i]}).`);
  }
  const { intercept, p, weights } = resolveOptions(n, degree, options);
  const sqrtW = weights.map(Math.sqrt);

  let lo = Infinity;
  let hi = -Infinity;
  let maxAbs = 0;
  for (let i = 0; i < n; i++) {
    lo = Math.min(lo, x[i]);
    hi = Math.max(hi, x[i]);
    maxAbs = Math.max(maxAbs, Math.abs(x[i]));
  }
  // Basis: Chebyshev in u = (x − centre)/half, or (x/s)^k without intercept (centring would add a constant).
  const centre = intercept ? (lo + hi) / 2 : 0;
  const half = intercept ? (hi > lo ? (hi - lo) / 2 : 1) : maxAbs > 0 ? maxAbs : 1;
  const a = new Float64Array(n * p);
  const basis = new Float64Array(degree + 1);
  for (let i = 0; i < n; i++) {
    const u = (x[i] - centre) / half;
    if (intercept) {
      chebyshevBasis(u, degree, basis);
      for (let k = 0; k <= degree; k++) a[k * n + i] = basis[k] * sqrtW[i];
    } else {
      let pow = 1;
      for (let k = 1; k <= degree; k++) {
        pow *= u;
        a[(k - 1) * n + i] = pow * sqrtW[i];
      }
    }
  }
  const qr = householderQr({ rows: n, cols: p, a });
  const conditionNumber = conditionOfQr(qr);
  if (!(conditionNumber < REFUSE_CONDITION)) {
    throw new EngineError('ill_conditioned', `The degree-${degree} fit is numerically rank-deficient (condition number ${conditionNumber.toExponential(1)}); use a lower degree or more distinct points.`, { conditionNumber, degree, points: n });
  }

  // Map from basis coefficients (length p) to raw monomials (length degree + 1), double-double.
  let map: DD[][];
  if (intercept) {
    map = chebyshevToMonomialMap(degree, centre, half);
  } else {
    map = Array.from({ length: degree + 1 }, () => Array.from({ length: p }, () => dd(0)));
    let sPow: DD = dd(1);
    for (let k = 1; k <= degree; k++) {
      sPow = ddMul(sPow, dd(half));
      map[k][k - 1] = ddDiv(dd(1), sPow);
    }
  }

  const wy = new Float64Array(n);
  for (let i = 0; i < n; i++) wy[i] = y[i] * sqrtW[i];
  let b: DD[] = applyMap(map, qrSolve(qr, wy));
  // Iterative refinement on the normal-equation gradient g = Vᵀ W r of the raw monomial model,
  // evaluated in double-double; the correction δa = (ÂᵀÂ)⁻¹ Bᵀ g uses the Chebyshev QR as a
  // preconditioner. The fixed point is g = 0 for the exact data, so the rounding of the basis
  // values (Â) does not bias the answer even when residuals are large (NIST Wampler5).
  const inner = unscaledCovariance(qr);
  const residuals = new Float64Array(n);
  const wr = new Float64Array(n);
  for (let step = 0; step <= REFINEMENT_STEPS; step++) {
    const g: DD[] = Array.from({ length: degree + 1 }, () => dd(0));
    for (let i = 0; i < n; i++) {
      const r = ddAdd(dd(y[i]), ddMul(hornerDd(b, x[i]), dd(-1)));
      residuals[i] = ddToNumber(r);
      wr[i] = residuals[i] * sqrtW[i];
      if (step === REFINEMENT_STEPS) continue;
      let term = ddMul(r, dd(weights[i]));
      const xd = dd(x[i]);
      for (let j = 0; j <= degree; j++) {
        g[j] = ddAdd(g[j], term);
        term = ddMul(term, xd);
      }
    }
    if (step === REFINEMENT_STEPS) break;
    const h = new Float64Array(p);
    for (let k = 0; k < p; k++) {
      let s: DD = dd(0);
      for (let j = 0; j <= degree; j++) s = ddAdd(s, ddMul(map[j][k], g[j]));
      h[k] = ddToNumber(s);
    }
    const deltaA = new Float64Array(p);
    for (let k = 0; k < p; k++) {
      let s = 0;
      for (let l = 0; l < p; l++) s += inner[k][l] * h[l];
      deltaA[k] = s;
    }
    const delta = applyMap(map, deltaA);
    b = b.map((v, j) => ddAdd(v, delta[j]));
  }
  const coefficients = b.map(ddToNumber);

  let ssr = 0;
  let sw = 0;
  let swy = 0;
  for (let i = 0; i < n; i++) {
    ssr += wr[i] * wr[i];
    sw += weights[i];
    swy += weights[i] * y[i];
  }
  const mean = intercept ? swy / sw : 0;
  let sst = 0;
  for (let i = 0; i < n; i++) sst += weights[i] * (y[i] - mean) ** 2;
  const dof = n - p;
  const residualSd = dof > 0 ? Math.sqrt(ssr / dof) : 0;

  // Covariance: σ² B (ÂᵀÂ)⁻¹ Bᵀ, never forming ÂᵀÂ.
  const m = map.map((row) => row.map(ddToNumber));
  const rows = degree + 1;
  const covariance: number[][] = Array.from({ length: rows }, () => new Array<number>(rows).fill(0));
  const variance = residualSd * residualSd;
  for (let i = 0; i < rows; i++) {
    for (let j = i; j < rows; j++) {
      let s = 0;
      for (let k = 0; k < p; k++) {
        if (m[i][k] === 0) continue;
        for (let l = 0; l < p; l++) s += m[i][k] * inner[k][l] * m[j][l];
      }
      covariance[i][j] = s * variance;
      covariance[j][i] = s * variance;
    }
  }
  const digitsLost = Math.log10(conditionNumber);
  return {
    coefficients,
    covariance,
    standardDeviations: covariance.map((row, i) => Math.sqrt(Math.max(0, row[i]))),
    residualSd,
    rSquared: sst > 0 ? 1 - ssr / sst : 1,
    conditionNumber,
    digitsLost,
    wellConditioned: conditionNumber <= FLAG_CONDITION,
    residuals,
  };
}
