/**
 * Writers for simulated frames in the camera formats the product reads: baseline uncompressed
 * TIFF (strips, one page), 16-bit grey PNG (through fast-png) and FITS primary images. Pure TS,
 * no Node APIs: they return bytes for the caller to store. Integer samples are rounded and
 * clipped to the type's range; the frame is never modified.
 */
import { encode as encodePng } from 'fast-png';
import { EngineError } from '../errors.ts';
import type { Frame } from '../types.ts';

/** Options of `encodeTiff`. */
export interface TiffEncodeOptions {
  /** Bits per sample. */
  bitsPerSample: 16 | 32;
  /** Sample type; 'float' needs 32 bits. @default 'uint' for 16 bits, 'float' for 32 */
  sampleFormat?: 'uint' | 'int' | 'float';
  /** Byte order: true = "II" (Intel), false = "MM" (Motorola). @default true */
  littleEndian?: boolean;
  /** Acquisition time written as the DateTime tag (306), "YYYY:MM:DD HH:MM:SS" from an ISO 8601 string. @default frame.takenAt */
  dateTime?: string;
  /** Rows per strip. @default as many rows as fit in 64 KiB (at least 1) */
  rowsPerStrip?: number;
}

const TIFF_TYPE = { ASCII: 2, SHORT: 3, LONG: 4, RATIONAL: 5 } as const;
const SAMPLE_FORMAT_CODE = { uint: 1, int: 2, float: 3 } as const;

interface TiffEntry {
  tag: number;
  type: number;
  values: number[] | string;
}

function checkFrame(frame: Frame): void {
  if (!Number.isInteger(frame.width) || !Number.isInteger(frame.height) || frame.width < 1 || frame.height < 1 || frame.data.length !== frame.width * frame.height) {
    throw new EngineError('invalid_frame', `Frame of ${frame.width} x ${frame.height} pixels must hold ${frame.width * frame.height} samples (has ${frame.data.length}).`);
  }
}

/** TIFF DateTime text "YYYY:MM:DD HH:MM:SS" (UTC) for an ISO 8601 time; undefined when it does not parse. */
function tiffDateTime(iso: string | undefined): string | undefined {
  if (iso === undefined) return undefined;
  const ms = Date.parse(iso);
  if (!Number.isFinite(ms)) throw new EngineError('invalid_input', `DateTime "${iso}" is not an ISO 8601 time.`);
  const d = new Date(ms).toISOString();
  return `${d.slice(0, 4)}:${d.slice(5, 7)}:${d.slice(8, 10)} ${d.slice(11, 19)}`;
}

/** Writes `value` as the sample type at `offset`. */
type SampleWriter = (view: DataView, offset: number, value: number) => void;

function sampleWriter(bits: 16 | 32, format: 'uint' | 'int' | 'float', littleEndian: boolean): SampleWriter {
  const clip = (lo: number, hi: number) => (v: number) => (Number.isNaN(v) ? 0 : Math.min(hi, Math.max(lo, Math.round(v))));
  if (format === 'float') {
    if (bits !== 32) throw new EngineError('invalid_input', 'Floating-point TIFF samples need bitsPerSample 32.');
    return (view, offset, value) => view.setFloat32(offset, value, littleEndian);
  }
  if (bits === 16) {
    if (format === 'uint') {
      const c = clip(0, 65535);
      return (view, offset, value) => view.setUint16(offset, c(value), littleEndian);
    }
    const c = clip(-32768, 32767);
    return (view, offset, value) => view.setInt16(offset, c(value), littleEndian);
  }
  if (format === 'uint') {
    const c = clip(0, 4294967295);
    return (view, offset, value) => view.setUint32(offset, c(value), littleEndian);
  }
  const c = clip(-2147483648, 2147483647);
  return (view, offset, value) => view.setInt32(offset, c(value), littleEndian);
}

/** Baseline uncompressed single-page TIFF of `frame`, grey (BlackIsZero), in strips. */
export function encodeTiff(frame: Frame, options: TiffEncodeOptions): Uint8Array {
  checkFrame(frame);
  const bits = options.bitsPerSample;
  if (bits !== 16 && bits !== 32) throw new EngineError('invalid_input', `bitsPerSample must be 16 or 32 (got ${String(bits)}).`);
  const format = options.sampleFormat ?? (bits === 16 ? 'uint' : 'float');
  const littleEndian = options.littleEndian ?? true;
  const bytesPerSample = bits / 8;
  const rowBytes = frame.width * bytesPerSample;
  const rowsPerStrip = Math.max(1, Math.min(frame.height, Math.floor(options.rowsPerStrip ?? 65536 / rowBytes) || 1));
  const stripCount = Math.ceil(frame.height / rowsPerStrip);
  const dateTime = tiffDateTime(options.dateTime ?? frame.takenAt);

  // Layout: header (8) | pixel strips | IFD | out-of-line tag values.
  const imageBytes = rowBytes * frame.height;
  const stripOffsets: number[] = [];
  const stripByteCounts: number[] = [];
  for (let k = 0; k < stripCount; k += 1) {
    const rows = Math.min(rowsPerStrip, frame.height - k * rowsPerStrip);
    stripOffsets.push(8 + k * rowsPerStrip * rowBytes);
    stripByteCounts.push(rows * rowBytes);
  }
  const entries: TiffEntry[] = [
    { tag: 256, type: TIFF_TYPE.LONG, values: [frame.width] },
    { tag: 257, type: TIFF_TYPE.LONG, values: [frame.height] },
    { tag: 258, type: TIFF_TYPE.SHORT, values: [bits] },
    { tag: 259, type: TIFF_TYPE.SHORT, values: [1] },
    { tag: 262, type: TIFF_TYPE.SHORT, values: [1] },
    { tag: 273, type: TIFF_TYPE.LONG, values: stripOffsets },
    { tag: 277, type: TIFF_TYPE.SHORT, values: [1] },
    { tag: 278, type: TIFF_TYPE.LONG, values: [rowsPerStrip] },
    { tag: 279, type: TIFF_TYPE.LONG, values: stripByteCounts },
    { tag: 282, type: TIFF_TYPE.RATIONAL, values: [72, 1] },
    { tag: 283, type: TIFF_TYPE.RATIONAL, values: [72, 1] },
    { tag: 284, type: TIFF_TYPE.SHORT, values: [1] },
    { tag: 296, type: TIFF_TYPE.SHORT, values: [2] },
    ...(dateTime !== undefined ? [{ tag: 306, type: TIFF_TYPE.ASCII, values: dateTime }] : []),
    { tag: 339, type: TIFF_TYPE.SHORT, values: [SAMPLE_FORMAT_CODE[format]] },
  ];
  // A RATIONAL is two LONGs, so every numeric value here takes 2 (SHORT) or 4 bytes.
  const valueBytes = (e: TiffEntry): number => (typeof e.values === 'string' ? e.values.length + 1 : e.values.length * (e.type === TIFF_TYPE.SHORT ? 2 : 4));
  const count = (e: TiffEntry): number => (typeof e.values === 'string' ? e.values.length + 1 : e.type === TIFF_TYPE.RATIONAL ? e.values.length / 2 : e.values.length);
  const ifdOffset = 8 + imageBytes + (imageBytes % 2);
  const ifdBytes = 2 + entries.length * 12 + 4;
  let extraOffset = ifdOffset + ifdBytes;
  const extraOffsets = entries.map((e) => {
    const size = valueBytes(e);
    if (size <= 4) return -1;
    const at = extraOffset;
    extraOffset += size + (size % 2);
    return at;
  });
  const bytes = new Uint8Array(extraOffset);
  const view = new DataView(bytes.buffer);
  bytes[0] = bytes[1] = littleEndian ? 0x49 : 0x4d;
  view.setUint16(2, 42, littleEndian);
  view.setUint32(4, ifdOffset, littleEndian);

  const write = sampleWriter(bits, format, littleEndian);
  const data = frame.data;
  for (let i = 0, offset = 8; i < data.length; i += 1, offset += bytesPerSample) write(view, offset, data[i]);

  const writeValues = (e: TiffEntry, at: number): void => {
    if (typeof e.values === 'string') {
      for (let k = 0; k < e.values.length; k += 1) bytes[at + k] = e.values.charCodeAt(k) & 0x7f;
      bytes[at + e.values.length] = 0;
      return;
    }
    e.values.forEach((v, k) => (e.type === TIFF_TYPE.SHORT ? view.setUint16(at + 2 * k, v, littleEndian) : view.setUint32(at + 4 * k, v, littleEndian)));
  };
  view.setUint16(ifdOffset, entries.length, littleEndian);
  entries.forEach((e, k) => {
    const at = ifdOffset + 2 + 12 * k;
    view.setUint16(at, e.tag, littleEndian);
    view.setUint16(at + 2, e.type, littleEndian);
    view.setUint32(at + 4, count(e), littleEndian);
    writeValues(e, extraOffsets[k] >= 0 ? extraOffsets[k] : at + 8);
    if (extraOffsets[k] >= 0) view.setUint32(at + 8, extraOffsets[k], littleEndian);
  });
  view.setUint32(ifdOffset + ifdBytes - 4, 0, littleEndian);
  return bytes;
}

/** 16-bit greyscale PNG of `frame` (samples rounded, clipped to 0..65535), through fast-png. */
export function encodePng16(frame: Frame): Uint8Array {
  checkFrame(frame);
  const samples = new Uint16Array(frame.data.length);
  for (let i = 0; i < samples.length; i += 1) {
    const v = frame.data[i];
    samples[i] = Number.isNaN(v) ? 0 : Math.min(65535, Math.max(0, Math.round(v)));
  }
  return encodePng({ width: frame.width, height: frame.height, data: samples, depth: 16, channels: 1 });
}

const FITS_BLOCK = 2880;
const FITS_CARD = 80;

/** One 80-character FITS header card. */
function fitsCard(keyword: string, value?: string, comment?: string): string {
  let card = keyword.padEnd(8, ' ');
  if (value !== undefined) card += '= ' + value.padStart(20, ' ') + (comment ? ` / ${comment}` : '');
  return card.slice(0, FITS_CARD).padEnd(FITS_CARD, ' ');
}

/**
 * FITS primary image of `frame`: BITPIX 16 stores unsigned 16-bit data the standard way (signed
 * int16 with BZERO = 32768), BITPIX −32 stores IEEE float32; big-endian, padded to 2880-byte
 * blocks. The frame's first row is written first (NAXIS1 = width varies fastest); DATE-OBS and
 * EXPTIME are written when the frame has them.
 */
export function encodeFits(frame: Frame, bitpix: 16 | -32): Uint8Array {
  checkFrame(frame);
  if (bitpix !== 16 && bitpix !== -32) throw new EngineError('invalid_input', `bitpix must be 16 or -32 (got ${String(bitpix)}).`);
  const cards = [
    fitsCard('SIMPLE', 'T', 'conforms to FITS standard'),
    fitsCard('BITPIX', String(bitpix)),
    fitsCard('NAXIS', '2'),
    fitsCard('NAXIS1', String(frame.width), 'spectral or spatial axis, fastest varying'),
    fitsCard('NAXIS2', String(frame.height)),
  ];
  if (bitpix === 16) {
    cards.push(fitsCard('BZERO', '32768', 'unsigned 16-bit data'), fitsCard('BSCALE', '1'));
  }
  if (frame.takenAt !== undefined) cards.push(fitsCard('DATE-OBS', `'${new Date(Date.parse(frame.takenAt)).toISOString().slice(0, 19)}'`));
  if (frame.exposureS !== undefined) cards.push(fitsCard('EXPTIME', String(frame.exposureS), 's'));
  cards.push(fitsCard('END'));
  const headerBytes = Math.ceil((cards.length * FITS_CARD) / FITS_BLOCK) * FITS_BLOCK;
  const bytesPerSample = bitpix === 16 ? 2 : 4;
  const dataBytes = Math.ceil((frame.data.length * bytesPerSample) / FITS_BLOCK) * FITS_BLOCK;
  const bytes = new Uint8Array(headerBytes + dataBytes);
  bytes.fill(0x20, 0, headerBytes);
  const header = cards.join('');
  for (let k = 0; k < header.length; k += 1) bytes[k] = header.charCodeAt(k);
  const view = new DataView(bytes.buffer);
  const data = frame.data;
  if (bitpix === 16) {
    for (let i = 0; i < data.length; i += 1) {
      const v = data[i];
      const u = Number.isNaN(v) ? 0 : Math.min(65535, Math.max(0, Math.round(v)));
      view.setInt16(headerBytes + 2 * i, u - 32768, false);
    }
  } else {
    for (let i = 0; i < data.length; i += 1) view.setFloat32(headerBytes + 4 * i, data[i], false);
  }
  return bytes;
}
