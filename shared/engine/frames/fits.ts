import { EngineError } from '../errors.ts';
import type { Frame } from '../types.ts';
import { checkFrameSize, checkPage, checkPageCount, type ResolvedFrameLimits } from './limits.ts';
import { SampleConverter, type SampleKind } from './samples.ts';

/**
 * A small reader for the primary HDU of a FITS file (FITS Standard 4.0): 80-character header cards
 * in 2880-byte blocks, then big-endian data, NAXIS1 the fastest (column) axis.
 */

const BLOCK = 2880;
const CARD = 80;
/** Headers longer than this many blocks (36 000 cards) are taken as damage, to bound the scan. */
const MAX_HEADER_BLOCKS = 1000;

/** True when the bytes start with the mandatory first card, `SIMPLE  =`. */
export function looksLikeFits(bytes: Uint8Array): boolean {
  return bytes.length >= 9 && String.fromCharCode(...bytes.subarray(0, 9)) === 'SIMPLE  =';
}

type CardValue = string | number | boolean;

/** Parses the value part of a card (columns 11-80): a quoted string, T/F, or a number. */
function parseValue(text: string): CardValue | undefined {
  const t = text.trimStart();
  if (t.startsWith("'")) {
    let out = '';
    for (let i = 1; i < t.length; i++) {
      if (t[i] === "'") {
        if (t[i + 1] === "'") {
          out += "'";
          i++;
        } else {
          return out.trimEnd();
        }
      } else {
        out += t[i];
      }
    }
    return undefined;
  }
  const v = t.split('/')[0].trim();
  if (v === 'T') return true;
  if (v === 'F') return false;
  if (v === '') return undefined;
  const n = Number(v.replace(/[dD]/, 'E'));
  return Number.isFinite(n) ? n : undefined;
}

/** Reads header cards up to END; returns the keywords and the byte where the data starts. */
function readHeader(bytes: Uint8Array): { cards: Map<string, CardValue>; dataStart: number } {
  const cards = new Map<string, CardValue>();
  const end = Math.min(bytes.length, MAX_HEADER_BLOCKS * BLOCK);
  for (let at = 0; at + CARD <= end; at += CARD) {
    const card = String.fromCharCode(...bytes.subarray(at, at + CARD));
    const key = card.slice(0, 8).trimEnd();
    if (key === 'END') return { cards, dataStart: Math.ceil((at + CARD) / BLOCK) * BLOCK };
    if (card.slice(8, 10) === '= ' && !cards.has(key)) {
      const value = parseValue(card.slice(10));
      if (value !== undefined) cards.set(key, value);
    }
  }
  if (end < bytes.length) throw new EngineError('corrupt_file', `the FITS header has no END card in its first ${MAX_HEADER_BLOCKS} blocks`);
  throw new EngineError('truncated_file', `the FITS header has no END card in the file's ${bytes.length} bytes`);
}

function intCard(cards: Map<string, CardValue>, key: string): number {
  const v = cards.get(key);
  if (typeof v !== 'number' || !Number.isInteger(v)) throw new EngineError('corrupt_file', `the FITS header lacks a valid ${key}`);
  return v;
}

function numberCard(cards: Map<string, CardValue>, key: string, fallback: number): number {
  const v = cards.get(key);
  return typeof v === 'number' ? v : fallback;
}

/** DATE-OBS ("YYYY-MM-DD" or "YYYY-MM-DDThh:mm:ss[.s]", UTC unless it says otherwise) → ISO 8601. */
function dateObsToIso(v: CardValue | undefined): string | undefined {
  if (typeof v !== 'string' || !/^\d{4}-\d{2}-\d{2}(T\d{2}:\d{2}(:\d{2}(\.\d+)?)?)?(Z|[+-]\d{2}:\d{2})?$/.test(v)) return undefined;
  const withZone = v.length > 10 && !/(Z|[+-]\d{2}:\d{2})$/.test(v) ? `${v}Z` : v;
  const date = new Date(withZone);
  return Number.isNaN(date.getTime()) ? undefined : date.toISOString();
}

const KINDS: Record<number, SampleKind> = {
  8: { bits: 8, format: 'uint' },
  16: { bits: 16, format: 'int' },
  32: { bits: 32, format: 'int' },
  [-32]: { bits: 32, format: 'float' },
  [-64]: { bits: 64, format: 'float' },
};

/**
 * Decodes one plane of the primary HDU. Integer data with BZERO/BSCALE becomes physical values,
 * BZERO + BSCALE × stored. The standard's unsigned conventions (BITPIX 16 + BZERO 32768, BITPIX 32
 * + BZERO 2^31, BITPIX 8 + BZERO −128 for signed bytes) are reported as the integer type they stand
 * for; any other scaling is reported as `float` with `fullScale` the physical value of the largest
 * stored integer, so saturation checks still work.
 */
export function decodeFits(bytes: Uint8Array, page: number, limits: ResolvedFrameLimits): Frame {
  const { cards, dataStart } = readHeader(bytes);
  if (cards.get('SIMPLE') !== true) throw new EngineError('unsupported_format', 'the FITS file says SIMPLE = F (it does not follow the standard)');
  const bitpix = intCard(cards, 'BITPIX');
  const naxis = intCard(cards, 'NAXIS');
  if (bitpix === 64) throw new EngineError('unsupported_format', 'the FITS image holds 64-bit integers (BITPIX = 64); only 8, 16, 32, -32 and -64 are read');
  const kind = KINDS[bitpix];
  if (!kind) throw new EngineError('corrupt_file', `the FITS header has BITPIX = ${bitpix}, which the standard does not allow`);
  if (naxis < 2 || naxis > 3) {
    throw new EngineError(naxis === 0 ? 'invalid_frame' : 'unsupported_format', naxis === 0
      ? 'the FITS primary HDU holds no image (NAXIS = 0)'
      : `the FITS image has NAXIS = ${naxis}; only 2-D images and 3-D stacks of planes are read`);
  }
  const width = intCard(cards, 'NAXIS1');
  const height = intCard(cards, 'NAXIS2');
  const planes = naxis === 3 ? intCard(cards, 'NAXIS3') : 1;
  if (planes < 1) throw new EngineError('invalid_frame', `the FITS stack has NAXIS3 = ${planes} planes`);
  const bytesPerSample = kind.bits / 8;
  checkFrameSize(width, height, bytesPerSample, limits, 'the FITS image');
  checkPageCount(planes, limits, 'the FITS stack');
  checkPage(page, planes, 'the FITS image');

  const planeBytes = width * height * bytesPerSample;
  const start = dataStart + page * planeBytes;
  if (start + planeBytes > bytes.length) {
    throw new EngineError('truncated_file', `the FITS data of plane ${page} ends at byte ${start + planeBytes}, the file has ${bytes.length}`, {
      fileBytes: bytes.length,
    });
  }

  const bzero = numberCard(cards, 'BZERO', 0);
  const bscale = numberCard(cards, 'BSCALE', 1);
  const n = width * height;
  let data: Float32Array;
  let sampleFormat: Frame['sampleFormat'] = kind.format;
  let fullScale = kind.format === 'float' ? Infinity : kind.bits === 8 ? 255 : 2 ** (kind.bits - 1) - 1;
  if (kind.format === 'float' || (bzero === 0 && bscale === 1)) {
    // FITS is big-endian: swapped in the converter's scratch, then one native pass to Float32.
    data = new SampleConverter(kind, false).toFloat32(bytes, start, n);
    if (kind.format === 'float' && (bzero !== 0 || bscale !== 1)) for (let i = 0; i < n; i++) data[i] = bzero + bscale * data[i];
  } else {
    // Scale in double precision straight from the stored integers: one rounding, to Float32.
    data = new Float32Array(n);
    const dv = new DataView(bytes.buffer, bytes.byteOffset + start, planeBytes);
    const read = kind.bits === 8 ? (i: number) => dv.getUint8(i) : kind.bits === 16 ? (i: number) => dv.getInt16(i * 2) : (i: number) => dv.getInt32(i * 4);
    for (let i = 0; i < n; i++) data[i] = bzero + bscale * read(i);
    const lo = kind.bits === 8 ? 0 : -(2 ** (kind.bits - 1));
    const hi = kind.bits === 8 ? 255 : 2 ** (kind.bits - 1) - 1;
    if (bscale === 1 && bzero === -lo && kind.bits !== 8) {
      sampleFormat = 'uint';
      fullScale = 2 ** kind.bits - 1;
    } else if (bscale === 1 && kind.bits === 8 && bzero === -128) {
      sampleFormat = 'int';
      fullScale = 127;
    } else {
      sampleFormat = 'float';
      fullScale = Math.max(bzero + bscale * lo, bzero + bscale * hi);
    }
  }

  const takenAt = dateObsToIso(cards.get('DATE-OBS'));
  const exposure = cards.get('EXPTIME') ?? cards.get('EXPOSURE');
  return {
    width,
    height,
    data,
    bitsPerSample: bitpix,
    sampleFormat,
    fullScale,
    format: 'fits',
    pageCount: planes,
    page,
    ...(takenAt ? { takenAt } : {}),
    ...(typeof exposure === 'number' ? { exposureS: exposure } : {}),
  };
}
