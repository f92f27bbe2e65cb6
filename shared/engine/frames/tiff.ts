import { getDecoder } from 'geotiff';
import { EngineError } from '../errors.ts';
import type { Frame } from '../types.ts';
import { checkFrameSize, checkPage, type ResolvedFrameLimits } from './limits.ts';
import { unpackBits } from './packbits.ts';
import { undoFloatingPointPredictor, undoHorizontalPredictor } from './predictor.ts';
import { SampleConverter, frameBitsOf, fullScaleOf, type SampleKind } from './samples.ts';
import { decodeLzw } from './lzw.ts';
import { TiffDirectory, readTiffHeader, walkTiffPages } from './tiff-structure.ts';

/** TIFF tag numbers used here (TIFF 6.0 appendix A; SampleFormat from section 19). */
const TAG = {
  ImageWidth: 256,
  ImageLength: 257,
  BitsPerSample: 258,
  Compression: 259,
  Photometric: 262,
  StripOffsets: 273,
  SamplesPerPixel: 277,
  RowsPerStrip: 278,
  StripByteCounts: 279,
  DateTime: 306,
  Predictor: 317,
  TileWidth: 322,
  TileLength: 323,
  TileOffsets: 324,
  TileByteCounts: 325,
  SampleFormat: 339,
} as const;

const COMPRESSION_NAMES: Record<number, string> = {
  2: 'CCITT RLE',
  3: 'CCITT Group 3',
  4: 'CCITT Group 4',
  6: 'old-style JPEG',
  7: 'JPEG',
  34712: 'JPEG 2000',
  34887: 'LERC',
  50000: 'Zstandard',
  50001: 'WebP',
};
const NONE = 1;
const LZW = 5;
const DEFLATE = [8, 32946];
const PACKBITS = 32773;

/** TIFF DateTime "YYYY:MM:DD HH:MM:SS" (local camera time, no zone) → ISO 8601 without zone. */
function dateTimeToIso(raw: unknown): string | undefined {
  if (typeof raw !== 'string') return undefined;
  const m = /^(\d{4}):(\d{2}):(\d{2})[ T](\d{2}):(\d{2}):(\d{2})/.exec(raw.trim());
  return m ? `${m[1]}-${m[2]}-${m[3]}T${m[4]}:${m[5]}:${m[6]}` : undefined;
}

function sampleKindOf(bits: number, sampleFormat: number): SampleKind {
  if (sampleFormat === 3) {
    if (bits === 32 || bits === 64) return { bits, format: 'float' };
    throw new EngineError('unsupported_format', `the TIFF holds ${bits}-bit floating-point samples; only 32- and 64-bit floats are read`);
  }
  if (sampleFormat !== 1 && sampleFormat !== 2) {
    throw new EngineError('unsupported_format', `the TIFF's SampleFormat is ${sampleFormat}; only unsigned, signed and floating-point samples are read`);
  }
  const format = sampleFormat === 1 ? 'uint' : 'int';
  if (bits === 8 || bits === 16 || bits === 32) return { bits, format };
  throw new EngineError(
    'unsupported_format',
    `the TIFF holds ${bits}-bit ${format === 'uint' ? 'unsigned' : 'signed'} integer samples; only 8, 16 and 32 bits are read`,
  );
}

/**
 * Whether the `down` strips lie back to back in the file, each holding exactly its share, so
 * that together they are the frame's `sampleBytes` bytes from the first offset on.
 */
function contiguousStrips(offsets: ArrayLike<number>, counts: ArrayLike<number>, down: number, sampleBytes: number): boolean {
  let total = 0;
  for (let i = 0; i < down; i++) {
    if (offsets[i] !== offsets[0] + total) return false;
    total += counts[i];
  }
  return total === sampleBytes;
}

/** Decodes one page of a classic TIFF or BigTIFF into a Frame. */
export async function decodeTiff(bytes: Uint8Array, page: number, limits: ResolvedFrameLimits): Promise<Frame> {
  const header = readTiffHeader(bytes);
  const starts = walkTiffPages(bytes, header, limits);
  const pageCount = starts.length;
  checkPage(page, pageCount, 'the TIFF');
  const fd = new TiffDirectory(bytes, header, starts[page]);

  const width = fd.number(TAG.ImageWidth) ?? 0;
  const height = fd.number(TAG.ImageLength) ?? 0;
  const samplesPerPixel = fd.number(TAG.SamplesPerPixel) ?? 1;
  const bits = fd.number(TAG.BitsPerSample) ?? 1;
  const sampleFormat = fd.number(TAG.SampleFormat) ?? 1;
  const compression = fd.number(TAG.Compression) ?? NONE;
  const predictor = fd.number(TAG.Predictor) ?? 1;
  const photometric = fd.number(TAG.Photometric);

  // Single channel only, by decision: a spectrometer camera is monochrome, and silently taking
  // one channel of a colour picture (or a screenshot) would hand the reduction wrong counts.
  if (samplesPerPixel !== 1) {
    const what = photometric === 2 ? ' (RGB)' : photometric === 6 ? ' (YCbCr)' : '';
    throw new EngineError(
      'unsupported_format',
      `the TIFF has ${samplesPerPixel} samples per pixel${what}; only single-channel (greyscale) frames are read`,
      { samplesPerPixel },
    );
  }
  if (photometric !== undefined && photometric !== 1) {
    const name = photometric === 0 ? 'WhiteIsZero (inverted greyscale)' : photometric === 3 ? 'a palette (colour map)' : `PhotometricInterpretation ${photometric}`;
    throw new EngineError('unsupported_format', `the TIFF stores ${name}; only BlackIsZero greyscale frames are read`, { photometric });
  }
  const kind = sampleKindOf(bits, sampleFormat);
  if (compression !== NONE && compression !== LZW && compression !== PACKBITS && !DEFLATE.includes(compression)) {
    const name = COMPRESSION_NAMES[compression] ?? `compression scheme ${compression}`;
    throw new EngineError('unsupported_format', `the TIFF is compressed with ${name}; only uncompressed, LZW, deflate and PackBits are read`, {
      compression,
    });
  }
  if (predictor !== 1 && predictor !== 2 && predictor !== 3) {
    throw new EngineError('unsupported_format', `the TIFF uses predictor ${predictor}; only none, horizontal (2) and floating-point (3) are read`);
  }
  if (predictor === 3 && kind.format !== 'float') throw new EngineError('corrupt_file', 'the TIFF applies the floating-point predictor to integer samples');
  if (predictor === 2 && kind.bits === 64) throw new EngineError('unsupported_format', 'the TIFF applies the horizontal predictor to 64-bit samples');

  const bytesPerSample = kind.bits / 8;
  checkFrameSize(width, height, bytesPerSample, limits, 'the TIFF');

  const tiled = fd.has(TAG.TileWidth);
  const blockWidth = tiled ? (fd.number(TAG.TileWidth) ?? 0) : width;
  const rowsPerStrip = fd.number(TAG.RowsPerStrip);
  const blockHeight = tiled ? (fd.number(TAG.TileLength) ?? 0) : Math.min(rowsPerStrip ?? height, height);
  if (!(blockWidth >= 1 && blockHeight >= 1)) throw new EngineError('corrupt_file', `the TIFF declares ${blockWidth} x ${blockHeight} pixel ${tiled ? 'tiles' : 'strips'}`);
  checkFrameSize(blockWidth, blockHeight, bytesPerSample, limits, `a ${tiled ? 'tile' : 'strip'} of the TIFF`);
  const across = Math.ceil(width / blockWidth);
  const down = Math.ceil(height / blockHeight);
  const offsets = fd.numbers(tiled ? TAG.TileOffsets : TAG.StripOffsets);
  const counts = fd.numbers(tiled ? TAG.TileByteCounts : TAG.StripByteCounts);
  const blockName = tiled ? 'tile' : 'strip';
  if (!offsets || !counts || offsets.length < across * down || counts.length < across * down) {
    throw new EngineError('corrupt_file', `the TIFF lists fewer ${blockName} positions than its ${across * down} ${blockName}s`);
  }

  // Deflate goes through geotiff's decoder (pako); LZW and PackBits have our own (see lzw.ts).
  const inflater = DEFLATE.includes(compression)
    ? await getDecoder(compression, { tileWidth: blockWidth, tileHeight: blockHeight, predictor: 1, bitsPerSample: [bits], planarConfiguration: 1 })
    : undefined;
  const fileOrder = new SampleConverter(kind, header.littleEndian);
  const takenAt = dateTimeToIso(fd.text(TAG.DateTime));
  const frameOf = (data: Float32Array): Frame => ({
    width,
    height,
    data,
    bitsPerSample: frameBitsOf(kind),
    sampleFormat: kind.format,
    fullScale: fullScaleOf(kind),
    format: header.bigTiff ? 'bigtiff' : 'tiff',
    pageCount,
    page,
    ...(takenAt ? { takenAt } : {}),
  });

  // The fast path, the usual camera file: uncompressed full-width strips lying one after the
  // other in the file are one run of samples, converted in a single native pass (a view over
  // the file's bytes, swapped first when the byte order differs from the host's).
  const sampleBytes = width * height * bytesPerSample;
  // A cut file goes the strip-by-strip way, which names the strip that runs past the end.
  if (compression === NONE && predictor === 1 && !tiled && contiguousStrips(offsets, counts, down, sampleBytes) && offsets[0] + sampleBytes <= bytes.length) {
    return frameOf(fileOrder.toFloat32(bytes, offsets[0], width * height));
  }

  const bigEndian = new SampleConverter(kind, false);
  const scratch = predictor === 3 ? new Uint8Array(blockWidth * bytesPerSample) : new Uint8Array(0);
  const data = new Float32Array(width * height);

  for (let by = 0; by < down; by++) {
    for (let bx = 0; bx < across; bx++) {
      const index = by * across + bx;
      const x0 = bx * blockWidth;
      const y0 = by * blockHeight;
      const cols = Math.min(blockWidth, width - x0);
      const rows = Math.min(blockHeight, height - y0);
      const needed = ((rows - 1) * blockWidth + cols) * bytesPerSample;
      const what = `${blockName} ${index} of the TIFF`;
      const offset = offsets[index];
      const count = counts[index];
      if (offset + count > bytes.length) {
        throw new EngineError('truncated_file', `${what} runs past the end of the file (to byte ${offset + count}, the file has ${bytes.length})`, {
          fileBytes: bytes.length,
        });
      }
      const stored = bytes.subarray(offset, offset + count);
      let block: Uint8Array;
      if (compression === NONE) {
        // The fast path: no decoder, the converter reads the file's bytes in place.
        block = predictor === 1 ? stored : stored.slice();
      } else if (compression === PACKBITS) {
        block = unpackBits(stored, blockWidth * blockHeight * bytesPerSample, what);
      } else if (compression === LZW) {
        block = decodeLzw(stored, blockWidth * blockHeight * bytesPerSample, what);
      } else {
        try {
          block = new Uint8Array(await inflater!.decodeBlock(stored.slice().buffer));
        } catch (err) {
          // pako throws bare strings, not Errors
          throw new EngineError('corrupt_file', `${what} could not be decompressed: ${err instanceof Error ? err.message : String(err)}`);
        }
      }
      if (block.length < needed) {
        throw new EngineError(
          compression === NONE ? 'truncated_file' : 'corrupt_file',
          `${what} holds ${block.length} bytes of samples where ${needed} are needed`,
          { index, bytes: block.length, needed },
        );
      }
      if (predictor === 2) undoHorizontalPredictor(block, rows, blockWidth, bytesPerSample, header.littleEndian);
      if (predictor === 3) undoFloatingPointPredictor(block, rows, blockWidth, bytesPerSample, scratch);
      const converter = predictor === 3 ? bigEndian : fileOrder;
      if (cols === blockWidth && x0 === 0 && cols === width) {
        converter.convert(block, 0, rows * cols, data, y0 * width);
      } else {
        for (let r = 0; r < rows; r++) converter.convert(block, r * blockWidth * bytesPerSample, cols, data, (y0 + r) * width + x0);
      }
    }
  }

  return frameOf(data);
}
