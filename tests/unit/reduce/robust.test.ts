import { describe, expect, it } from 'vitest';
import { MAD_TO_SIGMA, madSigmaInPlace } from '../../../shared/engine/reduce/robust.ts';
import { createRandom } from '../../../shared/engine/simulate/random.ts';

/**
 * The textbook definitions, by full sort: the median is the middle value of the sorted sample,
 * or the mean of the two middle values for an even count; MAD is the median of |x − median|
 * (common practice; 1.4826 turns it into a Gaussian sigma).
 */
function sortedMedian(values: number[]): number {
  const s = [...values].sort((a, b) => a - b);
  const k = s.length >> 1;
  return s.length % 2 ? s[k] : 0.5 * (s[k - 1] + s[k]);
}
function sortedMadSigma(values: number[]): number {
  const m = sortedMedian(values);
  return MAD_TO_SIGMA * sortedMedian(values.map((v) => Math.abs(v - m)));
}

function madOf(values: number[]): number {
  return madSigmaInPlace(Float64Array.from(values), values.length);
}

describe('madSigmaInPlace (histogram for integer data, selection otherwise)', () => {
  const random = createRandom(77);
  const gaussianIntegers = (n: number, sigma: number, offset: number) =>
    Array.from({ length: n }, () => Math.round(offset + sigma * random.normal()));

  it('equals the sort-based MAD exactly on integer data, odd and even counts, integer and half-integer medians', () => {
    for (const n of [1024, 1025, 2000, 2001, 20_000, 20_001]) {
      for (const [sigma, offset] of [[0.4, 0], [3, -7], [14, 0], [250, 1000]]) {
        const values = gaussianIntegers(n, sigma, offset);
        expect(madOf(values)).toBe(sortedMadSigma(values));
      }
    }
  });

  it('handles a half-integer median (even count split between two values) and heavy tails', () => {
    const split = [...Array(600).fill(3), ...Array(600).fill(4)];
    expect(madOf(split)).toBe(sortedMadSigma(split)); // median 3.5, every deviation 0.5
    const withHits = gaussianIntegers(5000, 10, 0);
    for (let i = 0; i < 50; i++) withHits[i * 97] = 60_000 - i; // cosmic-ray sized differences
    expect(madOf(withHits)).toBe(sortedMadSigma(withHits));
  });

  it('falls back to selection for fractional values, a range too wide, NaN-free float data', () => {
    const fractional = Array.from({ length: 3000 }, () => 5 * random.normal());
    expect(madOf(fractional)).toBe(sortedMadSigma(fractional));
    const wide = gaussianIntegers(3000, 10, 0);
    wide[7] = 1e9;
    expect(madOf(wide)).toBe(sortedMadSigma(wide));
  });
});
