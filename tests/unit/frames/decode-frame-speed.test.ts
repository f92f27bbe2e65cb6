import { describe, expect, it } from 'vitest';
import { decodeFrame } from '../../../shared/engine/frames/index.ts';

// Speed of the uncompressed fast path on a 2048 x 2048 uint16 frame. shared/STACK.md measured
// geotiff's readRasters at 145 ms median on such a frame; the goal is < 15 ms. The file is built
// here by a minimal TIFF 6.0 writer (one strip, baseline tags) because a 8 MiB fixture is too big
// to commit; its pixel values come from a formula the test checks against.
const SIDE = 2048;

function pixel(i: number): number {
  return (i * 2654435761) >>> 16; // Knuth's multiplicative hash, top 16 bits: all byte values occur
}

function uint16Tiff(littleEndian: boolean): Uint8Array {
  const entries: [number, number, number][] = [
    [256, 4, SIDE], // ImageWidth, LONG
    [257, 4, SIDE], // ImageLength
    [258, 3, 16], // BitsPerSample, SHORT
    [259, 3, 1], // Compression: none
    [262, 3, 1], // BlackIsZero
    [273, 4, 0], // StripOffsets, filled below
    [277, 3, 1], // SamplesPerPixel
    [278, 4, SIDE], // RowsPerStrip: one strip
    [279, 4, SIDE * SIDE * 2], // StripByteCounts
  ];
  const ifdBytes = 2 + entries.length * 12 + 4;
  const dataOffset = 8 + ifdBytes;
  const out = new Uint8Array(dataOffset + SIDE * SIDE * 2);
  const dv = new DataView(out.buffer);
  out.set(littleEndian ? [0x49, 0x49, 42, 0] : [0x4d, 0x4d, 0, 42]);
  dv.setUint32(4, 8, littleEndian);
  dv.setUint16(8, entries.length, littleEndian);
  entries.forEach(([tag, type, value], k) => {
    const at = 10 + k * 12;
    dv.setUint16(at, tag, littleEndian);
    dv.setUint16(at + 2, type, littleEndian);
    dv.setUint32(at + 4, 1, littleEndian);
    const v = tag === 273 ? dataOffset : value;
    if (type === 3) dv.setUint16(at + 8, v, littleEndian);
    else dv.setUint32(at + 8, v, littleEndian);
  });
  for (let i = 0; i < SIDE * SIDE; i++) dv.setUint16(dataOffset + i * 2, pixel(i), littleEndian);
  return out;
}

describe('fast path speed, 2048 x 2048 uint16 uncompressed', () => {
  it.each([
    ['little-endian', true],
    ['big-endian', false],
  ])('%s decodes exactly and quickly', async (_label, littleEndian) => {
    const bytes = uint16Tiff(littleEndian);
    const times: number[] = [];
    let data: Float32Array = new Float32Array(0);
    for (let run = 0; run < 10; run++) {
      const t0 = performance.now();
      data = (await decodeFrame(bytes)).data;
      times.push(performance.now() - t0);
    }
    let wrong = 0;
    for (let i = 0; i < data.length; i++) if (data[i] !== pixel(i)) wrong++;
    expect(wrong).toBe(0);
    // The fastest of ten runs, so a busy CI machine does not fail it; geotiff needs > 100 ms.
    expect(Math.min(...times)).toBeLessThan(40);
  });
});
