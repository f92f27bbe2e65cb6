/**
 * The continuum-edge fit on one window of a lineout (see continuum-edge.ts for the model):
 *
 *   counts(p) = (a1 + b1·u)·L(p − s) + (a2 + b2·u)·R(p − s) + Σ_k A_k·g(p; c_k, w_k)
 *
 * Linear in a1, b1, a2, b2 and the line amplitudes A_k (solved by Householder QR for every trial
 * of the rest: variable projection); nonlinear in the shift s and, for the lines close to the
 * step, their centres c_k and FWHMs w_k (a line on the step is fitted with a baseline that is
 * itself a step, so the peak finder's centre and width are biased there). The nonlinear part
 * is a damped Gauss–Newton (Levenberg–Marquardt) on the projected residuals with a
 * forward-difference Jacobian, each step solved by QR of the augmented Jacobian.
 */
import { householderQr, qrSolve, unscaledCovariance } from '../dispersion/householder.ts';
import { cubicAt, phi, SUB, type EdgeProfiles } from './edge-profiles.ts';

const FWHM_PER_SIGMA = 2 * Math.sqrt(2 * Math.LN2);

/** A line of the window: fixed, or free (centre and width fitted within bounds). */
export interface WindowLine {
  pixel: number;
  fwhmPx: number;
  free: boolean;
}

export interface StepWindow {
  pixels: Float64Array;
  counts: Float64Array;
  sigma: Float64Array;
  /** u = (p − centre)/halfWidth scales the background slopes. */
  centre: number;
  halfWidth: number;
  profiles: EdgeProfiles;
  lines: WindowLine[];
  /** |s| ≤ this, px. */
  searchPx: number;
}

export interface StepSolution {
  s: number;
  lines: WindowLine[];
  /** a1, b1, a2, b2, then one amplitude per line. */
  coefficients: Float64Array;
  chiSquare: number;
}

/** Unit-area pixel-integrated Gaussian of a line at pixel p. */
function lineProfile(p: number, line: { pixel: number; fwhmPx: number }): number {
  const sigma = line.fwhmPx / FWHM_PER_SIGMA;
  return phi((p + 0.5 - line.pixel) / sigma) - phi((p - 0.5 - line.pixel) / sigma);
}

/** Weighted line columns from column `first` on. */
function fillLineColumns(w: StepWindow, lines: readonly WindowLine[], a: Float64Array, first: number): void {
  const rows = w.pixels.length;
  for (let k = 0; k < lines.length; k++) {
    const offset = (first + k) * rows;
    for (let r = 0; r < rows; r++) a[offset + r] = lineProfile(w.pixels[r], lines[k]) / w.sigma[r];
  }
}

/** The weighted design matrix (column-major) of the step model for shift s and these lines. */
function stepDesign(w: StepWindow, s: number, lines: readonly WindowLine[]): Float64Array {
  const rows = w.pixels.length;
  const a = new Float64Array(rows * (4 + lines.length));
  for (let r = 0; r < rows; r++) {
    const p = w.pixels[r];
    const t = (p - s - w.profiles.x0) * SUB;
    const l = cubicAt(w.profiles.low, t)[0];
    const h = cubicAt(w.profiles.high, t)[0];
    const u = (p - w.centre) / w.halfWidth;
    const inv = 1 / w.sigma[r];
    a[r] = l * inv;
    a[rows + r] = l * u * inv;
    a[2 * rows + r] = h * inv;
    a[3 * rows + r] = h * u * inv;
  }
  fillLineColumns(w, lines, a, 4);
  return a;
}

function weightedCounts(w: StepWindow): Float64Array {
  const b = new Float64Array(w.counts.length);
  for (let r = 0; r < b.length; r++) b[r] = w.counts[r] / w.sigma[r];
  return b;
}

/** Weighted residuals b − A·x. */
function residuals(a: Float64Array, b: Float64Array, x: Float64Array): Float64Array {
  const rows = b.length;
  const out = Float64Array.from(b);
  for (let c = 0; c < x.length; c++) for (let r = 0; r < rows; r++) out[r] -= a[c * rows + r] * x[c];
  return out;
}

function sumSquares(v: Float64Array): number {
  let s = 0;
  for (const x of v) s += x * x;
  return s;
}

/** Best linear coefficients and χ² for a shift and lines (the projected problem). */
export function solveStep(w: StepWindow, s: number, lines: readonly WindowLine[] = w.lines): { coefficients: Float64Array; chiSquare: number; residuals: Float64Array } {
  const a = stepDesign(w, s, lines);
  const b = weightedCounts(w);
  const coefficients = qrSolve(householderQr({ rows: b.length, cols: 4 + lines.length, a }), b);
  const res = residuals(a, b, coefficients);
  return { coefficients, chiSquare: sumSquares(res), residuals: res };
}

/** Fit of a smooth continuum without a step (a quadratic in u) and the lines. */
function smoothFit(w: StepWindow, lines: readonly WindowLine[]): Evaluation {
  const rows = w.pixels.length;
  const cols = 3 + lines.length;
  const a = new Float64Array(rows * cols);
  for (let r = 0; r < rows; r++) {
    const p = w.pixels[r];
    const u = (p - w.centre) / w.halfWidth;
    const inv = 1 / w.sigma[r];
    a[r] = inv;
    a[rows + r] = u * inv;
    a[2 * rows + r] = u * u * inv;
  }
  fillLineColumns(w, lines, a, 3);
  const b = weightedCounts(w);
  const res = residuals(a, b, qrSolve(householderQr({ rows, cols, a }), b));
  return { residuals: res, chiSquare: sumSquares(res) };
}

/** χ² on a grid of shifts (step `stepPx`) over ±searchPx; the local minima, best first. */
export function scanMinima(w: StepWindow, stepPx: number): { s: number; chiSquare: number }[] {
  const n = Math.floor(w.searchPx / stepPx);
  const chi: number[] = [];
  for (let k = -n; k <= n; k++) chi.push(solveStep(w, k * stepPx).chiSquare);
  const minima: { s: number; chiSquare: number }[] = [];
  for (let i = 0; i < chi.length; i++) {
    if ((i === 0 || chi[i] <= chi[i - 1]) && (i === chi.length - 1 || chi[i] <= chi[i + 1])) minima.push({ s: (i - n) * stepPx, chiSquare: chi[i] });
  }
  return minima.sort((x, y) => x.chiSquare - y.chiSquare);
}

/** Parameter vector θ = [s, (c, w) of each free line] and back; the smooth model has no s. */
function pack(s: number | null, lines: readonly WindowLine[]): number[] {
  const theta = s === null ? [] : [s];
  for (const l of lines) if (l.free) theta.push(l.pixel, l.fwhmPx);
  return theta;
}

function unpackLines(theta: readonly number[], first: number, template: readonly WindowLine[]): WindowLine[] {
  let k = first;
  return template.map((l) => {
    if (!l.free) return l;
    const out = { pixel: theta[k], fwhmPx: theta[k + 1], free: true };
    k += 2;
    return out;
  });
}

function unpack(theta: readonly number[], template: readonly WindowLine[]): { s: number; lines: WindowLine[] } {
  return { s: theta[0], lines: unpackLines(theta, 1, template) };
}

/** Box bounds of the free lines' parameters: within 1 FWHM of the start, FWHM within ×0.6…×1.6. */
function lineBounds(start: readonly WindowLine[], lo: number[], hi: number[]): void {
  for (const l of start) {
    if (!l.free) continue;
    lo.push(l.pixel - l.fwhmPx, 0.6 * l.fwhmPx);
    hi.push(l.pixel + l.fwhmPx, 1.6 * l.fwhmPx);
  }
}

/** Forward-difference step of a parameter (a pixel or a width). */
function differenceStep(value: number): number {
  return Math.max(1e-3, 1e-4 * Math.abs(value));
}

interface Evaluation {
  residuals: Float64Array;
  chiSquare: number;
}

/**
 * Levenberg–Marquardt on projected residuals: `evaluate(θ)` solves the linear part and returns
 * the weighted residuals. Box bounds by clamping. Returns the best θ met.
 */
function minimiseProjected<E extends Evaluation>(evaluate: (theta: readonly number[]) => E, theta0: number[], lo: number[], hi: number[], maxIterations = 40): { theta: number[]; best: E } {
  const clamp = (theta: number[]): number[] => theta.map((v, i) => Math.min(hi[i], Math.max(lo[i], v)));
  let theta = clamp(theta0);
  let current = evaluate(theta);
  const n = theta.length;
  if (n === 0) return { theta, best: current };
  const rows = current.residuals.length;
  let lambda = 1e-3;
  for (let iteration = 0; iteration < maxIterations; iteration++) {
    // J = ∂r/∂θ by forward differences (stepping back at an upper bound), after a column of [J; √λ D].
    const jac = new Float64Array((rows + n) * n);
    const colNorm = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      const h = differenceStep(theta[i]);
      const shifted = [...theta];
      shifted[i] = theta[i] + h <= hi[i] ? theta[i] + h : theta[i] - h;
      const dh = shifted[i] - theta[i];
      const r = evaluate(shifted).residuals;
      let norm = 0;
      for (let k = 0; k < rows; k++) {
        const v = (r[k] - current.residuals[k]) / dh;
        jac[i * (rows + n) + k] = v;
        norm += v * v;
      }
      colNorm[i] = Math.sqrt(norm) || 1;
    }
    let improved = false;
    for (let attempt = 0; attempt < 8 && !improved; attempt++) {
      // min ‖J δ + r‖² + λ‖D δ‖², as least squares on [J; √λ D] δ = [−r; 0].
      const aug = Float64Array.from(jac);
      for (let i = 0; i < n; i++) aug[i * (rows + n) + rows + i] = Math.sqrt(lambda) * colNorm[i];
      const rhs = new Float64Array(rows + n);
      for (let k = 0; k < rows; k++) rhs[k] = -current.residuals[k];
      const delta = qrSolve(householderQr({ rows: rows + n, cols: n, a: aug }), rhs);
      const trial = clamp(theta.map((v, i) => v + delta[i]));
      const next = evaluate(trial);
      if (next.chiSquare < current.chiSquare) {
        const gain = (current.chiSquare - next.chiSquare) / current.chiSquare;
        theta = trial;
        current = next;
        lambda = Math.max(1e-9, lambda / 3);
        improved = true;
        if (gain < 1e-10) return { theta, best: current };
      } else {
        lambda *= 4;
      }
    }
    if (!improved) break;
  }
  return { theta, best: current };
}

/** The step model from shift `s0`, the free lines from their given centres and widths. */
export function refineStep(w: StepWindow, s0: number): StepSolution {
  const lo = [-w.searchPx];
  const hi = [w.searchPx];
  lineBounds(w.lines, lo, hi);
  const { theta, best } = minimiseProjected((t) => solveStep(w, t[0], unpack(t, w.lines).lines), pack(s0, w.lines), lo, hi);
  const { s, lines } = unpack(theta, w.lines);
  return { s, lines, coefficients: best.coefficients, chiSquare: best.chiSquare };
}

/** χ² of the smooth model (no step) with the same lines free as in `lines`. */
export function refineSmooth(w: StepWindow, lines: readonly WindowLine[]): number {
  const lo: number[] = [];
  const hi: number[] = [];
  lineBounds(lines, lo, hi);
  return minimiseProjected((t) => smoothFit(w, unpackLines(t, 0, lines)), pack(null, lines), lo, hi).best.chiSquare;
}

/**
 * (JᵀJ)⁻¹ of the full Jacobian at the solution, unscaled (the caller scales by the reduced χ²).
 * Order: a1, b1, a2, b2, the line amplitudes, then s and the free lines' (centre, FWHM) — the
 * derivatives of the model with respect to the nonlinear ones by forward differences.
 */
export function solutionCovariance(w: StepWindow, solution: StepSolution): { covariance: number[][]; shiftIndex: number } {
  const rows = w.pixels.length;
  const base = stepDesign(w, solution.s, solution.lines);
  const linear = 4 + solution.lines.length;
  const theta = pack(solution.s, solution.lines);
  const model = (a: Float64Array): Float64Array => {
    const m = new Float64Array(rows);
    for (let c = 0; c < linear; c++) for (let r = 0; r < rows; r++) m[r] += a[c * rows + r] * solution.coefficients[c];
    return m;
  };
  const m0 = model(base);
  const cols = linear + theta.length;
  const jac = new Float64Array(rows * cols);
  jac.set(base);
  theta.forEach((value, i) => {
    const h = i === 0 ? 1e-3 : differenceStep(value);
    const shifted = [...theta];
    shifted[i] = value + h;
    const { s, lines } = unpack(shifted, solution.lines);
    const m = model(stepDesign(w, s, lines));
    for (let r = 0; r < rows; r++) jac[(linear + i) * rows + r] = (m[r] - m0[r]) / h;
  });
  return { covariance: unscaledCovariance(householderQr({ rows, cols, a: jac })), shiftIndex: linear };
}
