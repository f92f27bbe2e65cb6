/**
 * fitPolynomial's conditioning policy and the exact error messages of the dispersion stage.
 * Policy (polynomial-fit.ts): condition number of the equilibrated basis > 1e8 → flagged
 * wellConditioned = false; > 1e13 → refused with EngineError 'ill_conditioned'.
 * Contrived problem: points in 5 tight clusters. A degree-5 polynomial is then fixed only by the
 * spread δ inside the clusters (its sixth direction scales like δ); degree ≥ 10 like δ².
 */
import { describe, expect, it } from 'vitest';
import { fitPolynomial } from '../../../shared/engine/dispersion/polynomial-fit.ts';
import { fitPolynomialMap } from '../../../shared/engine/dispersion/polynomial-map.ts';
import { EngineError } from '../../../shared/engine/errors.ts';

function clustered(spread: number): { x: number[]; y: number[] } {
  const x: number[] = [];
  const y: number[] = [];
  for (const c of [0, 1, 2, 3, 4]) {
    for (let j = 0; j < 4; j++) {
      x.push(c + j * spread);
      y.push(Math.sin(c) + 1e-3 * j);
    }
  }
  return { x, y };
}

describe('conditioning policy', () => {
  it('well-spread data: flagged well conditioned with few digits lost', () => {
    const x = Array.from({ length: 30 }, (_, i) => 1000 + i * 10);
    const fit = fitPolynomial(x, x.map((v) => 1 + 1e-3 * v + 1e-7 * v * v), 2);
    expect(fit.wellConditioned).toBe(true);
    expect(fit.digitsLost).toBeLessThan(2);
  });

  it('clusters 1e-10 wide at degree 5: fitted but flagged (condition number > 1e8)', () => {
    const { x, y } = clustered(1e-10);
    const fit = fitPolynomial(x, y, 5);
    expect(fit.conditionNumber).toBeGreaterThan(1e8);
    expect(fit.digitsLost).toBeCloseTo(Math.log10(fit.conditionNumber), 12);
    expect(fit.wellConditioned).toBe(false);
  });

  it('clusters 1e-8 wide at degree 10: refused as ill-conditioned', () => {
    const { x, y } = clustered(1e-8);
    let error: unknown;
    try {
      fitPolynomial(x, y, 10);
    } catch (e) {
      error = e;
    }
    expect(error).toBeInstanceOf(EngineError);
    expect((error as EngineError).code).toBe('ill_conditioned');
    expect((error as EngineError).message).toMatch(/^The degree-10 fit is numerically rank-deficient \(condition number .*\); use a lower degree or more distinct points\.$/);
  });
});

describe('error messages', () => {
  it.each([
    [() => fitPolynomial([1, 2], [1, 2, 3], 1), 'x has 2 values but y has 3.'],
    [() => fitPolynomial([1, 2], [1, 2], 2), 'A degree-2 fit needs at least 3 points, got 2.'],
    [() => fitPolynomial([1, 2, 3], [1, 2, 3], 1.5), 'Polynomial degree must be a whole number ≥ 0, got 1.5.'],
    [() => fitPolynomial([1, Number.NaN, 3], [1, 2, 3], 1), 'Point 1 is not finite (x=NaN, y=2).'],
    [() => fitPolynomial([1, 2, 3], [1, 2, 3], 1, { weights: [1, -1, 1] }), 'Weight 1 is -1; weights must be finite and ≥ 0.'],
    [() => fitPolynomial([1, 2, 3], [1, 2, 3], 0, { intercept: false }), 'A fit without intercept needs degree ≥ 1.'],
    [() => fitPolynomialMap([{ pixel: 1, pixelSigma: 0.1, wavelengthNm: 30 }], { pixelCount: 100 }), 'A polynomial dispersion map needs at least 3 points, got 1.'],
    [
      () =>
        fitPolynomialMap(
          [10, 20, 30, 40].map((p) => ({ pixel: p, pixelSigma: 0.1, wavelengthNm: 30 + p / 10 })),
          { pixelCount: 100, degree: 3 },
        ),
      'A degree-3 map needs at least 5 points (one spare to estimate the scatter), got 4.',
    ],
    [() => fitPolynomialMap([10, 20, 30].map((p) => ({ pixel: p, pixelSigma: 0, wavelengthNm: 30 })), { pixelCount: 100 }), 'Point 0 needs pixelSigma > 0 or wavelengthSigmaNm > 0.'],
  ])('%#: %s', (call, message) => {
    expect(call).toThrow(message);
  });
});
