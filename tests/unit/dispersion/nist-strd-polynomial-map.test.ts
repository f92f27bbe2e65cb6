/**
 * fitPolynomialMap — the polynomial map calibrateFrame fits (calibrate.ts, model 'polynomial') —
 * against the NIST StRD linear least-squares datasets that fit a polynomial in one variable.
 * Source: NIST/ITL Statistical Reference Datasets, https://www.itl.nist.gov/div898/strd/lls/lls.shtml
 * (certified at 500 digits); fixtures copied unchanged from /work/shared/reference/nist-strd/,
 * each naming its transcription. NoInt1 (no intercept: the map always has one) and Longley (six
 * regressors) are left out.
 *
 * How a dataset becomes calibration points, exactly (every step checked below in exact rational
 * arithmetic, so the data the map sees are NIST's data):
 * - pixel = s·x + t with s, t chosen so the data sit on a detector [0, pixelCount − 1] and every
 *   pixel is the exact double: Pontius x/1000 (x are multiples of 150000), Filip −x − 3.125
 *   (3.125 is a multiple of every x's unit in the last place and |result| < |x|), the rest x;
 * - wavelengthNm = y, or y + c for Wampler3–5 whose y go negative (c = 1 − min y, an integer, so
 *   y + c is exact; certified b0 moves by c, nothing else changes);
 * - pixelSigma 0 and wavelengthSigmaNm 1, so every effective σ is exactly 1 and χ² is NIST's
 *   residual sum of squares.
 *
 * The map stores Chebyshev coefficients on u = 2·pixel/(pixelCount − 1) − 1; they are converted
 * to monomials in NIST's x in exact rationals (rational.ts). The stored covariance is the
 * unscaled (AᵀA)⁻¹ times max(1, χ²/ν) (polynomial-map.ts); NIST's is (AᵀA)⁻¹ times s² = χ²/ν.
 *
 * LRE = −log10(|computed − certified| / |certified|), the absolute error when certified is 0
 * (NIST's accuracy measure; McCullough, Am. Stat. 53, 149 (1999)). Digits reached (2026-12-04):
 * coefficients Norris 11.9, Pontius 11.9, Filip 13.6, Wampler1 9.3, Wampler2 13.1, Wampler3 9.3,
 * Wampler4 9.2, Wampler5 7.6; standard deviations and residual SD ≥ 13.1 wherever certified
 * non-zero (Wampler1 and 2 certify 0: absolute 2e-10 and 5e-15, i.e. 9.6 and 14.3 digits).
 * Where coefficients stop short of 15, the limit is the stored form, not the solve: a
 * double Chebyshev coefficient carries 16 digits of λ, and a small monomial coefficient of large
 * data (Wampler1's b0 = 1 under y up to 3.4e6, Wampler5's under the shift of 2.05e7) is a
 * cancellation of such coefficients, so ~log10(max|y| / |b_j|) digits go.
 * The thresholds sit 0.5–1 digit under what is reached.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { fitPolynomialMap } from '../../../shared/engine/dispersion/polynomial-map.ts';
import * as Q from './rational.ts';

interface StrdDataset {
  name: string;
  source: string;
  degree: number;
  intercept: boolean;
  x: number[];
  y: number[];
  certifiedText: { coefficients: string[]; stdDev: string[]; residualStdDev: string };
}

function load(name: string): StrdDataset {
  return JSON.parse(readFileSync(new URL(`../../fixtures/reference/nist-strd/${name}.json`, import.meta.url), 'utf8')) as StrdDataset;
}

/** NIST's LRE, capped at 15 (the certified values print 15 digits). */
function lre(computed: Q.Rational, certified: Q.Rational): number {
  const error = certified.num === 0n ? Math.abs(Q.toDouble(computed)) : Math.abs(Q.toDouble(Q.div(Q.sub(computed, certified), certified)));
  return error === 0 ? 15 : Math.min(15, -Math.log10(error));
}

/** Monomials in u of T_0 … T_degree (integers). */
function chebyshevPowers(degree: number): bigint[][] {
  const rows: bigint[][] = [[1n], [0n, 1n]];
  for (let k = 2; k <= degree; k++) {
    const row = new Array<bigint>(k + 1).fill(0n);
    for (let j = 0; j < k; j++) row[j + 1] += 2n * rows[k - 1][j];
    for (let j = 0; j <= k - 2; j++) row[j] -= rows[k - 2][j];
    rows.push(row);
  }
  return rows.slice(0, degree + 1);
}

function binomial(n: number, k: number): bigint {
  let r = 1n;
  for (let i = 0; i < k; i++) r = (r * BigInt(n - i)) / BigInt(i + 1);
  return r;
}

/** M with b = M·a: Chebyshev coefficients a in u = A·x + C to monomial coefficients b in x. */
function chebyshevToMonomials(degree: number, A: Q.Rational, C: Q.Rational): Q.Rational[][] {
  const t = chebyshevPowers(degree);
  const m = Array.from({ length: degree + 1 }, () => Array.from({ length: degree + 1 }, () => Q.ZERO));
  for (let k = 0; k <= degree; k++) {
    for (let i = 0; i <= k; i++) {
      if (t[k][i] === 0n) continue;
      // u^i = Σ_j C(i, j) A^j C^(i−j) x^j
      for (let j = 0; j <= i; j++) m[j][k] = Q.add(m[j][k], Q.mul(Q.fromInt(t[k][i] * binomial(i, j)), Q.mul(Q.pow(A, j), Q.pow(C, i - j))));
    }
  }
  return m;
}

interface Case {
  name: string;
  /** pixel = scale·x + offset (decimal strings, exact). */
  scale: string;
  offset: string;
  pixelCount: number;
  minDigits: { coefficients: number; stdDev: number; residualSd: number };
}

const cases: Case[] = [
  { name: 'Norris', scale: '1', offset: '0', pixelCount: 1000, minDigits: { coefficients: 11, stdDev: 13, residualSd: 13 } },
  { name: 'Pontius', scale: '0.001', offset: '0', pixelCount: 3001, minDigits: { coefficients: 11, stdDev: 12.5, residualSd: 12.5 } },
  { name: 'Filip', scale: '-1', offset: '-3.125', pixelCount: 7, minDigits: { coefficients: 13, stdDev: 14, residualSd: 14 } },
  // Wampler1 and 2 are exact fits: certified SDs and residual SD are 0, so their LRE is absolute.
  { name: 'Wampler1', scale: '1', offset: '0', pixelCount: 21, minDigits: { coefficients: 8.5, stdDev: 9, residualSd: 9 } },
  { name: 'Wampler2', scale: '1', offset: '0', pixelCount: 21, minDigits: { coefficients: 12.5, stdDev: 14, residualSd: 14 } },
  { name: 'Wampler3', scale: '1', offset: '0', pixelCount: 21, minDigits: { coefficients: 8.5, stdDev: 13, residualSd: 13 } },
  { name: 'Wampler4', scale: '1', offset: '0', pixelCount: 21, minDigits: { coefficients: 8.5, stdDev: 13.5, residualSd: 14 } },
  { name: 'Wampler5', scale: '1', offset: '0', pixelCount: 21, minDigits: { coefficients: 7, stdDev: 13.5, residualSd: 14 } },
];

describe('fitPolynomialMap (the calibration path) on NIST StRD', () => {
  it.each(cases)('$name: certified coefficients, SDs and residual SD', ({ name, scale, offset, pixelCount, minDigits }) => {
    const d = load(name);
    expect(d.source).toContain('NIST');
    const minY = Math.min(...d.y);
    const shift = minY > 0 ? 0 : 1 - minY;
    const s = Q.fromDecimal(scale);
    const t = Q.fromDecimal(offset);
    const points = d.x.map((x, i) => ({ pixel: Number(scale) * x + Number(offset), pixelSigma: 0, wavelengthNm: d.y[i] + shift, wavelengthSigmaNm: 1 }));
    // The embedding is exact: these are NIST's numbers, moved without rounding.
    points.forEach((pt, i) => {
      expect(Q.sub(Q.fromDouble(pt.pixel), Q.add(Q.mul(s, Q.fromDouble(d.x[i])), t)).num).toBe(0n);
      expect(Q.sub(Q.fromDouble(pt.wavelengthNm), Q.add(Q.fromDouble(d.y[i]), Q.fromDouble(shift))).num).toBe(0n);
      expect(pt.pixel >= 0 && pt.pixel <= pixelCount - 1).toBe(true);
    });

    const fit = fitPolynomialMap(points, { pixelCount, degree: d.degree });
    expect(fit.polynomial.domainPx).toEqual([0, pixelCount - 1]);
    // u = (2·pixel − (pixelCount − 1)) / (pixelCount − 1) = A·x + C
    const h = Q.fromInt(pixelCount - 1);
    const A = Q.div(Q.mul(Q.fromInt(2), s), h);
    const C = Q.sub(Q.div(Q.mul(Q.fromInt(2), t), h), Q.ONE);
    const m = chebyshevToMonomials(d.degree, A, C);
    const a = fit.polynomial.coefficients.map(Q.fromDouble);
    const b = m.map((row) => row.reduce((acc, mk, k) => Q.add(acc, Q.mul(mk, a[k])), Q.ZERO));
    b[0] = Q.sub(b[0], Q.fromDouble(shift));
    const certified = d.certifiedText.coefficients.map(Q.fromDecimal);
    expect(b).toHaveLength(certified.length);
    const coefficientDigits = Math.min(...certified.map((c, j) => lre(b[j], c)));

    // Covariance of the monomials: M·C_a·Mᵀ with C_a rescaled to NIST's s²·(AᵀA)⁻¹.
    const nu = fit.reducedChiSquare;
    const toNist = Q.fromDouble(nu / Math.max(1, nu));
    const ca = fit.polynomial.covariance.map((row) => row.map((v) => Q.mul(Q.fromDouble(v), toNist)));
    const sdDigits = Math.min(
      ...d.certifiedText.stdDev.map((text, j) => {
        let variance = Q.ZERO;
        for (let k = 0; k < m.length; k++) for (let l = 0; l < m.length; l++) variance = Q.add(variance, Q.mul(Q.mul(m[j][k], ca[k][l]), m[j][l]));
        const sd = Q.fromDouble(Math.sqrt(Math.max(0, Q.toDouble(variance))));
        return lre(sd, Q.fromDecimal(text));
      }),
    );
    const residualSdDigits = lre(Q.fromDouble(Math.sqrt(fit.chiSquare / (d.x.length - (d.degree + 1)))), Q.fromDecimal(d.certifiedText.residualStdDev));
    console.info(`${name} via fitPolynomialMap: LRE coefficients ${coefficientDigits.toFixed(2)}, SDs ${sdDigits.toFixed(2)}, residual SD ${residualSdDigits.toFixed(2)}, cond ${fit.conditionNumber.toExponential(2)}`);
    expect(coefficientDigits).toBeGreaterThanOrEqual(minDigits.coefficients);
    expect(sdDigits).toBeGreaterThanOrEqual(minDigits.stdDev);
    expect(residualSdDigits).toBeGreaterThanOrEqual(minDigits.residualSd);
  });
});
