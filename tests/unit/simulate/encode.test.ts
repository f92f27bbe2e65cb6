// Encoders round-trip through readers that are not the encoders: geotiff 3.0.5 (an independent
// TIFF library) plus a tag reader written here from the TIFF 6.0 specification (from memory);
// a PNG reader written here (chunks, zlib inflate from node:zlib, the five PNG row filters of the
// PNG specification, from memory); a FITS reader written here from the FITS 4.0 standard (80-char
// cards, 2880-byte blocks, big-endian data, physical = BZERO + BSCALE·stored: from memory).
// The product's own decoder (shared/engine/frames, helper F) is tested against these files there.
import { inflateSync } from 'node:zlib';
import { fromArrayBuffer } from 'geotiff';
import { describe, expect, it } from 'vitest';
import { encodeFits, encodePng16, encodeTiff, simulateFrame } from '../../../shared/engine/simulate/index.ts';
import type { Frame } from '../../../shared/engine/types.ts';
import { EngineError } from '../../../shared/engine/errors.ts';
import { baseScenario } from './helpers.ts';

function sampleFrame(bitDepth: 16 | 'float'): Frame {
  return simulateFrame(baseScenario({ width: 97, height: 61, bitDepth, takenAt: '2026-03-04T05:06:07Z', exposureS: 0.5, hotPixelFraction: 0.002 }), 17).frame;
}

function mismatches(a: ArrayLike<number>, b: ArrayLike<number>): number {
  let n = 0;
  for (let i = 0; i < a.length; i += 1) if (a[i] !== b[i]) n += 1;
  return n + Math.abs(a.length - b.length);
}

/** All IFD entries of the first page: tag → [type, count, value-or-offset field]. */
function tiffTags(bytes: Uint8Array): Map<number, { type: number; count: number; at: number }> {
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const le = bytes[0] === 0x49;
  expect(view.getUint16(2, le)).toBe(42);
  const ifd = view.getUint32(4, le);
  const n = view.getUint16(ifd, le);
  const tags = new Map<number, { type: number; count: number; at: number }>();
  for (let k = 0; k < n; k += 1) {
    const e = ifd + 2 + 12 * k;
    tags.set(view.getUint16(e, le), { type: view.getUint16(e + 2, le), count: view.getUint32(e + 4, le), at: e + 8 });
  }
  // Tags must be sorted ascending (TIFF 6.0, section 2).
  const order = [...tags.keys()];
  expect(order).toEqual([...order].sort((a, b) => a - b));
  return tags;
}

describe('encodeTiff', () => {
  it.each([
    [16, 'uint', true],
    [16, 'uint', false],
    [16, 'int', true],
    [32, 'float', true],
    [32, 'float', false],
    [32, 'uint', false],
  ] as const)('%d-bit %s (little endian %s) reads back exactly with geotiff', async (bits, format, littleEndian) => {
    const frame = sampleFrame(format === 'float' ? 'float' : 16);
    const bytes = encodeTiff(frame, { bitsPerSample: bits, sampleFormat: format, littleEndian, rowsPerStrip: 7 });
    const tiff = await fromArrayBuffer(bytes.slice().buffer);
    const image = await tiff.getImage();
    expect(image.getWidth()).toBe(97);
    expect(image.getHeight()).toBe(61);
    const [raster] = (await image.readRasters()) as unknown as ArrayLike<number>[];
    const expected = format === 'int' ? Array.from(frame.data, (v) => Math.min(32767, v)) : frame.data;
    expect(mismatches(raster, expected)).toBe(0);
    expect(await tiff.getImageCount()).toBe(1);
  });

  it('writes the DateTime tag as "YYYY:MM:DD HH:MM:SS" and the baseline tags', () => {
    const bytes = encodeTiff(sampleFrame(16), { bitsPerSample: 16 });
    const tags = tiffTags(bytes);
    const dt = tags.get(306)!;
    expect(dt.count).toBe(20);
    const view = new DataView(bytes.buffer);
    const offset = view.getUint32(dt.at, true);
    expect(new TextDecoder().decode(bytes.subarray(offset, offset + 19))).toBe('2026:03:04 05:06:07');
    expect(bytes[offset + 19]).toBe(0);
    for (const tag of [256, 257, 258, 259, 262, 273, 278, 279, 282, 283, 296, 339]) expect(tags.has(tag)).toBe(true);
    expect(view.getUint16(tags.get(259)!.at, true)).toBe(1);
  });

  it('refuses float samples at 16 bits', () => {
    expect(() => encodeTiff(sampleFrame('float'), { bitsPerSample: 16, sampleFormat: 'float' })).toThrow(EngineError);
  });
});

/** A minimal greyscale PNG reader: IHDR, concatenated IDAT, inflate, unfilter. */
function readPng(bytes: Uint8Array): { width: number; height: number; depth: number; colourType: number; samples: Uint16Array } {
  expect(Array.from(bytes.subarray(0, 8))).toEqual([137, 80, 78, 71, 13, 10, 26, 10]);
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  let pos = 8;
  let width = 0;
  let height = 0;
  let depth = 0;
  let colourType = -1;
  const idat: Uint8Array[] = [];
  while (pos < bytes.length) {
    const length = view.getUint32(pos);
    const type = new TextDecoder().decode(bytes.subarray(pos + 4, pos + 8));
    const data = bytes.subarray(pos + 8, pos + 8 + length);
    if (type === 'IHDR') {
      width = view.getUint32(pos + 8);
      height = view.getUint32(pos + 12);
      depth = bytes[pos + 16];
      colourType = bytes[pos + 17];
    } else if (type === 'IDAT') idat.push(data);
    pos += 12 + length;
  }
  const raw = inflateSync(Buffer.concat(idat));
  const bpp = depth / 8;
  const stride = width * bpp;
  const out = new Uint8Array(stride * height);
  for (let y = 0; y < height; y += 1) {
    const filter = raw[y * (stride + 1)];
    for (let x = 0; x < stride; x += 1) {
      const v = raw[y * (stride + 1) + 1 + x];
      const a = x >= bpp ? out[y * stride + x - bpp] : 0;
      const b = y > 0 ? out[(y - 1) * stride + x] : 0;
      const c = x >= bpp && y > 0 ? out[(y - 1) * stride + x - bpp] : 0;
      let predictor = 0;
      if (filter === 1) predictor = a;
      else if (filter === 2) predictor = b;
      else if (filter === 3) predictor = (a + b) >> 1;
      else if (filter === 4) {
        const p = a + b - c;
        const pa = Math.abs(p - a);
        const pb = Math.abs(p - b);
        const pc = Math.abs(p - c);
        predictor = pa <= pb && pa <= pc ? a : pb <= pc ? b : c;
      }
      out[y * stride + x] = (v + predictor) & 0xff;
    }
  }
  const samples = new Uint16Array(width * height);
  for (let i = 0; i < samples.length; i += 1) samples[i] = (out[2 * i] << 8) | out[2 * i + 1];
  return { width, height, depth, colourType, samples };
}

describe('encodePng16', () => {
  it('is a 16-bit greyscale PNG holding the frame exactly', () => {
    const frame = sampleFrame(16);
    const png = readPng(encodePng16(frame));
    expect(png).toMatchObject({ width: 97, height: 61, depth: 16, colourType: 0 });
    expect(mismatches(png.samples, frame.data)).toBe(0);
  });
});

/** A minimal FITS primary-image reader. */
function readFits(bytes: Uint8Array): { cards: Map<string, string>; values: Float64Array } {
  expect(bytes.length % 2880).toBe(0);
  const cards = new Map<string, string>();
  let pos = 0;
  for (;; pos += 80) {
    const card = new TextDecoder().decode(bytes.subarray(pos, pos + 80));
    const key = card.slice(0, 8).trim();
    if (key === 'END') break;
    if (card.slice(8, 10) === '= ') cards.set(key, card.slice(10).split('/')[0].trim());
  }
  const dataStart = Math.ceil((pos + 80) / 2880) * 2880;
  const bitpix = Number(cards.get('BITPIX'));
  const n = Number(cards.get('NAXIS1')) * Number(cards.get('NAXIS2'));
  const bzero = Number(cards.get('BZERO') ?? 0);
  const bscale = Number(cards.get('BSCALE') ?? 1);
  const view = new DataView(bytes.buffer, bytes.byteOffset + dataStart);
  const values = new Float64Array(n);
  for (let i = 0; i < n; i += 1) values[i] = bzero + bscale * (bitpix === 16 ? view.getInt16(2 * i, false) : view.getFloat32(4 * i, false));
  return { cards, values };
}

describe('encodeFits', () => {
  it.each([16, -32] as const)('BITPIX %d reads back exactly, with the standard header', (bitpix) => {
    const frame = sampleFrame(bitpix === 16 ? 16 : 'float');
    const bytes = encodeFits(frame, bitpix);
    const { cards, values } = readFits(bytes);
    expect(new TextDecoder().decode(bytes.subarray(0, 30))).toBe('SIMPLE  =                    T');
    expect(cards.get('NAXIS')).toBe('2');
    expect(cards.get('NAXIS1')).toBe('97');
    expect(cards.get('NAXIS2')).toBe('61');
    expect(cards.get('DATE-OBS')).toBe("'2026-03-04T05:06:07'");
    expect(cards.get('EXPTIME')).toBe('0.5');
    if (bitpix === 16) expect(cards.get('BZERO')).toBe('32768');
    expect(mismatches(values, frame.data)).toBe(0);
  });
});
