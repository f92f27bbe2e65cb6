import { EngineError } from '../errors.ts';

/**
 * PackBits run-length decoding (TIFF 6.0 section 9), written here rather than taken from geotiff
 * because geotiff's decoder grows an unbounded JS array: this one writes into a buffer of the size
 * the strip needs and refuses data that would overflow it.
 */
export function unpackBits(src: Uint8Array, expectedBytes: number, what: string): Uint8Array {
  const out = new Uint8Array(expectedBytes);
  let i = 0;
  let o = 0;
  while (i < src.length && o < expectedBytes) {
    const header = src[i++];
    if (header < 128) {
      const n = header + 1;
      if (i + n > src.length) throw new EngineError('truncated_file', `${what}: PackBits literal run ends past the strip data`);
      if (o + n > expectedBytes) throw new EngineError('corrupt_file', `${what}: PackBits data unpacks to more bytes than the strip holds`);
      out.set(src.subarray(i, i + n), o);
      i += n;
      o += n;
    } else if (header > 128) {
      const n = 257 - header;
      if (i >= src.length) throw new EngineError('truncated_file', `${what}: PackBits repeat run ends past the strip data`);
      if (o + n > expectedBytes) throw new EngineError('corrupt_file', `${what}: PackBits data unpacks to more bytes than the strip holds`);
      out.fill(src[i++], o, o + n);
      o += n;
    }
    // header 128 is a no-op by the specification
  }
  return o === expectedBytes ? out : out.subarray(0, o);
}
