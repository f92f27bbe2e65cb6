/**
 * Chebyshev polynomials of the first kind on a domain [lo, hi]: u = (2x − (lo + hi)) / (hi − lo).
 * The stored calibration uses this basis (Calibration.polynomial) because its columns stay
 * nearly orthogonal at any degree, unlike raw monomials of pixel numbers in the thousands.
 */
import { type DD, dd, ddAdd, ddDiv, ddMul, ddToNumber } from './double-double.ts';

/** Map x to u on [lo, hi]. */
export function toUnit(x: number, lo: number, hi: number): number {
  return (2 * x - (lo + hi)) / (hi - lo);
}

/** Fill `out` (length ≥ degree + 1) with T_0(u) … T_degree(u). */
export function chebyshevBasis(u: number, degree: number, out: Float64Array | number[]): void {
  out[0] = 1;
  if (degree >= 1) out[1] = u;
  for (let k = 2; k <= degree; k++) out[k] = 2 * u * out[k - 1] - out[k - 2];
}

/** Σ c_k T_k(u) by Clenshaw's recurrence (stable for |u| ≤ 1 and modestly beyond). */
export function chebyshevValue(coefficients: ArrayLike<number>, u: number): number {
  let b1 = 0;
  let b2 = 0;
  for (let k = coefficients.length - 1; k >= 1; k--) {
    const b0 = 2 * u * b1 - b2 + coefficients[k];
    b2 = b1;
    b1 = b0;
  }
  return u * b1 - b2 + coefficients[0];
}

/** Coefficients of d/du Σ c_k T_k(u), again in the Chebyshev basis (length one less). */
export function chebyshevDerivative(coefficients: ArrayLike<number>): Float64Array {
  const n = coefficients.length - 1;
  if (n <= 0) return new Float64Array(1);
  const d = new Float64Array(n + 1);
  for (let k = n - 1; k >= 0; k--) d[k] = (k + 2 <= n ? d[k + 2] : 0) + 2 * (k + 1) * coefficients[k + 1];
  d[0] /= 2;
  return d.subarray(0, n);
}

/** Monomial coefficients (in u) of each T_k: row k holds T_k = Σ_j M[k][j] u^j. Exact integers. */
function chebyshevToPowerTable(degree: number): number[][] {
  const rows: number[][] = [[1], [0, 1]];
  for (let k = 2; k <= degree; k++) {
    const row = new Array<number>(k + 1).fill(0);
    for (let j = 0; j < k; j++) row[j + 1] += 2 * rows[k - 1][j];
    for (let j = 0; j <= k - 2; j++) row[j] -= rows[k - 2][j];
    rows.push(row);
  }
  return rows.slice(0, degree + 1);
}

/**
 * The linear map B from Chebyshev coefficients a (in u = (x − centre)/halfWidth) to raw monomial
 * coefficients b = B·a (Σ b_j x^j), in double-double so the binomial expansion's cancellation
 * costs no digits beyond the coefficients' own.
 */
export function chebyshevToMonomialMap(degree: number, centre: number, halfWidth: number): DD[][] {
  const table = chebyshevToPowerTable(degree);
  // u^i = ((x − c)/h)^i = Σ_j C(i,j) x^j (−c)^(i−j) / h^i.
  const uPower: DD[][] = [];
  const minusC = dd(-centre);
  const h = dd(halfWidth);
  for (let i = 0; i <= degree; i++) {
    const row: DD[] = [];
    let binom = 1;
    let hPow: DD = dd(1);
    for (let t = 0; t < i; t++) hPow = ddMul(hPow, h);
    for (let j = 0; j <= i; j++) {
      let cPow: DD = dd(1);
      for (let t = 0; t < i - j; t++) cPow = ddMul(cPow, minusC);
      row.push(ddDiv(ddMul(dd(binom), cPow), hPow));
      binom = (binom * (i - j)) / (j + 1);
    }
    uPower.push(row);
  }
  const map: DD[][] = Array.from({ length: degree + 1 }, () => Array.from({ length: degree + 1 }, () => dd(0)));
  for (let k = 0; k <= degree; k++) {
    for (let i = 0; i <= k; i++) {
      const t = table[k][i];
      if (t === 0) continue;
      for (let j = 0; j <= i; j++) map[j][k] = ddAdd(map[j][k], ddMul(dd(t), uPower[i][j]));
    }
  }
  return map;
}

/** b = B·a in double-double. */
export function applyMap(map: DD[][], a: ArrayLike<number>): DD[] {
  return map.map((row) => {
    let s: DD = dd(0);
    for (let k = 0; k < row.length; k++) s = ddAdd(s, ddMul(row[k], dd(a[k])));
    return s;
  });
}

export { ddToNumber };
