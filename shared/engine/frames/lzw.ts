import { EngineError } from '../errors.ts';

const CLEAR = 256;
const EOI = 257;
const FIRST_FREE = 258;
const MAX_CODES = 4096;

/**
 * TIFF LZW decoding (TIFF 6.0 section 13: MSB-first codes of 9-12 bits, "early change" width
 * switch as libtiff writes it). Written here because geotiff 3.0.5's decoder pushes every byte into
 * a JS array and took about 3 s on a 2048 × 2048 16-bit frame; this one writes into a buffer of
 * the size the strip needs. Like libtiff, it stops once that buffer is full and returns what it has
 * if the data end without an end-of-information code (the caller checks the length).
 */
export function decodeLzw(src: Uint8Array, expectedBytes: number, what: string): Uint8Array {
  const out = new Uint8Array(expectedBytes);
  const prefix = new Uint16Array(MAX_CODES);
  const suffix = new Uint8Array(MAX_CODES);
  const first = new Uint8Array(MAX_CODES);
  const length = new Uint16Array(MAX_CODES);
  for (let i = 0; i < 256; i++) {
    suffix[i] = i;
    first[i] = i;
    length[i] = 1;
  }
  const totalBits = src.length * 8;
  let bitPos = 0;
  let width = 9;
  let next = FIRST_FREE;
  let old = -1;
  let pos = 0;

  while (pos < expectedBytes) {
    if (bitPos + width > totalBits) break; // ran out of data without EOI
    const byte = bitPos >>> 3;
    const word = (src[byte] << 16) | ((src[byte + 1] | 0) << 8) | (src[byte + 2] | 0);
    const code = (word >>> (24 - (bitPos & 7) - width)) & ((1 << width) - 1);
    bitPos += width;
    if (code === EOI) break;
    if (code === CLEAR) {
      width = 9;
      next = FIRST_FREE;
      old = -1;
      continue;
    }
    let emit: number;
    if (old < 0) {
      if (code > 255) throw new EngineError('corrupt_file', `${what}: LZW data starts with code ${code}, which is not yet defined`);
      out[pos++] = code;
      old = code;
      continue;
    }
    if (code < next) {
      emit = code;
      if (next < MAX_CODES) {
        prefix[next] = old;
        suffix[next] = first[code];
        first[next] = first[old];
        length[next] = length[old] + 1;
        next++;
      }
    } else if (code === next && next < MAX_CODES) {
      prefix[next] = old;
      suffix[next] = first[old];
      first[next] = first[old];
      length[next] = length[old] + 1;
      emit = next;
      next++;
    } else {
      throw new EngineError('corrupt_file', `${what}: LZW code ${code} is not in the dictionary (next free code ${next})`);
    }
    // Write the string backwards from its end; clip at the buffer's end as libtiff does.
    const len = length[emit];
    let c = emit;
    if (pos + len <= expectedBytes) {
      for (let k = pos + len - 1; k >= pos; k--) {
        out[k] = suffix[c];
        c = prefix[c];
      }
    } else {
      for (let k = len - 1; k >= 0; k--) {
        if (pos + k < expectedBytes) out[pos + k] = suffix[c];
        c = prefix[c];
      }
    }
    pos = Math.min(pos + len, expectedBytes);
    old = code;
    if (next >= (1 << width) - 1 && width < 12) width++;
  }
  return pos === expectedBytes ? out : out.subarray(0, pos);
}
