/**
 * Exact rational arithmetic (BigInt numerator / denominator) for the NIST StRD tests: a double is
 * an exact dyadic rational and NIST's certified values are exact decimals, so converting
 * coefficients between bases this way adds no rounding of its own, and the test does not lean on
 * the engine's own double-double conversion (dispersion/chebyshev.ts) that it is checking.
 */

export interface Rational {
  num: bigint;
  den: bigint;
}

function gcd(a: bigint, b: bigint): bigint {
  let x = a < 0n ? -a : a;
  let y = b < 0n ? -b : b;
  while (y !== 0n) [x, y] = [y, x % y];
  return x;
}

function make(num: bigint, den: bigint): Rational {
  if (den === 0n) throw new Error('rational with zero denominator');
  if (den < 0n) {
    num = -num;
    den = -den;
  }
  const g = gcd(num, den);
  return g > 1n ? { num: num / g, den: den / g } : { num, den };
}

export const ZERO: Rational = { num: 0n, den: 1n };
export const ONE: Rational = { num: 1n, den: 1n };

export function fromInt(n: number | bigint): Rational {
  return { num: BigInt(n), den: 1n };
}

/** The exact value of a finite double. */
export function fromDouble(x: number): Rational {
  if (!Number.isFinite(x)) throw new Error(`not a finite double: ${x}`);
  if (x === 0) return ZERO;
  const view = new DataView(new ArrayBuffer(8));
  view.setFloat64(0, x);
  const bits = view.getBigUint64(0);
  const sign = bits >> 63n ? -1n : 1n;
  const exponent = Number((bits >> 52n) & 0x7ffn);
  const fraction = bits & ((1n << 52n) - 1n);
  const mantissa = exponent === 0 ? fraction : fraction | (1n << 52n);
  const power = (exponent === 0 ? 1 : exponent) - 1075;
  return power >= 0 ? make(sign * mantissa * (1n << BigInt(power)), 1n) : make(sign * mantissa, 1n << BigInt(-power));
}

/** The exact value of a decimal string such as "-0.358191792925910E-01". */
export function fromDecimal(text: string): Rational {
  const match = /^\s*([+-]?)(\d*)(?:\.(\d*))?(?:[eE]([+-]?\d+))?\s*$/.exec(text);
  if (!match) throw new Error(`not a decimal number: "${text}"`);
  const [, sign, whole, frac = '', exp = '0'] = match;
  let num = BigInt((whole || '0') + frac);
  if (sign === '-') num = -num;
  const power = Number(exp) - frac.length;
  return power >= 0 ? make(num * 10n ** BigInt(power), 1n) : make(num, 10n ** BigInt(-power));
}

export function add(a: Rational, b: Rational): Rational {
  return make(a.num * b.den + b.num * a.den, a.den * b.den);
}

export function sub(a: Rational, b: Rational): Rational {
  return make(a.num * b.den - b.num * a.den, a.den * b.den);
}

export function mul(a: Rational, b: Rational): Rational {
  return make(a.num * b.num, a.den * b.den);
}

export function div(a: Rational, b: Rational): Rational {
  return make(a.num * b.den, a.den * b.num);
}

/** The nearest double (to within one rounding; exact enough for an error that is itself the result). */
export function toDouble(a: Rational): number {
  if (a.num === 0n) return 0;
  const negative = a.num < 0n;
  let num = negative ? -a.num : a.num;
  let den = a.den;
  // Scale to a 64-bit quotient so Number() sees a full mantissa.
  const shift = num.toString(2).length - den.toString(2).length - 64;
  if (shift > 0) den <<= BigInt(shift);
  else num <<= BigInt(-shift);
  const q = Number(num / den) * 2 ** shift;
  return negative ? -q : q;
}

/** Binomial-free power: a^k. */
export function pow(a: Rational, k: number): Rational {
  let out = ONE;
  for (let i = 0; i < k; i++) out = mul(out, a);
  return out;
}
