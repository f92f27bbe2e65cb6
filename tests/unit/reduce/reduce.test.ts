import { describe, expect, it } from 'vitest';
import { reduceFrame } from '../../../shared/engine/reduce.ts';
import { findPeaks } from '../../../shared/engine/peaks.ts';
import type { Frame } from '../../../shared/engine/types.ts';
import { type SyntheticFrameSpec, expectedPhotons, normal, rng, syntheticFrame } from './support/synthetic.ts';

// All frames here are invented: Gaussian lines at known positions, seeded noise.
const baseSpec: SyntheticFrameSpec = {
  spectralLength: 256,
  spatialLength: 96,
  spectralAxis: 'x',
  spatialCentre: 48,
  lines: [
    { pixel: 60.3, sigmaPx: 1.4, photons: 40000, spatialSigmaPx: 5 },
    { pixel: 131.75, sigmaPx: 1.6, photons: 25000, spatialSigmaPx: 4 },
    { pixel: 200.1, sigmaPx: 1.3, photons: 15000, spatialSigmaPx: 6 },
  ],
  backgroundPhotonsPerPixel: 4,
  biasCounts: 100,
  readNoiseCounts: 3,
  seed: 11,
};
const signal = { start: 30, end: 67 };
const background = [
  { start: 2, end: 22 },
  { start: 75, end: 94 },
];

/** Independent reference: plain Float64 loops over (frame − dark), mean of background rows per column. */
function referenceLineout(frame: Frame, dark: Frame | null): Float64Array {
  const out = new Float64Array(frame.width);
  const at = (r: number, c: number) => frame.data[r * frame.width + c] - (dark ? dark.data[r * frame.width + c] : 0);
  for (let c = 0; c < frame.width; c++) {
    let bg = 0;
    let n = 0;
    for (const b of background) for (let r = b.start; r < b.end; r++, n++) bg += at(r, c);
    bg /= n;
    for (let r = signal.start; r < signal.end; r++) out[c] += at(r, c) - bg;
  }
  return out;
}

describe('reduceFrame: dark subtraction, axes and sums', () => {
  it('subtracts the dark exactly (against a direct Float64 computation)', () => {
    const frame = syntheticFrame(baseSpec);
    // A structured dark (column pattern + hot columns), added to the frame pixel by pixel.
    const darkData = new Float32Array(frame.data.length);
    const gauss = normal(rng(5));
    for (let i = 0; i < darkData.length; i++) darkData[i] = 50 + 10 * Math.sin(i % 256) + 2 * gauss();
    const dark: Frame = { ...frame, data: darkData };
    const withDark: Frame = { ...frame, data: frame.data.map((v, i) => v + darkData[i]) };
    const before = withDark.data.slice();
    const options = { spectralAxis: 'x' as const, signal, background, rejectOutliers: false };
    const lineout = reduceFrame(withDark, { ...options, dark });
    const ref = referenceLineout(withDark, dark);
    for (let c = 0; c < frame.width; c++) expect(Math.abs(lineout.counts[c] - ref[c])).toBeLessThan(1e-2);
    // And the dark-subtracted frame reduces to the same lineout as the dark-free one (float32 rounding only).
    const plain = reduceFrame(frame, options);
    for (let c = 0; c < frame.width; c++) expect(Math.abs(lineout.counts[c] - plain.counts[c])).toBeLessThan(0.05);
    expect(Array.from(withDark.data)).toEqual(Array.from(before)); // inputs are not mutated
  });

  it('gives the same lineout for spectralAxis y on the transposed frame', () => {
    const fx = syntheticFrame(baseSpec);
    const fy = syntheticFrame({ ...baseSpec, spectralAxis: 'y' });
    expect(fy.width).toBe(fx.height);
    const a = reduceFrame(fx, { spectralAxis: 'x', signal, background });
    const b = reduceFrame(fy, { spectralAxis: 'y', signal, background });
    expect(Array.from(b.counts)).toEqual(Array.from(a.counts));
    expect(Array.from(b.variance)).toEqual(Array.from(a.variance));
  });

  it('finds the signal band and background bands automatically', () => {
    const lineout = reduceFrame(syntheticFrame(baseSpec), { spectralAxis: 'x' });
    // Lines are centred on row 48 with spatial sigma 4-6 rows: the band must hold ±2 sigma of the widest.
    expect(lineout.signal.start).toBeLessThanOrEqual(48 - 12);
    expect(lineout.signal.end).toBeGreaterThanOrEqual(48 + 12);
    expect(lineout.background.length).toBeGreaterThan(0);
    for (const b of lineout.background) expect(b.end <= lineout.signal.start || b.start >= lineout.signal.end).toBe(true);
    // Background-subtracted: the line-free stretch sits at zero within its noise.
    let mean = 0;
    for (let c = 90; c < 110; c++) mean += lineout.counts[c] / 20;
    expect(Math.abs(mean)).toBeLessThan(4 * Math.sqrt(lineout.variance[100] / 20));
    expect(lineout.band.length).toBe(lineout.bandRows * 256);
  });
});

describe('reduceFrame: outlier rejection', () => {
  it('removes cosmic hits and hot pixels while bright narrow lines survive untouched', () => {
    const clean = syntheticFrame(baseSpec);
    const hit = { ...clean, data: clean.data.slice() };
    const random = rng(99);
    const positions: number[] = [];
    const taken: [number, number][] = [];
    for (let k = 0; k < 40; k++) {
      const r = signal.start + Math.floor(random() * (signal.end - signal.start));
      const c = 5 + Math.floor(random() * 245);
      // Hits are 1-2 pixels: keep them apart, two touching hits would make a 3-pixel track,
      // which the rejection is not meant to remove.
      if (taken.some(([tr, tc]) => Math.abs(tr - r) <= 3 && Math.abs(tc - c) <= 3)) {
        k--;
        continue;
      }
      taken.push([r, c]);
      const i = r * 256 + c;
      hit.data[i] += 3000 + 5000 * random();
      positions.push(i);
      // Every other hit is a 2-pixel track (along the spectral or the spatial axis).
      if (k % 4 === 1) hit.data[i + 1] += 4000;
      if (k % 4 === 3) hit.data[i + 256] += 4000;
    }
    const options = { spectralAxis: 'x' as const, signal, background };
    const ref = reduceFrame(clean, options);
    const out = reduceFrame(hit, options);
    // Lines survive: nothing is rejected in the clean frame (6-sigma threshold, lines 5+ rows tall).
    expect(ref.rejectedPixels).toBe(0);
    // 60 hit pixels; a hit on a line brighter than the hit itself is kept by design (the
    // relative test protects real structure), so a few may stay.
    expect(out.rejectedPixels).toBeGreaterThanOrEqual(54);
    expect(out.rejectedPixels).toBeLessThanOrEqual(70);
    // Without rejection the hits wreck the lineout; with it, what is left is within the noise.
    const raw = reduceFrame(hit, { ...options, rejectOutliers: false });
    let worstRaw = 0;
    let worst = 0;
    for (let c = 0; c < 256; c++) {
      const s = Math.sqrt(ref.variance[c]);
      worstRaw = Math.max(worstRaw, Math.abs(raw.counts[c] - ref.counts[c]) / s);
      worst = Math.max(worst, Math.abs(out.counts[c] - ref.counts[c]) / s);
    }
    expect(worstRaw).toBeGreaterThan(20);
    expect(worst).toBeLessThan(3);
  });

  it('keeps a line only 1.2 px FWHM wide spectrally when it is extended spatially', () => {
    const spec = { ...baseSpec, lines: [{ pixel: 100.2, sigmaPx: 0.5, photons: 200000, spatialSigmaPx: 4 }] };
    const frame = syntheticFrame(spec);
    const lineout = reduceFrame(frame, { spectralAxis: 'x', signal, background });
    expect(lineout.rejectedPixels).toBe(0);
    let area = 0;
    for (let c = 95; c <= 105; c++) area += lineout.counts[c];
    // Expected photons inside the band (gain 1): sum of the noiseless model over band rows.
    const model = expectedPhotons(spec);
    let truth = 0;
    for (let r = signal.start; r < signal.end; r++) for (let c = 95; c <= 105; c++) truth += model[r * 256 + c];
    expect(Math.abs(area - truth)).toBeLessThan(4 * Math.sqrt(truth + 11 * 40 * 25));
  });

  it('replaces NaN pixels and counts them', () => {
    const frame = syntheticFrame(baseSpec);
    const data = frame.data.slice();
    for (const i of [40 * 256 + 60, 41 * 256 + 61, 50 * 256 + 10, 5 * 256 + 7]) data[i] = Number.NaN;
    const lineout = reduceFrame({ ...frame, data }, { spectralAxis: 'x', signal, background });
    expect(lineout.rejectedPixels).toBe(4);
    expect(lineout.counts.every(Number.isFinite)).toBe(true);
    const ref = reduceFrame(frame, { spectralAxis: 'x', signal, background });
    expect(Math.abs(lineout.counts[60] - ref.counts[60])).toBeLessThan(4 * Math.sqrt(ref.variance[60]));
  });
});

describe('reduceFrame: saturation and variance', () => {
  it('flags the spectral pixels of a saturated line only', () => {
    const spec = { ...baseSpec, fullScale: 700, biasCounts: 0 };
    const frame = syntheticFrame(spec);
    const lineout = reduceFrame(frame, { spectralAxis: 'x', signal, background });
    // The 40000-photon line peaks near 900 counts per pixel, the 15000-photon one near 300 (model below).
    const model = expectedPhotons(spec);
    for (let c = 0; c < 256; c++) {
      let peak = 0;
      for (let r = signal.start; r < signal.end; r++) peak = Math.max(peak, model[r * 256 + c] + 4);
      // Clear of the 700-count level by more than 4 noise sigmas either way.
      if (peak > 820) expect(lineout.saturated[c]).toBe(1);
      if (peak < 580) expect(lineout.saturated[c]).toBe(0);
    }
    expect(lineout.saturated.reduce((a, b) => a + b, 0)).toBeGreaterThan(0);
    const peaks = findPeaks(lineout);
    expect(peaks.find((p) => Math.abs(p.pixel - 60.3) < 1)?.saturated).toBe(true);
    expect(peaks.find((p) => Math.abs(p.pixel - 200.1) < 1)?.saturated).toBe(false);
  });

  it.each([
    { name: 'measured noise floor, biased frame, gain 1', gain: 1, bias: 100, readNoise: undefined as number | undefined },
    { name: 'given read noise, bias-free frame, gain 2.5', gain: 2.5, bias: 0, readNoise: 3 },
  ])('reports a variance that matches the scatter over 300 realisations ($name)', ({ gain, bias, readNoise }) => {
    // Common practice: var(counts) = g·counts + readNoise² per pixel for a gain of g counts/photon.
    const spec: SyntheticFrameSpec = { ...baseSpec, spectralLength: 128, lines: [{ pixel: 60.3, sigmaPx: 1.5, photons: 8000, spatialSigmaPx: 5 }], gain, biasCounts: bias, readNoiseCounts: 3 };
    const photons = expectedPhotons(spec);
    const N = 300;
    const sum = new Float64Array(128);
    const sum2 = new Float64Array(128);
    const reported = new Float64Array(128);
    for (let k = 0; k < N; k++) {
      const lineout = reduceFrame(syntheticFrame({ ...spec, seed: 1000 + k }, photons), {
        spectralAxis: 'x',
        signal,
        background,
        gainCountsPerPhoton: gain,
        readNoiseCounts: readNoise,
      });
      for (let c = 0; c < 128; c++) {
        sum[c] += lineout.counts[c];
        sum2[c] += lineout.counts[c] ** 2;
        reported[c] += lineout.variance[c] / N;
      }
    }
    const empirical = (c: number) => (sum2[c] - (sum[c] * sum[c]) / N) / (N - 1);
    // Line pixels (shot-noise dominated) and line-free pixels (floor dominated), averaged over a few
    // pixels each; a variance from 300 samples scatters by √(2/299) ≈ 8 % per pixel.
    const ratio = (cols: number[]) => cols.reduce((a, c) => a + empirical(c), 0) / cols.reduce((a, c) => a + reported[c], 0);
    expect(Math.abs(ratio([58, 59, 60, 61, 62]) - 1)).toBeLessThan(0.08);
    expect(Math.abs(ratio([10, 20, 30, 90, 100, 110, 120]) - 1)).toBeLessThan(0.08);
  });
});
