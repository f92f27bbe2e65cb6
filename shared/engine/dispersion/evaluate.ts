/**
 * Evaluate a stored Calibration: pixel → wavelength with a 1-σ band, its local dispersion, and
 * the inverse wavelength → pixel. Works for both models.
 *
 * Convention: both models map a pixel to the FIRST-ORDER wavelength λ₁(p). A line of true
 * wavelength λ diffracted into order m lands where m·λ lands in first order (m·λ = d(sin α − sin β)).
 */
import { EngineError } from '../errors.ts';
import { wavelengthToPixel } from '../grating.ts';
import type { Calibration, GratingGeometry } from '../types.ts';
import { chebyshevDerivative, chebyshevValue } from './chebyshev.ts';

export interface EvaluatedCalibration {
  /** First-order wavelength at each pixel, nm. */
  wavelengthNm: Float64Array;
  /** 1-σ: √(J Σ Jᵀ + (λ·scaleSigmaRelative)²), nm. */
  wavelengthSigmaNm: Float64Array;
}

/** The names of GratingGeometry entries a grating fit may free. */
export type GratingParameter = 'incidenceAngleDeg' | 'detectorDistanceMm' | 'detectorAngleDeg' | 'detectorTiltDeg' | 'detectorCenterPixel';

export const GRATING_PARAMETERS: readonly GratingParameter[] = ['incidenceAngleDeg', 'detectorDistanceMm', 'detectorAngleDeg', 'detectorTiltDeg', 'detectorCenterPixel'];

/** A copy of `g` with the named entries set to `values`. */
export function withParameters(g: GratingGeometry, names: readonly string[], values: ArrayLike<number>): GratingGeometry {
  const out: GratingGeometry = { ...g };
  for (let j = 0; j < names.length; j++) {
    const name = names[j] as GratingParameter;
    if (!GRATING_PARAMETERS.includes(name)) throw new EngineError('invalid_input', `Unknown grating parameter "${names[j]}".`);
    out[name] = values[j];
  }
  return out;
}

/** Finite-difference step for a geometry parameter: small against its scale, far above rounding. */
export function parameterStep(value: number): number {
  return 1e-6 * Math.max(1, Math.abs(value));
}

function requirePolynomial(cal: Calibration): NonNullable<Calibration['polynomial']> {
  if (!cal.polynomial) throw new EngineError('invalid_input', 'Calibration model is "polynomial" but it has no polynomial block.');
  return cal.polynomial;
}

function requireGrating(cal: Calibration): NonNullable<Calibration['grating']> {
  if (!cal.grating) throw new EngineError('invalid_input', 'Calibration model is "grating" but it has no grating block.');
  return cal.grating;
}

function flatten(covariance: number[][], n: number): Float64Array {
  const out = new Float64Array(n * n);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) out[i * n + j] = covariance[i]?.[j] ?? 0;
  return out;
}

/** Wavelength and its 1-σ band at each pixel (both models). Fast: one pass, no allocation per pixel. */
export function evaluateCalibration(cal: Calibration, pixels: ArrayLike<number>): EvaluatedCalibration {
  return evaluate(cal, pixels, undefined);
}

/** {@link evaluateCalibration} plus the local dispersion dλ/dp of {@link calibrationDispersionNmPerPixel}. */
export interface EvaluatedCalibrationAxes extends EvaluatedCalibration {
  dispersionNmPerPixel: Float64Array;
}

/**
 * Wavelength, its 1-σ band and the dispersion at each pixel in one pass: the grating model's
 * analytic Jacobian already holds dλ/dp, so the trigonometry is done once per pixel, not twice.
 * Equal, value for value, to {@link evaluateCalibration} and {@link calibrationDispersionNmPerPixel}.
 */
export function evaluateCalibrationAxes(cal: Calibration, pixels: ArrayLike<number>): EvaluatedCalibrationAxes {
  const dispersionNmPerPixel = new Float64Array(pixels.length);
  return { ...evaluate(cal, pixels, dispersionNmPerPixel), dispersionNmPerPixel };
}

function evaluate(cal: Calibration, pixels: ArrayLike<number>, dispersion: Float64Array | undefined): EvaluatedCalibration {
  const n = pixels.length;
  const wavelengthNm = new Float64Array(n);
  const wavelengthSigmaNm = new Float64Array(n);
  const scale = cal.scaleSigmaRelative ?? 0;
  if (cal.model === 'polynomial') {
    const poly = requirePolynomial(cal);
    const c = poly.coefficients;
    const p = c.length;
    const cov = flatten(poly.covariance, p);
    const [lo, hi] = poly.domainPx;
    const t = new Float64Array(p);
    const derivative = dispersion ? chebyshevDerivative(c) : [];
    const du = 2 / (hi - lo);
    for (let i = 0; i < n; i++) {
      const u = (2 * pixels[i] - (lo + hi)) / (hi - lo);
      t[0] = 1;
      if (p > 1) t[1] = u;
      for (let k = 2; k < p; k++) t[k] = 2 * u * t[k - 1] - t[k - 2];
      let lambda = 0;
      for (let k = 0; k < p; k++) lambda += c[k] * t[k];
      let v = 0;
      for (let k = 0; k < p; k++) {
        let s = 0;
        for (let l = 0; l < p; l++) s += cov[k * p + l] * t[l];
        v += t[k] * s;
      }
      wavelengthNm[i] = lambda;
      wavelengthSigmaNm[i] = Math.sqrt(Math.max(0, v) + (lambda * scale) ** 2);
      if (dispersion) dispersion[i] = chebyshevValue(derivative, u) * du;
    }
    return { wavelengthNm, wavelengthSigmaNm };
  }
  const grating = requireGrating(cal);
  const names = grating.parameterNames;
  const k = names.length;
  const cov = flatten(grating.covariance, k);
  const g = prepareGrating(withParameters(grating.geometry, names, grating.parameters));
  // The covariance spread over all five geometry parameters (zero rows for fixed ones), so the
  // per-pixel quadratic form reads no index table.
  const full = new Float64Array(25);
  const index = Int32Array.from(names, (name) => GRATING_PARAMETERS.indexOf(name as GratingParameter));
  for (let a = 0; a < k; a++) for (let b = 0; b < k; b++) full[index[a] * 5 + index[b]] = cov[a * k + b];
  gratingAxes(g, full, scale, pixels, wavelengthNm, wavelengthSigmaNm, dispersion);
  return { wavelengthNm, wavelengthSigmaNm };
}

/**
 * The grating branch of {@link evaluate}: {@link preparedWavelengthAndJacobian} written out with
 * the Jacobian in locals and the symmetric quadratic form J Σ Jᵀ expanded (15 products), because
 * through a scratch array V8 loads and stores every entry and the form cost 3× the geometry.
 * Tested equal to the array form.
 */
function gratingAxes(
  pg: PreparedGrating,
  c: Float64Array,
  scale: number,
  pixels: ArrayLike<number>,
  wavelengthNm: Float64Array,
  wavelengthSigmaNm: Float64Array,
  dispersion: Float64Array | undefined,
): void {
  const { dNm: d, sigma, pitchMm, distanceMm, cosTilt: cosT, sinTilt: sinT, sinBeta0, cosBeta0, centerPixel } = pg;
  const j0 = d * pg.cosAlpha * DEG;
  const c00 = c[0], c01 = 2 * c[1], c02 = 2 * c[2], c03 = 2 * c[3], c04 = 2 * c[4];
  const c11 = c[6], c12 = 2 * c[7], c13 = 2 * c[8], c14 = 2 * c[9];
  const c22 = c[12], c23 = 2 * c[13], c24 = 2 * c[14];
  const c33 = c[18], c34 = 2 * c[19];
  const c44 = c[24];
  const n = pixels.length;
  for (let i = 0; i < n; i++) {
    const sMm = (pixels[i] - centerPixel) * pitchMm;
    const num = sMm * cosT;
    const den = distanceMm + sMm * sinT;
    const r2 = num * num + den * den;
    const r = Math.sqrt(r2);
    const cosW = den / r;
    const sinW = num / r;
    const sinBeta = sinBeta0 * cosW + sigma * cosBeta0 * sinW;
    const cosBeta = cosBeta0 * cosW - sigma * sinBeta0 * sinW;
    const lambda = d * (pg.sinAlpha - sinBeta);
    // The same expressions as preparedWavelengthAndJacobian, so the values are the same to the bit.
    const dLdBeta = -d * cosBeta;
    const j1 = dLdBeta * sigma * (-num / r2);
    const j2 = dLdBeta * DEG;
    const j3 = dLdBeta * sigma * ((-sMm * (distanceMm * sinT + sMm)) / r2) * DEG;
    const j4 = dLdBeta * sigma * ((distanceMm * cosT) / r2) * -pitchMm;
    const v =
      j0 * (c00 * j0 + c01 * j1 + c02 * j2 + c03 * j3 + c04 * j4) +
      j1 * (c11 * j1 + c12 * j2 + c13 * j3 + c14 * j4) +
      j2 * (c22 * j2 + c23 * j3 + c24 * j4) +
      j3 * (c33 * j3 + c34 * j4) +
      j4 * (c44 * j4);
    const wl = lambda > 0 ? lambda : Number.NaN;
    const ls = wl * scale;
    wavelengthNm[i] = wl;
    wavelengthSigmaNm[i] = Math.sqrt(Math.max(0, v) + ls * ls);
    // dλ/dp = −∂λ/∂c: a pixel step is a detector-centre step with the opposite sign.
    if (dispersion) dispersion[i] = -j4;
  }
}

const DEG = Math.PI / 180;

/** The per-geometry constants of {@link gratingWavelengthAndJacobian}, computed once per map, not per pixel. */
export interface PreparedGrating {
  dNm: number;
  sigma: number;
  pitchMm: number;
  centerPixel: number;
  distanceMm: number;
  cosTilt: number;
  sinTilt: number;
  sinAlpha: number;
  cosAlpha: number;
  sinBeta0: number;
  cosBeta0: number;
}

export function prepareGrating(g: GratingGeometry): PreparedGrating {
  const tilt = g.detectorTiltDeg * DEG;
  const alpha = g.incidenceAngleDeg * DEG;
  const beta0 = g.detectorAngleDeg * DEG;
  return {
    dNm: 1e6 / g.grooveDensityPerMm,
    sigma: g.wavelengthIncreasesWithPixel ? -1 : 1,
    pitchMm: g.pixelPitchUm * 1e-3,
    centerPixel: g.detectorCenterPixel,
    distanceMm: g.detectorDistanceMm,
    cosTilt: Math.cos(tilt),
    sinTilt: Math.sin(tilt),
    sinAlpha: Math.sin(alpha),
    cosAlpha: Math.cos(alpha),
    sinBeta0: Math.sin(beta0),
    cosBeta0: Math.cos(beta0),
  };
}

/**
 * First-order λ(p) of grating.ts's model and its analytic partial derivatives with respect to
 * every GRATING_PARAMETERS entry (per degree, per mm, per pixel), written into `jacobian` in that
 * order. Same formula as pixelToWavelengthNm (tested equal); analytic so that evaluating 2048
 * pixels needs no finite differences. With s = (p − c)·pitch, N = s·cos θ,
 * D = L + s·sin θ, ω = atan2(N, D), β = β0 + σω:
 *   ∂ω/∂L = −N/(N² + D²), ∂ω/∂θ = −s(L sin θ + s)/(N² + D²), ∂ω/∂s = L cos θ/(N² + D²).
 */
export function gratingWavelengthAndJacobian(g: GratingGeometry, pixel: number, jacobian: Float64Array): number {
  return preparedWavelengthAndJacobian(prepareGrating(g), pixel, jacobian);
}

/**
 * {@link gratingWavelengthAndJacobian} on prepared constants, without any trigonometric call:
 * cos ω = D/r and sin ω = N/r with r = √(N² + D²) (the angle atan2 returns), and sin β, cos β
 * follow from the angle-addition formulas, so a pixel costs one square root.
 */
export function preparedWavelengthAndJacobian(pg: PreparedGrating, pixel: number, jacobian: Float64Array): number {
  const { dNm: d, sigma, pitchMm, distanceMm, cosTilt: cosT, sinTilt: sinT } = pg;
  const sMm = (pixel - pg.centerPixel) * pitchMm;
  const num = sMm * cosT;
  const den = distanceMm + sMm * sinT;
  const r2 = num * num + den * den;
  const r = Math.sqrt(r2);
  const cosW = den / r;
  const sinW = num / r;
  const sinBeta = pg.sinBeta0 * cosW + sigma * pg.cosBeta0 * sinW;
  const cosBeta = pg.cosBeta0 * cosW - sigma * pg.sinBeta0 * sinW;
  const lambda = d * (pg.sinAlpha - sinBeta);
  const dLdBeta = -d * cosBeta;
  jacobian[0] = d * pg.cosAlpha * DEG;
  jacobian[1] = dLdBeta * sigma * (-num / r2);
  jacobian[2] = dLdBeta * DEG;
  jacobian[3] = dLdBeta * sigma * ((-sMm * (distanceMm * sinT + sMm)) / r2) * DEG;
  jacobian[4] = dLdBeta * sigma * ((distanceMm * cosT) / r2) * -pitchMm;
  return lambda > 0 ? lambda : Number.NaN;
}

/** Local first-order dispersion dλ/dp (nm per pixel) at each pixel: analytic for the polynomial. */
export function calibrationDispersionNmPerPixel(cal: Calibration, pixels: ArrayLike<number>): Float64Array {
  const n = pixels.length;
  const out = new Float64Array(n);
  if (cal.model === 'polynomial') {
    const poly = requirePolynomial(cal);
    const [lo, hi] = poly.domainPx;
    const d = chebyshevDerivative(poly.coefficients);
    const du = 2 / (hi - lo);
    for (let i = 0; i < n; i++) out[i] = chebyshevValue(d, (2 * pixels[i] - (lo + hi)) / (hi - lo)) * du;
    return out;
  }
  const grating = requireGrating(cal);
  const g = prepareGrating(withParameters(grating.geometry, grating.parameterNames, grating.parameters));
  // dλ/dp = −∂λ/∂c: a pixel step is a detector-centre step with the opposite sign.
  const jac = new Float64Array(GRATING_PARAMETERS.length);
  for (let i = 0; i < n; i++) {
    preparedWavelengthAndJacobian(g, pixels[i], jac);
    out[i] = -jac[4];
  }
  return out;
}

/** Polynomial λ₁(p) at a single pixel. */
function polynomialAt(poly: NonNullable<Calibration['polynomial']>, pixel: number): number {
  const [lo, hi] = poly.domainPx;
  return chebyshevValue(poly.coefficients, (2 * pixel - (lo + hi)) / (hi - lo));
}

/**
 * Pixel where wavelength λ in diffraction order m lands (where m·λ lands in first order).
 * Grating model: exact inverse of the grating equation. Polynomial model: bracketing over the
 * domain widened by half its span each side, then bisection polished by Newton; when the
 * polynomial is not monotonic the root inside the domain nearest its centre wins.
 * Returns NaN when no pixel maps to that wavelength.
 */
export function calibrationWavelengthToPixel(cal: Calibration, wavelengthNm: number, diffractionOrder = 1): number {
  if (!(wavelengthNm > 0) || !(diffractionOrder >= 1)) return Number.NaN;
  const target = wavelengthNm * diffractionOrder;
  if (cal.model === 'grating') {
    const grating = requireGrating(cal);
    return wavelengthToPixel(withParameters(grating.geometry, grating.parameterNames, grating.parameters), target, 1);
  }
  const poly = requirePolynomial(cal);
  const [lo, hi] = poly.domainPx;
  const span = hi - lo;
  const a = lo - span / 2;
  const b = hi + span / 2;
  const samples = 128;
  const centre = (lo + hi) / 2;
  let best = Number.NaN;
  let bestScore = Number.POSITIVE_INFINITY;
  let prevP = a;
  let prevF = polynomialAt(poly, a) - target;
  for (let s = 1; s <= samples; s++) {
    const p = a + ((b - a) * s) / samples;
    const f = polynomialAt(poly, p) - target;
    if (prevF === 0 || prevF * f < 0 || (f === 0 && s === samples)) {
      const root = prevF === 0 ? prevP : f === 0 ? p : refineRoot(poly, target, prevP, p, prevF);
      const inside = root >= lo && root <= hi;
      // Prefer roots inside the domain, then the one nearest its centre.
      const score = (inside ? 0 : span) + Math.abs(root - centre);
      if (score < bestScore) {
        bestScore = score;
        best = root;
      }
    }
    prevP = p;
    prevF = f;
  }
  return best;
}

function refineRoot(poly: NonNullable<Calibration['polynomial']>, target: number, left: number, right: number, fLeft: number): number {
  const [lo, hi] = poly.domainPx;
  const d = chebyshevDerivative(poly.coefficients);
  const du = 2 / (hi - lo);
  let a = left;
  let b = right;
  let fa = fLeft;
  let x = (a + b) / 2;
  for (let iter = 0; iter < 100; iter++) {
    const f = polynomialAt(poly, x) - target;
    if (f === 0) return x;
    if (fa * f < 0) b = x;
    else {
      a = x;
      fa = f;
    }
    const slope = chebyshevValue(d, (2 * x - (lo + hi)) / (hi - lo)) * du;
    let next = slope !== 0 ? x - f / slope : Number.NaN;
    // Newton when it stays inside the bracket, bisection otherwise.
    if (!(next > a && next < b)) next = (a + b) / 2;
    if (Math.abs(next - x) <= 1e-12 * Math.max(1, Math.abs(x))) return next;
    x = next;
  }
  return x;
}
