/**
 * Empirical pixel → first-order wavelength map: a Chebyshev series on the detector's pixel domain
 * [0, pixelCount − 1], fitted by Householder QR with effective-variance weights, the degree chosen
 * by AICc.
 */
import { EngineError } from '../errors.ts';
import type { Calibration } from '../types.ts';
import { chebyshevBasis, chebyshevDerivative, chebyshevValue, toUnit } from './chebyshev.ts';
import { householderQr, leverages, qrSolve, unscaledCovariance } from './householder.ts';
import { conditionOfQr } from './polynomial-fit.ts';

export interface PolynomialMapPoint {
  pixel: number;
  pixelSigma: number;
  /** True wavelength of the line, nm. */
  wavelengthNm: number;
  /** 1-σ of the wavelength itself (e.g. the driver tolerance / q), nm. @default 0 */
  wavelengthSigmaNm?: number;
  /** Diffraction order the line was seen in; the fit uses m·λ (first-order terms). @default 1 */
  diffractionOrder?: number;
}

export interface PolynomialMapOptions {
  /** Spectral pixel count: the Chebyshev domain is [0, pixelCount − 1]. */
  pixelCount: number;
  /** A fixed degree, or 'auto' for the AICc choice. @default 'auto' */
  degree?: number | 'auto';
  /** Highest degree 'auto' may pick (also capped at n − 3 so AICc stays finite). @default 4 */
  maxDegree?: number;
}

export interface PolynomialMapFit {
  polynomial: NonNullable<Calibration['polynomial']>;
  /** λ_i − λ₁(p_i)/m_i, nm (true-wavelength terms). */
  residualsNm: number[];
  /** The same with point i left out of the fit (exact for fixed weights: r_i / (1 − h_ii)). */
  leaveOneOutResidualsNm: number[];
  /** Σ r²/σ_eff² over n − (degree + 1). */
  reducedChiSquare: number;
  chiSquare: number;
  residualRmsNm: number;
  /** AICc per candidate degree (empty when the degree was fixed). */
  degreeScores: Array<{ degree: number; aicc: number }>;
  /** 2-norm condition number of the equilibrated Chebyshev design. */
  conditionNumber: number;
}

interface WeightedFit {
  coefficients: Float64Array;
  chiSquare: number;
  fitted: Float64Array;
  qr: ReturnType<typeof householderQr>;
  sigma: Float64Array;
}

function checkPoints(points: readonly PolynomialMapPoint[], pixelCount: number): void {
  if (!(Number.isInteger(pixelCount) && pixelCount >= 2)) throw new EngineError('invalid_input', `pixelCount must be a whole number ≥ 2, got ${pixelCount}.`);
  if (points.length < 3) throw new EngineError('invalid_input', `A polynomial dispersion map needs at least 3 points, got ${points.length}.`);
  points.forEach((pt, i) => {
    if (!Number.isFinite(pt.pixel) || !(pt.wavelengthNm > 0)) throw new EngineError('invalid_input', `Point ${i} needs a finite pixel and a positive wavelength (pixel=${pt.pixel}, wavelengthNm=${pt.wavelengthNm}).`);
    if (!(pt.pixelSigma > 0) && !((pt.wavelengthSigmaNm ?? 0) > 0)) throw new EngineError('invalid_input', `Point ${i} needs pixelSigma > 0 or wavelengthSigmaNm > 0.`);
    const m = pt.diffractionOrder ?? 1;
    if (!(Number.isInteger(m) && m >= 1)) throw new EngineError('invalid_input', `Point ${i} has diffraction order ${m}; orders are whole numbers ≥ 1.`);
  });
}

/** Weighted Chebyshev fit of targets with σ_eff² = (slope·σ_p)² + σ_λ², slopes from `slopes`. */
function weightedChebyshevFit(u: Float64Array, target: Float64Array, pixelSigma: Float64Array, targetSigma: Float64Array, slopes: Float64Array, degree: number): WeightedFit {
  const n = u.length;
  const p = degree + 1;
  const a = new Float64Array(n * p);
  const b = new Float64Array(n);
  const sigma = new Float64Array(n);
  const basis = new Float64Array(p);
  for (let i = 0; i < n; i++) {
    sigma[i] = Math.sqrt((slopes[i] * pixelSigma[i]) ** 2 + targetSigma[i] ** 2);
    chebyshevBasis(u[i], degree, basis);
    for (let k = 0; k < p; k++) a[k * n + i] = basis[k] / sigma[i];
    b[i] = target[i] / sigma[i];
  }
  const qr = householderQr({ rows: n, cols: p, a });
  const coefficients = qrSolve(qr, b);
  const fitted = new Float64Array(n);
  let chiSquare = 0;
  for (let i = 0; i < n; i++) {
    fitted[i] = chebyshevValue(coefficients, u[i]);
    chiSquare += ((target[i] - fitted[i]) / sigma[i]) ** 2;
  }
  return { coefficients, chiSquare, fitted, qr, sigma };
}

/** Fit with effective-variance weights: two passes so the slopes come from the fit itself. */
function fitDegree(u: Float64Array, target: Float64Array, pixelSigma: Float64Array, targetSigma: Float64Array, initialSlopes: Float64Array, degree: number, duDp: number): WeightedFit {
  let slopes = initialSlopes;
  let fit = weightedChebyshevFit(u, target, pixelSigma, targetSigma, slopes, degree);
  for (let pass = 0; pass < 2; pass++) {
    const d = chebyshevDerivative(fit.coefficients);
    slopes = u.map((v) => chebyshevValue(d, v) * duDp);
    fit = weightedChebyshevFit(u, target, pixelSigma, targetSigma, slopes, degree);
  }
  return fit;
}

/**
 * Fit the polynomial part of a Calibration to calibration points. The result's covariance is
 * (AᵀWA)⁻¹ scaled by the reduced χ² when that exceeds 1 (the scatter then says the σ were too
 * small); the degree, when 'auto', minimises AICc = n·ln(χ²/n) + 2k + 2k(k+1)/(n − k − 1) with
 * k = degree + 1 (Hurvich & Tsai 1989; the Gaussian likelihood with a fitted variance, so the
 * choice does not depend on the absolute scale of the σ).
 */
export function fitPolynomialMap(points: readonly PolynomialMapPoint[], options: PolynomialMapOptions): PolynomialMapFit {
  const { pixelCount } = options;
  checkPoints(points, pixelCount);
  const n = points.length;
  const lo = 0;
  const hi = pixelCount - 1;
  const duDp = 2 / (hi - lo);
  const u = Float64Array.from(points, (pt) => toUnit(pt.pixel, lo, hi));
  const order = Float64Array.from(points, (pt) => pt.diffractionOrder ?? 1);
  const target = Float64Array.from(points, (pt, i) => pt.wavelengthNm * order[i]);
  const targetSigma = Float64Array.from(points, (pt, i) => (pt.wavelengthSigmaNm ?? 0) * order[i]);
  const pixelSigma = Float64Array.from(points, (pt) => Math.max(0, pt.pixelSigma));

  // Starting slopes from the two extreme points (a chord): only sets the first pass's weights.
  let iMin = 0;
  let iMax = 0;
  for (let i = 1; i < n; i++) {
    if (points[i].pixel < points[iMin].pixel) iMin = i;
    if (points[i].pixel > points[iMax].pixel) iMax = i;
  }
  const chord = points[iMax].pixel > points[iMin].pixel ? (target[iMax] - target[iMin]) / (points[iMax].pixel - points[iMin].pixel) : 1;
  const slopes0 = new Float64Array(n).fill(chord);

  const requested = options.degree ?? 'auto';
  let degree: number;
  let degreeCriterion: string;
  const degreeScores: Array<{ degree: number; aicc: number }> = [];
  const fits = new Map<number, WeightedFit>();
  if (requested === 'auto') {
    const maxDegree = options.maxDegree ?? 4;
    if (!(Number.isInteger(maxDegree) && maxDegree >= 1)) throw new EngineError('invalid_input', `maxDegree must be a whole number ≥ 1, got ${maxDegree}.`);
    const top = Math.max(1, Math.min(maxDegree, n - 3));
    // Floor χ² at the rounding level so exact synthetic data do not send ln χ² to −∞.
    let scaleSq = 0;
    for (let i = 0; i < n; i++) scaleSq += (target[i] / Math.max(1e-300, Math.hypot(chord * pixelSigma[i], targetSigma[i]))) ** 2;
    const floor = 1e-26 * scaleSq;
    let bestScore = Number.POSITIVE_INFINITY;
    degree = 1;
    for (let d = 1; d <= top; d++) {
      const fit = fitDegree(u, target, pixelSigma, targetSigma, slopes0, d, duDp);
      fits.set(d, fit);
      const k = d + 1;
      const aicc = n - k - 1 > 0 ? n * Math.log(Math.max(fit.chiSquare, floor) / n) + 2 * k + (2 * k * (k + 1)) / (n - k - 1) : Number.POSITIVE_INFINITY;
      degreeScores.push({ degree: d, aicc });
      if (aicc < bestScore) {
        bestScore = aicc;
        degree = d;
      }
    }
    degreeCriterion = top === 1 ? `degree 1: only ${n} points, too few to compare degrees` : `AICc over degrees 1-${top}`;
  } else {
    if (!(Number.isInteger(requested) && requested >= 1)) throw new EngineError('invalid_input', `degree must be a whole number ≥ 1 or 'auto', got ${requested}.`);
    if (requested > n - 2) throw new EngineError('invalid_input', `A degree-${requested} map needs at least ${requested + 2} points (one spare to estimate the scatter), got ${n}.`);
    degree = requested;
    degreeCriterion = `fixed degree ${requested}`;
  }
  const fit = fits.get(degree) ?? fitDegree(u, target, pixelSigma, targetSigma, slopes0, degree, duDp);
  const k = degree + 1;
  const dof = n - k;
  const reducedChiSquare = fit.chiSquare / dof;
  const inflate = Math.max(1, reducedChiSquare);
  const covariance = unscaledCovariance(fit.qr).map((row) => row.map((v) => v * inflate));
  const h = leverages(fit.qr);
  const residualsNm: number[] = [];
  const leaveOneOutResidualsNm: number[] = [];
  let sumSq = 0;
  for (let i = 0; i < n; i++) {
    const r = (target[i] - fit.fitted[i]) / order[i];
    residualsNm.push(r);
    sumSq += r * r;
    const denom = 1 - h[i];
    leaveOneOutResidualsNm.push(denom > 1e-12 ? r / denom : Number.NaN);
  }
  return {
    polynomial: {
      degree,
      domainPx: [lo, hi],
      coefficients: Array.from(fit.coefficients),
      covariance,
      degreeCriterion,
    },
    residualsNm,
    leaveOneOutResidualsNm,
    reducedChiSquare,
    chiSquare: fit.chiSquare,
    residualRmsNm: Math.sqrt(sumSq / n),
    degreeScores,
    conditionNumber: conditionOfQr(fit.qr),
  };
}
