/**
 * Synthetic frames and lineouts for the reduce and peaks tests, built from known parameters with
 * a seeded PRNG. Invented data: no real instrument stands behind these numbers.
 */
import type { Frame, Lineout } from '../../../../shared/engine/types.ts';

/** mulberry32: a small seeded 32-bit PRNG (public-domain algorithm by Tommy Ettinger, from memory). */
export function rng(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** Standard normal deviates by Box–Muller (common practice). */
export function normal(random: () => number): () => number {
  let spare: number | null = null;
  return () => {
    if (spare !== null) {
      const s = spare;
      spare = null;
      return s;
    }
    let u = 0;
    while (u === 0) u = random();
    const v = random();
    const r = Math.sqrt(-2 * Math.log(u));
    spare = r * Math.sin(2 * Math.PI * v);
    return r * Math.cos(2 * Math.PI * v);
  };
}

/** Poisson deviates: Knuth's product method below 40, a rounded normal above (common practice). */
export function poisson(random: () => number, gauss: () => number): (mean: number) => number {
  return (mean) => {
    if (mean <= 0) return 0;
    if (mean < 40) {
      const limit = Math.exp(-mean);
      let k = 0;
      let p = random();
      while (p > limit) {
        k++;
        p *= random();
      }
      return k;
    }
    return Math.max(0, Math.round(mean + Math.sqrt(mean) * gauss()));
  };
}

/** erf by Abramowitz & Stegun 7.1.26 (|error| < 1.5e-7), from memory. */
export function erf(x: number): number {
  const sign = x < 0 ? -1 : 1;
  const t = 1 / (1 + 0.3275911 * Math.abs(x));
  const y =
    1 - ((((1.061405429 * t - 1.453152027) * t + 1.421413741) * t - 0.284496736) * t + 0.254829592) * t * Math.exp(-x * x);
  return sign * y;
}

/** Fraction of a unit Gaussian (centre, sigma) falling in pixel p (from p − 0.5 to p + 0.5). */
export function pixelFraction(p: number, centre: number, sigma: number): number {
  const k = 1 / (Math.SQRT2 * sigma);
  return 0.5 * (erf((p + 0.5 - centre) * k) - erf((p - 0.5 - centre) * k));
}

export interface SyntheticLine {
  /** Centre along the spectral axis at the band centre row, pixels. */
  pixel: number;
  sigmaPx: number;
  /** Total photons in the line. */
  photons: number;
  /** Spatial RMS width, rows. */
  spatialSigmaPx: number;
}

export interface SyntheticFrameSpec {
  spectralLength: number;
  spatialLength: number;
  spectralAxis: 'x' | 'y';
  /** Spatial centre row of every line (and of the tilt). */
  spatialCentre: number;
  lines: SyntheticLine[];
  backgroundPhotonsPerPixel?: number;
  biasCounts?: number;
  gain?: number;
  readNoiseCounts?: number;
  tiltPxPerPx?: number;
  curvaturePxPerPx2?: number;
  /** Clip values here (saturation). */
  fullScale?: number;
  seed: number;
  /** No noise at all: the expected counts. */
  noiseless?: boolean;
}

/** Expected photons per (spatial s, spectral p) from the lines, before noise. */
export function expectedPhotons(spec: SyntheticFrameSpec): Float64Array {
  const S = spec.spatialLength;
  const L = spec.spectralLength;
  const out = new Float64Array(S * L);
  const tilt = spec.tiltPxPerPx ?? 0;
  const curv = spec.curvaturePxPerPx2 ?? 0;
  for (let s = 0; s < S; s++) {
    const o = s - spec.spatialCentre;
    const shift = tilt * o + curv * o * o;
    for (const line of spec.lines) {
      const spatial = pixelFraction(s, spec.spatialCentre, line.spatialSigmaPx);
      if (spatial < 1e-12) continue;
      const centre = line.pixel + shift;
      const lo = Math.max(0, Math.floor(centre - 8 * line.sigmaPx));
      const hi = Math.min(L - 1, Math.ceil(centre + 8 * line.sigmaPx));
      for (let p = lo; p <= hi; p++) out[s * L + p] += line.photons * spatial * pixelFraction(p, centre, line.sigmaPx);
    }
  }
  return out;
}

/** Builds a frame: counts = gain·Poisson(photons) + bias + readNoise·N(0,1), clipped at fullScale. */
export function syntheticFrame(spec: SyntheticFrameSpec, photons = expectedPhotons(spec)): Frame {
  const S = spec.spatialLength;
  const L = spec.spectralLength;
  const random = rng(spec.seed);
  const gauss = normal(random);
  const pois = poisson(random, gauss);
  const gain = spec.gain ?? 1;
  const bias = spec.biasCounts ?? 0;
  const rn = spec.readNoiseCounts ?? 0;
  const bgPhotons = spec.backgroundPhotonsPerPixel ?? 0;
  const fullScale = spec.fullScale ?? 65535;
  const width = spec.spectralAxis === 'x' ? L : S;
  const height = spec.spectralAxis === 'x' ? S : L;
  const data = new Float32Array(width * height);
  for (let s = 0; s < S; s++) {
    for (let p = 0; p < L; p++) {
      const mean = photons[s * L + p] + bgPhotons;
      const value = spec.noiseless ? gain * mean + bias : gain * pois(mean) + bias + rn * gauss();
      const index = spec.spectralAxis === 'x' ? s * width + p : p * width + s;
      data[index] = Math.min(value, fullScale);
    }
  }
  return { width, height, data, bitsPerSample: 16, sampleFormat: 'uint', fullScale, format: 'tiff', pageCount: 1, page: 0 };
}

/** A lineout built directly (no frame): Gaussian lines plus Gaussian noise of the given variance. */
export function syntheticLineout(
  length: number,
  lines: { pixel: number; sigmaPx: number; area: number }[],
  varianceAt: (expected: number) => number,
  seed: number,
): { lineout: Lineout; expected: Float64Array } {
  const gauss = normal(rng(seed));
  const expected = new Float64Array(length);
  for (const line of lines) {
    for (let p = 0; p < length; p++) expected[p] += line.area * pixelFraction(p, line.pixel, line.sigmaPx);
  }
  const counts = new Float64Array(length);
  const variance = new Float64Array(length);
  for (let p = 0; p < length; p++) {
    variance[p] = varianceAt(expected[p]);
    counts[p] = expected[p] + Math.sqrt(variance[p]) * gauss();
  }
  const lineout: Lineout = {
    counts,
    variance,
    saturated: new Uint8Array(length),
    band: new Float32Array(0),
    bandRows: 0,
    signal: { start: 0, end: 1 },
    background: [],
    lineShape: { tiltPxPerPx: 0, curvaturePxPerPx2: 0 },
    rejectedPixels: 0,
  };
  return { lineout, expected };
}
