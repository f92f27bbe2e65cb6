import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { setWasmKernels } from '../../../shared/engine/reduce/kernels/band-groups.ts';
import { reduceFrame, type ReduceOptions } from '../../../shared/engine/reduce.ts';
import type { Frame, Lineout } from '../../../shared/engine/types.ts';
import { reduceFrameStraightforward } from './support/straightforward/reduce-frame.ts';
import { normal, rng, syntheticFrame, type SyntheticFrameSpec } from './support/synthetic.ts';

// The engine reduces row by row, reading the frame in place, with a cheap first screen for
// outliers; the straightforward version (support/straightforward/) copies every band into a
// strip, copies it again for rejection and sums afterwards. Both must give the same lineout,
// bit for bit, on random frames with every kind of damage. Invented data throughout.

const spec: SyntheticFrameSpec = {
  spectralLength: 300,
  spatialLength: 120,
  spectralAxis: 'x',
  spatialCentre: 60,
  lines: [
    { pixel: 40.2, sigmaPx: 1.2, photons: 60000, spatialSigmaPx: 8 },
    { pixel: 150.7, sigmaPx: 1.5, photons: 30000, spatialSigmaPx: 6 },
    { pixel: 151.9, sigmaPx: 0.5, photons: 9000, spatialSigmaPx: 9 },
    { pixel: 255.4, sigmaPx: 2.0, photons: 12000, spatialSigmaPx: 7 },
  ],
  backgroundPhotonsPerPixel: 6,
  biasCounts: 100,
  readNoiseCounts: 4,
  fullScale: 4000,
  seed: 5,
};

/** Hot pixels, cosmic tracks, NaN pixels and a few saturated pixels, scattered at random. */
function damage(frame: Frame, seed: number, hits: number): Frame {
  const data = frame.data.slice();
  const random = rng(seed);
  for (let k = 0; k < hits; k++) {
    const i = Math.floor(random() * data.length);
    const kind = random();
    if (kind < 0.5) data[i] += 200 + 3000 * random();
    else if (kind < 0.8) data[i] = Number.NaN;
    else data[i] = 4000;
  }
  // A cosmic track two pixels wide along the spectral axis.
  const row = 55 * frame.width;
  for (let p = 90; p < 110; p++) data[row + p] += 800;
  return { ...frame, data };
}

function darkFrame(frame: Frame, seed: number): Frame {
  const random = rng(seed);
  const gauss = normal(random);
  const data = new Float32Array(frame.data.length);
  for (let i = 0; i < data.length; i++) data[i] = 95 + 3 * gauss() + (random() < 0.002 ? Number.NaN : 0);
  return { ...frame, data };
}

function expectSameLineout(fast: Lineout, plain: Lineout): void {
  expect(fast.signal).toEqual(plain.signal);
  expect(fast.background).toEqual(plain.background);
  expect(fast.rejectedPixels).toBe(plain.rejectedPixels);
  expect(fast.noiseFloorCounts).toBe(plain.noiseFloorCounts);
  expect(fast.bandRows).toBe(plain.bandRows);
  expect(fast.bandBinRows).toBe(plain.bandBinRows);
  expect(Array.from(fast.counts)).toEqual(Array.from(plain.counts));
  expect(Array.from(fast.variance)).toEqual(Array.from(plain.variance));
  expect(Array.from(fast.saturated)).toEqual(Array.from(plain.saturated));
  expect(Array.from(fast.band)).toEqual(Array.from(plain.band));
}

const explicitBands = { signal: { start: 40, end: 81 }, background: [{ start: 0, end: 30 }, { start: 92, end: 120 }] };

// Both kinds of four-row group kernel: WebAssembly SIMD where the runtime has it (Node, current
// browsers), and the JavaScript ones it falls back to.
describe.each([
  ['the WebAssembly kernel', true],
  ['the JavaScript kernel', false],
])('reduceFrame with %s: the streaming path equals the straightforward one', (_kernel, wasm) => {
  beforeAll(() => setWasmKernels(wasm));
  afterAll(() => setWasmKernels(true));

  it.each<[string, Partial<ReduceOptions>, { dark?: boolean; tilt?: boolean; axis?: 'x' | 'y' }]>([
    ['automatic bands', {}, {}],
    ['explicit bands', explicitBands, {}],
    ['bands touching the frame edges', { signal: { start: 0, end: 70 }, background: [{ start: 110, end: 120 }] }, {}],
    ['a dark frame', explicitBands, { dark: true }],
    ['tilt and curvature', { ...explicitBands, lineShape: { tiltPxPerPx: 0.07, curvaturePxPerPx2: -0.002 } }, { tilt: true }],
    ['spectral axis y', {}, { axis: 'y' }],
    ['spectral axis y with a dark frame and tilt', { ...explicitBands, lineShape: { tiltPxPerPx: -0.05, curvaturePxPerPx2: 0.001 } }, { axis: 'y', dark: true }],
    ['rejection off', { ...explicitBands, rejectOutliers: false }, {}],
    ['rejection off with a dark frame', { ...explicitBands, rejectOutliers: false }, { dark: true }],
    ['rejection off, automatic bands, spectral axis y', { rejectOutliers: false }, { axis: 'y' }],
    ['given read noise and gain', { ...explicitBands, readNoiseCounts: 4, gainCountsPerPhoton: 1.7, backgroundSmoothPx: 5 }, { dark: true }],
    ['a low rejection threshold', { ...explicitBands, outlierSigma: 2 }, {}],
  ])('%s', (_name, options, how) => {
    for (const seed of [1, 2, 3]) {
      const axis = how.axis ?? 'x';
      // Fewer hits when the bands are found automatically: many hits drown the spatial profile.
      const hits = options.signal ? 400 : 60;
      const frame = damage(syntheticFrame({ ...spec, spectralAxis: axis, seed, tiltPxPerPx: how.tilt ? 0.07 : 0 }), 100 + seed, hits);
      const dark = how.dark ? darkFrame(frame, 200 + seed) : undefined;
      const full: ReduceOptions = { spectralAxis: axis, dark, saturationLevel: 1000, ...options };
      expectSameLineout(reduceFrame(frame, full), reduceFrameStraightforward(frame, full));
    }
  });

  // A band of ≥ 256 rows is kept in bins of 4 rows: every path must fill the bins alike.
  const tall: SyntheticFrameSpec = {
    ...spec,
    spatialLength: 640,
    spatialCentre: 300,
    lines: spec.lines.map((line) => ({ ...line, photons: line.photons * 6, spatialSigmaPx: line.spatialSigmaPx * 8 })),
  };
  const tallBands = { signal: { start: 101, end: 406 }, background: [{ start: 0, end: 60 }, { start: 470, end: 640 }] };
  it.each<[string, Partial<ReduceOptions>, { dark?: boolean; tilt?: boolean; axis?: 'x' | 'y' }]>([
    ['a tall band', tallBands, {}],
    ['a tall band from the frame edge, with a dark frame', { signal: { start: 0, end: 330 }, background: [{ start: 500, end: 640 }] }, { dark: true }],
    ['a tall band with tilt and curvature', { ...tallBands, lineShape: { tiltPxPerPx: 0.01, curvaturePxPerPx2: -0.0001 } }, { tilt: true }],
    ['a tall band without rejection', { ...tallBands, rejectOutliers: false }, { dark: true }],
    ['a tall band without rejection or a dark frame', { ...tallBands, rejectOutliers: false }, {}],
    ['a tall band found automatically, spectral axis y', {}, { axis: 'y' }],
  ])('%s', (_name, options, how) => {
    for (const seed of [1, 2]) {
      const axis = how.axis ?? 'x';
      const hits = options.signal ? 2000 : 200;
      const frame = damage(syntheticFrame({ ...tall, spectralAxis: axis, seed, tiltPxPerPx: how.tilt ? 0.01 : 0 }), 300 + seed, hits);
      const dark = how.dark ? darkFrame(frame, 400 + seed) : undefined;
      const full: ReduceOptions = { spectralAxis: axis, dark, saturationLevel: 1000, ...options };
      const fast = reduceFrame(frame, full);
      expect(fast.bandBinRows).toBe(4);
      expectSameLineout(fast, reduceFrameStraightforward(frame, full));
    }
  });

  it('rejects the planted outliers (the comparison is not between two no-ops)', () => {
    const frame = damage(syntheticFrame(spec), 101, 400);
    const lineout = reduceFrame(frame, { spectralAxis: 'x', saturationLevel: 1000, ...explicitBands });
    expect(lineout.rejectedPixels).toBeGreaterThan(50);
    expect(lineout.saturated.some((v) => v === 1)).toBe(true);
  });
});
