/**
 * The linear algebra of one Levenberg–Marquardt iteration, on preallocated arrays:
 *
 * - `factorJacobian`: Householder QR of the m×n Jacobian J (column-major), giving R (n×n, upper,
 *   row-major) and the first n entries of Qᵀr.
 * - `solveDampedStep`: the step δ minimising ‖[R; √μ·D] δ + [Qᵀr; 0]‖ for one damping μ, by
 *   Givens rotations that fold the diagonal rows √μ·D into R (MINPACK's qrsolv: Moré, Garbow &
 *   Hillstrom, "User Guide for MINPACK-1", ANL-80-74, 1980). This is the least-squares problem
 *   of the augmented Jacobian [J; √μ·D] without refactoring J for every μ, and it never forms
 *   JᵀJ, so the step keeps cond(J)·ε accuracy rather than cond(J)²·ε.
 * - `covarianceFromR`: (JᵀJ)⁻¹ = R⁻¹R⁻ᵀ.
 *
 * Nothing here allocates: the solver hands in its workspace once per fit.
 */

/**
 * Householder QR of the first `rows` rows of the column-major `jac` (leading dimension `m`).
 * Writes R into `r` (row-major n×n, zero below the diagonal) and, when `residuals` is given, the
 * first n entries of Qᵀ·residuals into `qtr`. `qr` (rows·n) is scratch for the reflectors; it
 * may be `jac` itself when rows = m, which then is overwritten.
 */
export function factorJacobian(
  jac: Float64Array,
  m: number,
  rows: number,
  n: number,
  qr: Float64Array,
  r: Float64Array,
  residuals: Float64Array | null,
  qtr: Float64Array,
  work: Float64Array,
): void {
  if (qr !== jac) {
    for (let j = 0; j < n; j++) {
      const src = j * m;
      const dst = j * rows;
      for (let i = 0; i < rows; i++) qr[dst + i] = jac[src + i];
    }
  }
  if (residuals) for (let i = 0; i < rows; i++) work[i] = residuals[i];
  r.fill(0);
  for (let k = 0; k < n; k++) {
    const ck = k * rows;
    let norm = columnNorm(qr, ck + k, ck + rows);
    if (norm === 0) {
      // A zero column: R's diagonal entry is 0 and no reflector is applied.
      for (let j = k + 1; j < n; j++) r[k * n + j] = qr[j * rows + k];
      continue;
    }
    if (qr[ck + k] < 0) norm = -norm;
    const inverse = 1 / norm;
    for (let i = k; i < rows; i++) qr[ck + i] *= inverse;
    qr[ck + k] += 1;
    const pivot = qr[ck + k];
    let j = k + 1;
    for (; j + 1 < n; j += 2) {
      reflectPair(qr, ck + k, j * rows + k, (j + 1) * rows + k, rows - k, pivot);
      r[k * n + j] = qr[j * rows + k];
      r[k * n + j + 1] = qr[(j + 1) * rows + k];
    }
    if (j < n) {
      reflect(qr, ck + k, qr, j * rows + k, rows - k, pivot);
      r[k * n + j] = qr[j * rows + k];
    }
    if (residuals) reflect(qr, ck + k, work, k, rows - k, pivot);
    r[k * n + k] = -norm;
  }
  if (residuals) for (let k = 0; k < n; k++) qtr[k] = work[k];
}

/**
 * Apply the Householder reflector v = a[va, va + length) (with v₀ = pivot) to y[ya, ya + length):
 * y −= v·(vᵀy)/pivot. Unrolled by four: this loop is most of the fit's arithmetic.
 */
function reflect(a: Float64Array, va: number, y: Float64Array, ya: number, length: number, pivot: number): void {
  const end = length - (length % 4);
  let s0 = 0;
  let s1 = 0;
  let s2 = 0;
  let s3 = 0;
  for (let i = 0; i < end; i += 4) {
    s0 += a[va + i] * y[ya + i];
    s1 += a[va + i + 1] * y[ya + i + 1];
    s2 += a[va + i + 2] * y[ya + i + 2];
    s3 += a[va + i + 3] * y[ya + i + 3];
  }
  for (let i = end; i < length; i++) s0 += a[va + i] * y[ya + i];
  const f = -(s0 + s1 + (s2 + s3)) / pivot;
  for (let i = 0; i < end; i += 4) {
    y[ya + i] += f * a[va + i];
    y[ya + i + 1] += f * a[va + i + 1];
    y[ya + i + 2] += f * a[va + i + 2];
    y[ya + i + 3] += f * a[va + i + 3];
  }
  for (let i = end; i < length; i++) y[ya + i] += f * a[va + i];
}

/** {@link reflect} on two columns of `a` at once, y at ya and z at za: v is read once for both. */
function reflectPair(a: Float64Array, va: number, ya: number, za: number, length: number, pivot: number): void {
  const end = length - (length % 2);
  let s0 = 0;
  let s1 = 0;
  let t0 = 0;
  let t1 = 0;
  for (let i = 0; i < end; i += 2) {
    const v0 = a[va + i];
    const v1 = a[va + i + 1];
    s0 += v0 * a[ya + i];
    s1 += v1 * a[ya + i + 1];
    t0 += v0 * a[za + i];
    t1 += v1 * a[za + i + 1];
  }
  if (end < length) {
    s0 += a[va + end] * a[ya + end];
    t0 += a[va + end] * a[za + end];
  }
  const f = -(s0 + s1) / pivot;
  const g = -(t0 + t1) / pivot;
  for (let i = 0; i < length; i++) {
    const v = a[va + i];
    a[ya + i] += f * v;
    a[za + i] += g * v;
  }
}

/**
 * 2-norm of a[from, to). The plain sum of squares, unless it under- or overflows: then again with
 * the largest entry divided out (rare, and only then worth the divisions).
 */
export function columnNorm(a: Float64Array, from: number, to: number): number {
  let s = 0;
  for (let i = from; i < to; i++) s += a[i] * a[i];
  if (s > 1e-280 && s < 1e280) return Math.sqrt(s);
  let big = 0;
  for (let i = from; i < to; i++) big = Math.max(big, Math.abs(a[i]));
  if (!(big > 0) || !Number.isFinite(big)) return big;
  s = 0;
  for (let i = from; i < to; i++) {
    const v = a[i] / big;
    s += v * v;
  }
  return big * Math.sqrt(s);
}

/**
 * δ = argmin ‖[R; diag(d)] δ + [qtr; 0]‖ with d = √μ·D (all d_j > 0, so the system has full
 * rank even when R does not). `s` (n×n) and `z`, `row` (n) are scratch; the result goes into `delta`.
 */
export function solveDampedStep(
  n: number,
  r: Float64Array,
  qtr: Float64Array,
  d: Float64Array,
  s: Float64Array,
  z: Float64Array,
  row: Float64Array,
  delta: Float64Array,
): void {
  s.set(r);
  z.set(qtr);
  for (let j = 0; j < n; j++) {
    if (d[j] === 0) continue;
    for (let k = j; k < n; k++) row[k] = 0;
    row[j] = d[j];
    // The new row's right-hand side is 0; rotations mix it with z.
    let extra = 0;
    for (let k = j; k < n; k++) {
      const b = row[k];
      if (b === 0) continue;
      const a = s[k * n + k];
      // Givens rotation that zeroes `b` against the diagonal `a`: one square root and one division,
      // or MINPACK's overflow-safe form when a² + b² would leave the comfortable range.
      let c: number;
      let sn: number;
      const h2 = a * a + b * b;
      if (h2 > 1e-290 && h2 < 1e290) {
        const inv = 1 / Math.sqrt(h2);
        c = a * inv;
        sn = b * inv;
      } else if (Math.abs(a) < Math.abs(b)) {
        const cot = a / b;
        sn = 0.5 / Math.sqrt(0.25 + 0.25 * cot * cot);
        c = sn * cot;
      } else {
        const tan = b / a;
        c = 0.5 / Math.sqrt(0.25 + 0.25 * tan * tan);
        sn = c * tan;
      }
      s[k * n + k] = c * a + sn * b;
      const zk = z[k];
      z[k] = c * zk + sn * extra;
      extra = -sn * zk + c * extra;
      for (let i = k + 1; i < n; i++) {
        const ski = s[k * n + i];
        const ri = row[i];
        s[k * n + i] = c * ski + sn * ri;
        row[i] = -sn * ski + c * ri;
      }
    }
  }
  for (let k = n - 1; k >= 0; k--) {
    let sum = z[k];
    for (let i = k + 1; i < n; i++) sum -= s[k * n + i] * delta[i];
    const diag = s[k * n + k];
    delta[k] = diag !== 0 ? sum / diag : 0;
  }
  for (let k = 0; k < n; k++) delta[k] = -delta[k];
}

/** ‖R·v‖² for upper-triangular row-major R: equals ‖J·v‖² since J = Q·R. */
export function normOfRTimesSquared(n: number, r: Float64Array, v: Float64Array): number {
  let total = 0;
  for (let i = 0; i < n; i++) {
    let s = 0;
    for (let j = i; j < n; j++) s += r[i * n + j] * v[j];
    total += s * s;
  }
  return total;
}

/** ‖qtr + R·v‖²: the linear model's sum of squares within the range of J, for a projected step. */
export function modelNormSquared(n: number, r: Float64Array, qtr: Float64Array, v: Float64Array): number {
  let total = 0;
  for (let i = 0; i < n; i++) {
    let s = qtr[i];
    for (let j = i; j < n; j++) s += r[i * n + j] * v[j];
    total += s * s;
  }
  return total;
}

/**
 * (JᵀJ)⁻¹ = R⁻¹R⁻ᵀ into `out` (row-major n×n); `rinv` (n×n) is scratch. Returns false when R is
 * numerically singular: a diagonal entry at or below `RANK_TOLERANCE` of its column's norm, i.e.
 * that column is a combination of the earlier ones to ~13 digits, and no variance can be stated.
 */
export function covarianceFromR(n: number, r: Float64Array, columnNorms: Float64Array, out: Float64Array, rinv: Float64Array): boolean {
  for (let k = 0; k < n; k++) {
    if (!(Math.abs(r[k * n + k]) > RANK_TOLERANCE * columnNorms[k])) return false;
  }
  rinv.fill(0);
  for (let c = 0; c < n; c++) {
    for (let i = c; i >= 0; i--) {
      let s = i === c ? 1 : 0;
      for (let j = i + 1; j <= c; j++) s -= r[i * n + j] * rinv[j * n + c];
      rinv[i * n + c] = s / r[i * n + i];
    }
  }
  for (let i = 0; i < n; i++) {
    for (let j = i; j < n; j++) {
      let s = 0;
      for (let k = j; k < n; k++) s += rinv[i * n + k] * rinv[j * n + k];
      out[i * n + j] = s;
      out[j * n + i] = s;
    }
  }
  for (let k = 0; k < n * n; k++) if (!Number.isFinite(out[k])) return false;
  return true;
}

/** See covarianceFromR: |R_kk| ≤ 1e-13·‖J_k‖ counts as singular (about 450 ε). */
const RANK_TOLERANCE = 1e-13;
