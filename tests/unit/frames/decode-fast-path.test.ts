import { describe, expect, it } from 'vitest';
import { decodeFrame } from '../../../shared/engine/frames/index.ts';

// Uncompressed strips lying back to back in the file are decoded in one native pass; strips
// with anything between them go strip by strip. Both must give the same pixels. The files here
// are laid out by hand to the TIFF 6.0 baseline (header, one IFD, strip offset/count arrays,
// samples) from seeded random 16-bit values; the writers' own files are checked pixel for pixel
// in decode-frame.test.ts.

/** A 16-bit greyscale TIFF of `rowsPerStrip`-row strips, `gapBytes` of padding between strips. */
function handTiff(values: Uint16Array, width: number, height: number, rowsPerStrip: number, littleEndian: boolean, gapBytes: number): Uint8Array {
  const strips = Math.ceil(height / rowsPerStrip);
  const entries: [number, number, number, number][] = []; // tag, type (3 SHORT, 4 LONG), count, value
  const ifdBytes = 2 + 10 * 12 + 4;
  const offsetsAt = 8 + ifdBytes;
  const countsAt = offsetsAt + 4 * strips;
  const dataAt = countsAt + 4 * strips;
  const stripCounts = Array.from({ length: strips }, (_, s) => Math.min(rowsPerStrip, height - s * rowsPerStrip) * width * 2);
  const stripOffsets: number[] = [];
  let at = dataAt;
  for (const count of stripCounts) {
    stripOffsets.push(at);
    at += count + gapBytes;
  }
  entries.push([256, 3, 1, width], [257, 3, 1, height], [258, 3, 1, 16], [259, 3, 1, 1], [262, 3, 1, 1]);
  entries.push([273, 4, strips, strips === 1 ? stripOffsets[0] : offsetsAt], [277, 3, 1, 1], [278, 3, 1, rowsPerStrip]);
  entries.push([279, 4, strips, strips === 1 ? stripCounts[0] : countsAt], [339, 3, 1, 1]);
  const bytes = new Uint8Array(at);
  const view = new DataView(bytes.buffer);
  bytes.set(littleEndian ? [0x49, 0x49] : [0x4d, 0x4d]);
  view.setUint16(2, 42, littleEndian);
  view.setUint32(4, 8, littleEndian);
  view.setUint16(8, entries.length, littleEndian);
  entries.forEach(([tag, type, count, value], k) => {
    const e = 10 + 12 * k;
    view.setUint16(e, tag, littleEndian);
    view.setUint16(e + 2, type, littleEndian);
    view.setUint32(e + 4, count, littleEndian);
    // A single SHORT sits in the first two bytes of the value field.
    if (type === 3 && count === 1) view.setUint16(e + 8, value, littleEndian);
    else view.setUint32(e + 8, value, littleEndian);
  });
  for (let s = 0; s < strips; s++) {
    view.setUint32(offsetsAt + 4 * s, stripOffsets[s], littleEndian);
    view.setUint32(countsAt + 4 * s, stripCounts[s], littleEndian);
    const first = s * rowsPerStrip * width;
    for (let i = 0; i < stripCounts[s] / 2; i++) view.setUint16(stripOffsets[s] + 2 * i, values[first + i], littleEndian);
  }
  return bytes;
}

function randomValues(n: number, seed: number): Uint16Array {
  let a = seed >>> 0;
  const out = new Uint16Array(n);
  for (let i = 0; i < n; i++) {
    a = (Math.imul(a, 1664525) + 1013904223) >>> 0; // LCG of Numerical Recipes (from memory)
    out[i] = a >>> 16;
  }
  return out;
}

describe('decodeFrame: contiguous uncompressed strips (one pass) equal strip-by-strip decoding', () => {
  it.each([
    ['little-endian, 7-row strips', true, 7],
    ['big-endian (swapped), 7-row strips', false, 7],
    ['little-endian, one strip', true, 40],
    ['big-endian, one strip', false, 40],
  ] as const)('%s', async (_name, littleEndian, rowsPerStrip) => {
    const width = 53;
    const height = 40;
    const values = randomValues(width * height, rowsPerStrip + (littleEndian ? 1 : 2));
    const contiguous = await decodeFrame(handTiff(values, width, height, rowsPerStrip, littleEndian, 0));
    const gapped = await decodeFrame(handTiff(values, width, height, rowsPerStrip, littleEndian, 6));
    expect(Array.from(contiguous.data)).toEqual(Array.from(values));
    expect(Array.from(gapped.data)).toEqual(Array.from(values));
    expect({ ...contiguous, data: null }).toEqual({ ...gapped, data: null });
  });

  it('gives a frame that does not share the file bytes', async () => {
    const values = randomValues(64 * 8, 9);
    const file = handTiff(values, 64, 8, 8, true, 0);
    const frame = await decodeFrame(file);
    file.fill(0);
    expect(Array.from(frame.data)).toEqual(Array.from(values));
  });
});
