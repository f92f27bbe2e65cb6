import { EngineError } from '../errors.ts';
import type { Frame } from '../types.ts';
import { decodeFits, looksLikeFits } from './fits.ts';
import { resolveLimits, type FrameLimits } from './limits.ts';
import { PNG_SIGNATURE, decodePng } from './png.ts';
import { decodeTiff } from './tiff.ts';
import { looksLikeTiff } from './tiff-structure.ts';

export type { FrameLimits } from './limits.ts';
export { DEFAULT_FRAME_LIMITS } from './limits.ts';

/** Options of {@link decodeFrame}. */
export interface DecodeFrameOptions {
  /**
   * Which page to decode, 0-based: a TIFF page (IFD) or a FITS plane (NAXIS3).
   * @default 0
   */
  page?: number;
  /** Size ceilings, checked before allocating. @default DEFAULT_FRAME_LIMITS */
  limits?: FrameLimits;
}

function startsWith(bytes: Uint8Array, prefix: number[]): boolean {
  return bytes.length >= prefix.length && prefix.every((b, i) => bytes[i] === b);
}

/** Whether the file, too short to be anything, is the start of one of the formats we read. */
function isPrefixOfKnown(bytes: Uint8Array): boolean {
  const candidates = [PNG_SIGNATURE, [0x49, 0x49, 42, 0], [0x49, 0x49, 43, 0], [0x4d, 0x4d, 0, 42], [0x4d, 0x4d, 0, 43], [...'SIMPLE  ='].map((c) => c.charCodeAt(0))];
  return candidates.some((c) => bytes.length < c.length && bytes.every((b, i) => b === c[i]));
}

/** Names what a file of an unread type seems to be, for the error message. */
function describeOther(bytes: Uint8Array): string {
  if (startsWith(bytes, [0xff, 0xd8, 0xff])) return 'a JPEG image (lossy, 8-bit: save camera frames as TIFF, PNG or FITS instead)';
  if (startsWith(bytes, [0x47, 0x49, 0x46, 0x38])) return 'a GIF image';
  if (startsWith(bytes, [0x42, 0x4d])) return 'a BMP image';
  if (startsWith(bytes, [0x25, 0x50, 0x44, 0x46])) return 'a PDF document';
  if (startsWith(bytes, [0x50, 0x4b, 0x03, 0x04])) return 'a ZIP archive';
  const head = bytes.subarray(0, 64);
  if (head.every((b) => b === 9 || b === 10 || b === 13 || (b >= 32 && b < 127) || b >= 128)) return 'text, not an image';
  const hex = Array.from(bytes.subarray(0, 8), (b) => b.toString(16).padStart(2, '0')).join(' ');
  return `not an image we know (it starts with bytes ${hex})`;
}

/**
 * Decodes a camera frame from the bytes of a TIFF/BigTIFF, greyscale PNG or FITS file, sniffed
 * from its first bytes (the name or MIME type is not trusted). Never mutates `bytes`.
 *
 * Float data keep their NaN pixels as NaN (the reduce stage decides what to do with them).
 * Throws {@link EngineError} with code `unsupported_format`, `corrupt_file`, `truncated_file`,
 * `too_large` or `invalid_frame` (also for a page that does not exist), whose message names the
 * problem.
 */
export async function decodeFrame(bytes: Uint8Array, options: DecodeFrameOptions = {}): Promise<Frame> {
  if (!(bytes instanceof Uint8Array)) throw new EngineError('invalid_input', 'decodeFrame needs the file as a Uint8Array');
  const limits = resolveLimits(options.limits);
  const page = options.page ?? 0;
  if (bytes.length === 0) throw new EngineError('truncated_file', 'the file is empty (0 bytes)');
  try {
    if (looksLikeTiff(bytes)) return await decodeTiff(bytes, page, limits);
    if (startsWith(bytes, PNG_SIGNATURE)) return decodePng(bytes, page, limits);
    if (looksLikeFits(bytes)) return decodeFits(bytes, page, limits);
  } catch (err) {
    if (err instanceof EngineError) throw err;
    // A bounds slip inside a decoder on a damaged file must still reach the user as a named error.
    throw new EngineError('corrupt_file', `the file could not be decoded: ${err instanceof Error ? err.message : String(err)}`);
  }
  if (isPrefixOfKnown(bytes)) throw new EngineError('truncated_file', `the file stops after ${bytes.length} bytes, inside its signature`);
  throw new EngineError('unsupported_format', `the file is ${describeOther(bytes)}; frames are read from TIFF, BigTIFF, greyscale PNG and FITS`);
}
