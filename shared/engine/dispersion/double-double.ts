/**
 * Double-double arithmetic (about 32 significant digits) for the two places where plain doubles
 * lose digits the solve itself did not: residuals in iterative refinement and the change of basis
 * from scaled Chebyshev to raw monomial coefficients (binomial expansion with cancellation).
 * Error-free transformations after Dekker (1971) and Knuth; common practice.
 */

/** A value hi + lo with |lo| ≤ ulp(hi)/2. */
export type DD = [number, number];

const SPLITTER = 134217729; // 2^27 + 1

function twoSum(a: number, b: number): DD {
  const s = a + b;
  const bb = s - a;
  return [s, a - (s - bb) + (b - bb)];
}

function twoProd(a: number, b: number): DD {
  const p = a * b;
  let t = SPLITTER * a;
  const ah = t - (t - a);
  const al = a - ah;
  t = SPLITTER * b;
  const bh = t - (t - b);
  const bl = b - bh;
  return [p, ah * bh - p + ah * bl + al * bh + al * bl];
}

export function ddAdd(x: DD, y: DD): DD {
  const [s, e] = twoSum(x[0], y[0]);
  const [t, f] = twoSum(x[1], y[1]);
  const [s2, e2] = twoSum(s, e + t);
  return twoSum(s2, e2 + f);
}

export function ddMul(x: DD, y: DD): DD {
  const [p, e] = twoProd(x[0], y[0]);
  return twoSum(p, e + (x[0] * y[1] + x[1] * y[0]));
}

export function ddDiv(x: DD, y: DD): DD {
  const q1 = x[0] / y[0];
  const r = ddAdd(x, ddMul([-q1, 0], y));
  const q2 = r[0] / y[0];
  return twoSum(q1, q2);
}

export function dd(a: number): DD {
  return [a, 0];
}

export function ddToNumber(x: DD): number {
  return x[0] + x[1];
}
