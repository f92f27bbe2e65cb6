/**
 * A small seeded random source for the simulator: mulberry32 for uniforms, the polar Box–Muller
 * method for normals, inversion by sequential search for small Poisson means and a rounded
 * normal above. Our own code so that a frame depends only on its seed, never on Math.random.
 * A class with typed-array state rather than closures: several times faster in the per-pixel
 * noise loop (no boxed numbers).
 */

/** Mixes a seed and a stream label into a 32-bit state, so sub-streams do not overlap in practice. */
export function mixSeed(seed: number, stream: number): number {
  // splitmix32-style finaliser: nearby seeds give unrelated states.
  let h = (Math.trunc(seed) ^ Math.imul(stream + 0x9e3779b9, 0x85ebca6b)) >>> 0;
  h = Math.imul(h ^ (h >>> 16), 0x7feb352d) >>> 0;
  h = Math.imul(h ^ (h >>> 15), 0x846ca68b) >>> 0;
  return (h ^ (h >>> 16)) >>> 0;
}

/** Poisson means at or above this use the normal approximation (relative error of the law < 1 %). */
const POISSON_NORMAL_ABOVE = 30;

/** A seeded stream of pseudo-random numbers (mulberry32). */
export class Random {
  // State in typed arrays: V8 then never boxes the 32-bit state or the spare normal.
  private readonly state = new Int32Array(1);
  private readonly spare = new Float64Array(1);
  private hasSpare = false;

  constructor(seed: number) {
    this.state[0] = mixSeed(seed, 0);
  }

  /** Uniform in [0, 1). */
  uniform(): number {
    const t0 = (this.state[0] + 0x6d2b79f5) | 0;
    this.state[0] = t0;
    let t = t0;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  }

  /** Uniform in [lo, hi). */
  between(lo: number, hi: number): number {
    return lo + (hi - lo) * this.uniform();
  }

  /** Integer uniform in [lo, hi] inclusive. */
  integer(lo: number, hi: number): number {
    return lo + Math.floor(this.uniform() * (hi - lo + 1));
  }

  /** One element of `items`, uniformly. */
  pick<T>(items: readonly T[]): T {
    return items[Math.floor(this.uniform() * items.length)];
  }

  /** Standard normal N(0, 1). */
  normal(): number {
    if (this.hasSpare) {
      this.hasSpare = false;
      return this.spare[0];
    }
    // Marsaglia's polar form: no trigonometry, one logarithm per two normals.
    let u: number;
    let v: number;
    let r2: number;
    do {
      u = 2 * this.uniform() - 1;
      v = 2 * this.uniform() - 1;
      r2 = u * u + v * v;
    } while (r2 >= 1 || r2 === 0);
    const scale = Math.sqrt((-2 * Math.log(r2)) / r2);
    this.spare[0] = v * scale;
    this.hasSpare = true;
    return u * scale;
  }

  /** Poisson-distributed count with mean `mean` (≤ 0 gives 0). */
  poisson(mean: number): number {
    if (!(mean > 0)) return 0;
    if (mean >= POISSON_NORMAL_ABOVE) return Math.max(0, Math.round(mean + Math.sqrt(mean) * this.normal()));
    // Inversion by sequential search: one uniform and ~mean steps (same law as Knuth's product method).
    const u = this.uniform();
    let count = 0;
    let term = Math.exp(-mean);
    let cumulative = term;
    while (u > cumulative && count < 1000) {
      count += 1;
      term *= mean / count;
      cumulative += term;
    }
    return count;
  }
}

/** A new stream seeded with `seed` (any number; reduced to 32 bits). */
export function createRandom(seed: number): Random {
  return new Random(seed);
}
