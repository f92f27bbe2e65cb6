/**
 * Householder QR least squares for small dense problems (a few hundred rows, ≤ ~12 columns).
 *
 * Why our own and not normal equations: forming AᵀA squares the condition number, which on a
 * degree-10 polynomial (NIST Filip) leaves no correct digit. Householder reflections keep the
 * error at cond(A)·eps. Columns are equilibrated to unit 2-norm first, so the condition number we
 * report is that of the scaled problem (the one that governs the accuracy of the solve).
 */

/** A column-major m×n design matrix: `a[j * rows + i]` is row i, column j. */
export interface DesignMatrix {
  rows: number;
  cols: number;
  a: Float64Array;
}

export interface QrFactors {
  rows: number;
  cols: number;
  /** Householder vectors below the diagonal, R on and above it (column-major, overwritten copy). */
  qr: Float64Array;
  /** Diagonal of R. */
  rDiag: Float64Array;
  /** Column scale factors: the factored matrix is A·diag(1/colScale). */
  colScale: Float64Array;
}

/** Factor A·diag(1/s) = Q·R with s the column 2-norms. Does not modify `m.a`. */
export function householderQr(m: DesignMatrix): QrFactors {
  const { rows, cols } = m;
  const qr = Float64Array.from(m.a);
  const colScale = new Float64Array(cols);
  for (let j = 0; j < cols; j++) {
    let s = 0;
    for (let i = 0; i < rows; i++) s = Math.hypot(s, qr[j * rows + i]);
    colScale[j] = s > 0 ? s : 1;
    for (let i = 0; i < rows; i++) qr[j * rows + i] /= colScale[j];
  }
  const rDiag = new Float64Array(cols);
  for (let k = 0; k < cols; k++) {
    let norm = 0;
    for (let i = k; i < rows; i++) norm = Math.hypot(norm, qr[k * rows + i]);
    if (norm !== 0) {
      if (qr[k * rows + k] < 0) norm = -norm;
      for (let i = k; i < rows; i++) qr[k * rows + i] /= norm;
      qr[k * rows + k] += 1;
      for (let j = k + 1; j < cols; j++) {
        let s = 0;
        for (let i = k; i < rows; i++) s += qr[k * rows + i] * qr[j * rows + i];
        s = -s / qr[k * rows + k];
        for (let i = k; i < rows; i++) qr[j * rows + i] += s * qr[k * rows + i];
      }
    }
    rDiag[k] = -norm;
  }
  return { rows, cols, qr, rDiag, colScale };
}

/** Apply Qᵀ to a copy of b. */
function applyQt(f: QrFactors, b: ArrayLike<number>): Float64Array {
  const { rows, cols, qr } = f;
  const y = Float64Array.from(b as ArrayLike<number>);
  for (let k = 0; k < cols; k++) {
    if (qr[k * rows + k] === 0) continue;
    let s = 0;
    for (let i = k; i < rows; i++) s += qr[k * rows + i] * y[i];
    s = -s / qr[k * rows + k];
    for (let i = k; i < rows; i++) y[i] += s * qr[k * rows + i];
  }
  return y;
}

/** Least-squares solution x of min ‖A x − b‖ in the original (unscaled) columns. */
export function qrSolve(f: QrFactors, b: ArrayLike<number>): Float64Array {
  const { rows, cols, qr, rDiag, colScale } = f;
  const y = applyQt(f, b);
  const x = new Float64Array(cols);
  for (let k = cols - 1; k >= 0; k--) {
    let s = y[k];
    for (let j = k + 1; j < cols; j++) s -= qr[j * rows + k] * x[j];
    x[k] = s / rDiag[k];
  }
  for (let k = 0; k < cols; k++) x[k] /= colScale[k];
  return x;
}

/** R of the scaled problem as a dense row-major n×n array (upper triangular). */
export function upperR(f: QrFactors): number[][] {
  const { rows, cols, qr, rDiag } = f;
  const r: number[][] = [];
  for (let i = 0; i < cols; i++) {
    const row = new Array<number>(cols).fill(0);
    row[i] = rDiag[i];
    for (let j = i + 1; j < cols; j++) row[j] = qr[j * rows + i];
    r.push(row);
  }
  return r;
}

/**
 * (AᵀA)⁻¹ in the original columns, from R: (AᵀA)⁻¹ = S⁻¹ R⁻¹ R⁻ᵀ S⁻¹. Never forms AᵀA.
 */
export function unscaledCovariance(f: QrFactors): number[][] {
  const n = f.cols;
  const r = upperR(f);
  // Rinv by back substitution, column by column.
  const rinv: number[][] = Array.from({ length: n }, () => new Array<number>(n).fill(0));
  for (let c = 0; c < n; c++) {
    for (let i = c; i >= 0; i--) {
      let s = i === c ? 1 : 0;
      for (let j = i + 1; j <= c; j++) s -= r[i][j] * rinv[j][c];
      rinv[i][c] = s / r[i][i];
    }
  }
  const cov: number[][] = Array.from({ length: n }, () => new Array<number>(n).fill(0));
  for (let i = 0; i < n; i++) {
    for (let j = i; j < n; j++) {
      let s = 0;
      for (let k = Math.max(i, j); k < n; k++) s += rinv[i][k] * rinv[j][k];
      s /= f.colScale[i] * f.colScale[j];
      cov[i][j] = s;
      cov[j][i] = s;
    }
  }
  return cov;
}

/** Leverages h_ii = ‖row i of Q₁‖² (diagonal of the hat matrix), for leave-one-out residuals. */
export function leverages(f: QrFactors): Float64Array {
  const { rows, cols } = f;
  const h = new Float64Array(rows);
  const e = new Float64Array(rows);
  // Q₁ column k = Q e_k; h_i = Σ_k (Q e_k)_i². Build Q e_k by applying reflectors in reverse.
  for (let k = 0; k < cols; k++) {
    e.fill(0);
    e[k] = 1;
    for (let j = cols - 1; j >= 0; j--) {
      const d = f.qr[j * rows + j];
      if (d === 0) continue;
      let s = 0;
      for (let i = j; i < rows; i++) s += f.qr[j * rows + i] * e[i];
      s = -s / d;
      for (let i = j; i < rows; i++) e[i] += s * f.qr[j * rows + i];
    }
    for (let i = 0; i < rows; i++) h[i] += e[i] * e[i];
  }
  return h;
}
