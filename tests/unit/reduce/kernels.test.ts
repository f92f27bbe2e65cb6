import { readFileSync } from 'node:fs';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { assembleWat } from '../../../scripts/lib/assemble-wat.ts';
import { wasmBase64 } from '../../../shared/engine/reduce/kernels/band-groups-wasm.ts';
import { bandGroupKernels, setWasmKernels } from '../../../shared/engine/reduce/kernels/band-groups.ts';
import { reduceFrame, type ReduceOptions } from '../../../shared/engine/reduce.ts';
import type { Frame, Lineout } from '../../../shared/engine/types.ts';
import { rng } from './support/synthetic.ts';

// The WebAssembly SIMD kernels of the four-row groups (with and without the outlier screen)
// against the JavaScript kernels they replace: the same sums bit for bit (IEEE 754 double
// arithmetic in the same order in both; the WebAssembly core specification defines its f64 and
// f64x2 operations as the IEEE 754 ones).
// Invented data throughout.

const KERNEL_DIR = path.resolve(import.meta.dirname, '../../../shared/engine/reduce/kernels');

afterAll(() => setWasmKernels(true));

/**
 * A frame of camera-like counts with NaN, ±Infinity, saturated and hot pixels scattered in: integers
 * for odd seeds, fractional values (a flat-fielded float frame) for even ones, where the order of
 * the additions shows in the last bits.
 */
function damagedFrame(width: number, height: number, seed: number, fullScale: number): Frame {
  const random = rng(seed);
  const data = new Float32Array(width * height);
  for (let i = 0; i < data.length; i++) {
    const line = 3000 * Math.exp(-0.5 * (((i % width) - width / 3) / 2.5) ** 2);
    const value = 100 + 20 * random() + line * random();
    data[i] = seed % 2 === 1 ? Math.round(value) : value;
    const kind = random();
    if (kind < 0.002) data[i] = Number.NaN;
    else if (kind < 0.0025) data[i] = Number.POSITIVE_INFINITY;
    else if (kind < 0.003) data[i] = Number.NEGATIVE_INFINITY;
    else if (kind < 0.006) data[i] = fullScale;
    else if (kind < 0.012) data[i] += 300 + 600 * random(); // hot pixels and cosmic hits
  }
  return { width, height, data, bitsPerSample: -32, sampleFormat: 'float', fullScale, format: 'tiff', pageCount: 1, page: 0 };
}

function bitsOf(values: ArrayLike<number>): string[] {
  return Array.from(values, (v) => (Object.is(v, -0) ? '-0' : String(v)));
}

function expectIdentical(a: Lineout, b: Lineout): void {
  expect(bitsOf(a.counts)).toEqual(bitsOf(b.counts));
  expect(bitsOf(a.variance)).toEqual(bitsOf(b.variance));
  expect(Array.from(a.saturated)).toEqual(Array.from(b.saturated));
  expect(bitsOf(a.band)).toEqual(bitsOf(b.band));
  expect(a.rejectedPixels).toBe(b.rejectedPixels);
}

function reduceBoth(frame: Frame, options: ReduceOptions): [Lineout, Lineout] {
  setWasmKernels(true);
  const wasm = reduceFrame(frame, options);
  setWasmKernels(false);
  const js = reduceFrame(frame, options);
  setWasmKernels(true);
  return [wasm, js];
}

describe('the WebAssembly band kernels', () => {
  it('is the assembly of its text source (run `npm run build:kernels` after editing the .wat)', async () => {
    const source = readFileSync(path.join(KERNEL_DIR, 'band-groups.wat'), 'utf8');
    const assembled = await assembleWat('band-groups.wat', source);
    expect(Buffer.from(assembled).toString('base64')).toBe(wasmBase64);
  });

  it('runs in this runtime (so the comparisons below compare two kernels)', () => {
    setWasmKernels(true);
    expect(bandGroupKernels(17)).toBeDefined();
    setWasmKernels(false);
    expect(bandGroupKernels(17)).toBeUndefined();
    setWasmKernels(true);
  });

  it.each([
    ['an even spectral length, a tall binned band', 512, 700, { signal: { start: 150, end: 550 }, background: [{ start: 0, end: 100 }] }],
    ['an odd spectral length, rows left over after the groups', 257, 300, { signal: { start: 101, end: 199 }, background: [{ start: 0, end: 60 }, { start: 240, end: 300 }] }],
    ['a one-pixel spectrum', 1, 400, { signal: { start: 100, end: 390 }, background: [{ start: 0, end: 50 }] }],
  ])('gives the JavaScript kernel\'s sums bit for bit: %s', (_name, width, height, bands) => {
    for (const [seed, rejectOutliers] of [[1, false], [2, false], [3, true], [4, true], [5, false], [6, true]] as const) {
      const frame = damagedFrame(width, height, seed, 3000);
      const options: ReduceOptions = { spectralAxis: 'x', rejectOutliers, saturationLevel: 2900, ...bands };
      const [wasm, js] = reduceBoth(frame, options);
      expectIdentical(wasm, js);
      // The frames do reach the cases the kernels treat apart.
      expect(js.saturated.some((v) => v === 1)).toBe(true);
      if (rejectOutliers && width > 1) expect(js.rejectedPixels).toBeGreaterThan(0);
    }
  });

  it('gives the same sums with a dark frame and a spectral axis along y', () => {
    const frame = damagedFrame(300, 520, 8, 3000);
    const dark = { ...damagedFrame(300, 520, 9, 3000), data: new Float32Array(300 * 520).map((_, i) => 90.25 + (i % 7)) };
    for (const rejectOutliers of [false, true]) {
      const options: ReduceOptions = { spectralAxis: 'y', rejectOutliers, dark, saturationLevel: 2900, signal: { start: 100, end: 200 }, background: [{ start: 0, end: 60 }] };
      const [wasm, js] = reduceBoth(frame, options);
      expectIdentical(wasm, js);
      const [wasmX, jsX] = reduceBoth(frame, { ...options, spectralAxis: 'x', signal: { start: 150, end: 450 }, background: [{ start: 0, end: 100 }] });
      expectIdentical(wasmX, jsX);
    }
  });

  it.each([false, true])('keeps no state between frames of different lengths (rejection %s)', (rejectOutliers) => {
    const small = damagedFrame(64, 300, 11, 3000);
    const large = damagedFrame(1000, 300, 12, 3000);
    const options: ReduceOptions = { spectralAxis: 'x', rejectOutliers, signal: { start: 100, end: 200 }, background: [{ start: 0, end: 80 }] };
    setWasmKernels(false);
    const expected = [reduceFrame(small, options), reduceFrame(large, options), reduceFrame(small, options)];
    setWasmKernels(true);
    const got = [reduceFrame(small, options), reduceFrame(large, options), reduceFrame(small, options)];
    got.forEach((lineout, i) => expectIdentical(lineout, expected[i]));
    // A result is the caller's own: a later reduction does not overwrite it.
    const before = bitsOf(got[0].counts);
    reduceFrame(large, options);
    expect(bitsOf(got[0].counts)).toEqual(before);
  });
});
