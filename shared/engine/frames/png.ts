import { decode } from 'fast-png';
import { EngineError } from '../errors.ts';
import type { Frame } from '../types.ts';
import { checkFrameSize, checkPage, type ResolvedFrameLimits } from './limits.ts';

/** The 8-byte PNG signature (PNG specification, 3rd edition, section 5.2). */
export const PNG_SIGNATURE = [0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a];

const COLOUR_TYPES: Record<number, string> = { 2: 'RGB', 3: 'palette (indexed colour)', 4: 'greyscale with alpha', 6: 'RGB with alpha' };

/**
 * Decodes an 8- or 16-bit greyscale PNG with fast-png. The IHDR chunk is read here first so that
 * colour images and absurd sizes are refused before fast-png allocates anything.
 */
export function decodePng(bytes: Uint8Array, page: number, limits: ResolvedFrameLimits): Frame {
  if (bytes.length < 33) throw new EngineError('truncated_file', `the PNG ends inside its header (${bytes.length} bytes)`);
  const dv = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const chunk = String.fromCharCode(...bytes.subarray(12, 16));
  if (chunk !== 'IHDR' || dv.getUint32(8) !== 13) throw new EngineError('corrupt_file', 'the PNG does not start with an IHDR chunk');
  const width = dv.getUint32(16);
  const height = dv.getUint32(20);
  const depth = bytes[24];
  const colourType = bytes[25];
  if (colourType !== 0) {
    throw new EngineError('unsupported_format', `the PNG is ${COLOUR_TYPES[colourType] ?? `colour type ${colourType}`}; only single-channel greyscale frames are read`, {
      colourType,
    });
  }
  if (depth !== 8 && depth !== 16) {
    throw new EngineError('unsupported_format', `the PNG has ${depth}-bit samples; only 8- and 16-bit greyscale is read`, { depth });
  }
  checkFrameSize(width, height, depth / 8, limits, 'the PNG');
  checkPage(page, 1, 'the PNG');

  let decoded: ReturnType<typeof decode>;
  try {
    decoded = decode(bytes, { checkCrc: true });
  } catch (err) {
    const message = err instanceof Error ? err.message : String(err);
    if (!hasIend(bytes)) throw new EngineError('truncated_file', `the PNG is cut short (no IEND chunk at its end; the decoder said: ${message})`);
    throw new EngineError('corrupt_file', `the PNG could not be decoded: ${message}`);
  }
  if (decoded.data.length !== width * height) {
    throw new EngineError(hasIend(bytes) ? 'corrupt_file' : 'truncated_file', `the PNG decoded to ${decoded.data.length} samples where ${width * height} are needed`);
  }
  const data = new Float32Array(width * height);
  data.set(decoded.data);
  return {
    width,
    height,
    data,
    bitsPerSample: depth,
    sampleFormat: 'uint',
    fullScale: 2 ** depth - 1,
    format: 'png',
    pageCount: 1,
    page: 0,
  };
}

/** Whether the file ends with the IEND chunk; a missing one means the file was cut short. */
function hasIend(bytes: Uint8Array): boolean {
  if (bytes.length < 12) return false;
  return String.fromCharCode(...bytes.subarray(bytes.length - 8, bytes.length - 4)) === 'IEND';
}
