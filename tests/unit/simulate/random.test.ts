// The simulator's random source against the textbook laws (common practice): N(0,1) moments,
// Poisson mean = variance = λ, and a χ² goodness-of-fit against the Poisson pmf e^−λ λ^k / k!.
import { describe, expect, it } from 'vitest';
import { createRandom, mixSeed } from '../../../shared/engine/simulate/index.ts';
import { meanVariance } from './helpers.ts';

const N = 200_000;

describe('Random', () => {
  it('repeats from a seed and differs between seeds', () => {
    const a = createRandom(3);
    const b = createRandom(3);
    const c = createRandom(4);
    const xs = Array.from({ length: 5 }, () => a.uniform());
    expect(Array.from({ length: 5 }, () => b.uniform())).toEqual(xs);
    expect(Array.from({ length: 5 }, () => c.uniform())).not.toEqual(xs);
    expect(mixSeed(1, 1)).not.toBe(mixSeed(1, 2));
  });

  it('normal() has mean 0, variance 1 and ~4.55 % beyond 2σ', () => {
    const r = createRandom(11);
    const xs = Float64Array.from({ length: N }, () => r.normal());
    const { mean, variance } = meanVariance(xs);
    expect(Math.abs(mean)).toBeLessThan(4 / Math.sqrt(N));
    expect(Math.abs(variance - 1)).toBeLessThan(0.015);
    const tail = xs.filter((x) => Math.abs(x) > 2).length / N;
    // P(|Z| > 2) = 0.0455 (standard normal table).
    expect(Math.abs(tail - 0.0455)).toBeLessThan(0.002);
  });

  it.each([0.3, 3, 12, 29, 80, 1e4])('poisson(%d) has mean = variance = λ', (lambda) => {
    const r = createRandom(5);
    const xs = Float64Array.from({ length: N }, () => r.poisson(lambda));
    const { mean, variance } = meanVariance(xs);
    expect(Math.abs(mean / lambda - 1)).toBeLessThan(5 / Math.sqrt(N * lambda));
    expect(Math.abs(variance / lambda - 1)).toBeLessThan(0.02);
    expect(xs.every((x) => Number.isInteger(x) && x >= 0)).toBe(true);
  });

  it('poisson(3) passes a χ² test against the Poisson pmf', () => {
    const r = createRandom(8);
    const counts = new Array<number>(12).fill(0);
    for (let i = 0; i < N; i += 1) counts[Math.min(11, r.poisson(3))] += 1;
    let pmf = Math.exp(-3);
    let chi2 = 0;
    let rest = 1;
    for (let k = 0; k < 11; k += 1) {
      if (k > 0) pmf *= 3 / k;
      chi2 += (counts[k] - N * pmf) ** 2 / (N * pmf);
      rest -= pmf;
    }
    chi2 += (counts[11] - N * rest) ** 2 / (N * rest);
    // 11 degrees of freedom: the 99.9 % point of χ² is 31.3 (standard table).
    expect(chi2).toBeLessThan(31.3);
  });
});
