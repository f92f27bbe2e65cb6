import { describe, expect, it } from 'vitest';
import { estimateLineShape, reduceFrame } from '../../../shared/engine/reduce.ts';
import { EngineError } from '../../../shared/engine/errors.ts';
import type { Frame } from '../../../shared/engine/types.ts';
import { normal, rng } from './support/synthetic.ts';

// Invented frames for the error paths: flat noise, NaN, saturated.
function frameOf(width: number, height: number, fill: (i: number) => number, fullScale = 65535): Frame {
  const data = new Float32Array(width * height);
  for (let i = 0; i < data.length; i++) data[i] = fill(i);
  return { width, height, data, bitsPerSample: 16, sampleFormat: 'uint', fullScale, format: 'tiff', pageCount: 1, page: 0 };
}

function caught(fn: () => unknown): EngineError {
  try {
    fn();
  } catch (e) {
    if (e instanceof EngineError) return e;
    throw e;
  }
  throw new Error('expected an EngineError');
}

const gauss = normal(rng(7));
const noise = frameOf(64, 48, () => 100 + 3 * gauss());

describe('reduceFrame errors', () => {
  it('names both sizes when the dark does not match', () => {
    const dark = frameOf(32, 48, () => 0);
    const e = caught(() => reduceFrame(noise, { spectralAxis: 'x', dark }));
    expect(e.code).toBe('invalid_input');
    expect(e.message).toBe('The dark frame is 32x48 but the frame is 64x48; they must be the same size.');
  });

  it('refuses an all-NaN frame', () => {
    const e = caught(() => reduceFrame(frameOf(64, 48, () => Number.NaN), { spectralAxis: 'x' }));
    expect(e.code).toBe('invalid_input');
    expect(e.message).toBe('Every pixel of the 64x48 frame is NaN; there is nothing to reduce.');
  });

  it('refuses an all-saturated frame', () => {
    const e = caught(() => reduceFrame(frameOf(64, 48, () => 4095, 4095), { spectralAxis: 'y' }));
    expect(e.code).toBe('invalid_input');
    expect(e.message).toBe('Every pixel of the 64x48 frame is at or above the saturation level 4095; the exposure is unusable.');
  });

  it('reports no_signal for a frame of pure noise', () => {
    const e = caught(() => reduceFrame(noise, { spectralAxis: 'x' }));
    expect(e.code).toBe('no_signal');
    expect(e.message).toMatch(/^No signal band found: the brightest spatial row stands .* counts above the median, against a profile noise of .* counts \(needs 6 sigma\)\. Mark the signal band by hand or check the exposure\.$/);
  });

  it('checks bands and options', () => {
    expect(caught(() => reduceFrame(noise, { spectralAxis: 'x', signal: { start: 40, end: 60 } })).message).toBe(
      'The signal band 40..60 must lie inside the spatial axis 0..48 and hold at least one row.',
    );
    expect(
      caught(() => reduceFrame(noise, { spectralAxis: 'x', signal: { start: 10, end: 20 }, background: [{ start: 18, end: 30 }] })).message,
    ).toBe('The background band 18..30 overlaps the signal band 10..20.');
    expect(caught(() => reduceFrame(noise, { spectralAxis: 'z' as 'x' })).message).toBe("spectralAxis must be 'x' or 'y', got z.");
    expect(caught(() => reduceFrame(noise, { spectralAxis: 'x', gainCountsPerPhoton: 0 })).message).toBe(
      'gainCountsPerPhoton must be a positive number, got 0.',
    );
    expect(caught(() => reduceFrame(noise, { spectralAxis: 'x', backgroundSmoothPx: 4 })).message).toBe(
      'backgroundSmoothPx must be an odd positive integer, got 4.',
    );
    const short = { ...noise, data: new Float32Array(10) };
    expect(caught(() => reduceFrame(short, { spectralAxis: 'x' })).message).toBe('The frame holds 10 pixels, but 64x48 needs 3072.');
  });

  it('estimateLineShape reports no_peaks when the band holds no line', () => {
    const e = caught(() => estimateLineShape(noise, { spectralAxis: 'x', signal: { start: 10, end: 30 } }));
    expect(e.code).toBe('no_peaks');
    expect(e.message).toBe('No unsaturated line is bright enough to measure the line tilt; give the line shape by hand.');
  });
});
