import { describe, expect, it } from 'vitest';
import { EngineError } from '../../../shared/engine/errors.ts';
import { decodeFrame } from '../../../shared/engine/frames/index.ts';
import { readFixture } from './fixtures.ts';

// The exact codes and messages of every refusal. Bad files come from tests/fixtures/frames
// (bad-*, see make-fixtures.py) or are cut / damaged copies of the good fixtures made here.

async function failure(bytes: Uint8Array, options?: Parameters<typeof decodeFrame>[1]): Promise<EngineError> {
  try {
    await decodeFrame(bytes, options);
  } catch (err) {
    expect(err).toBeInstanceOf(EngineError);
    return err as EngineError;
  }
  throw new Error('decodeFrame accepted a file it should refuse');
}

async function expectRefusal(bytes: Uint8Array, code: string, message: string, options?: Parameters<typeof decodeFrame>[1]): Promise<void> {
  const err = await failure(bytes, options);
  expect({ code: err.code, message: err.message }).toEqual({ code, message });
}

/** An 80-column FITS card, padded (FITS Standard 4.0 section 4.1). */
function fitsCard(text: string): string {
  return text.padEnd(80);
}
function fitsFile(cards: string[], dataBytes = 0): Uint8Array {
  const header = [...cards, 'END'].map(fitsCard).join('');
  const out = new Uint8Array(Math.ceil(header.length / 2880) * 2880 + Math.ceil(dataBytes / 2880) * 2880).fill(32);
  for (let i = 0; i < header.length; i++) out[i] = header.charCodeAt(i);
  out.fill(0, Math.ceil(header.length / 2880) * 2880);
  return out;
}

/** Offset of a tag's entry in the first IFD of a little-endian classic TIFF (TIFF 6.0 section 2). */
function entryOffset(bytes: Uint8Array, tag: number): number {
  const dv = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const ifd = dv.getUint32(4, true);
  for (let i = 0; i < dv.getUint16(ifd, true); i++) {
    if (dv.getUint16(ifd + 2 + i * 12, true) === tag) return ifd + 2 + i * 12;
  }
  throw new Error(`tag ${tag} not found`);
}

describe('wrong type', () => {
  it('empty file', () => expectRefusal(new Uint8Array(0), 'truncated_file', 'the file is empty (0 bytes)'));
  it('text file', () =>
    expectRefusal(readFixture('bad-notes.txt'), 'unsupported_format', 'the file is text, not an image; frames are read from TIFF, BigTIFF, greyscale PNG and FITS'));
  it('JPEG photo', () =>
    expectRefusal(
      readFixture('bad-photo.jpg'),
      'unsupported_format',
      'the file is a JPEG image (lossy, 8-bit: save camera frames as TIFF, PNG or FITS instead); frames are read from TIFF, BigTIFF, greyscale PNG and FITS',
    ));
  it('binary junk', () =>
    expectRefusal(new Uint8Array([0, 1, 2, 3, 250, 251, 252, 253, 9]), 'unsupported_format', 'the file is not an image we know (it starts with bytes 00 01 02 03 fa fb fc fd); frames are read from TIFF, BigTIFF, greyscale PNG and FITS'));
  it('not a Uint8Array', () => expectRefusal('II*' as unknown as Uint8Array, 'invalid_input', 'decodeFrame needs the file as a Uint8Array'));
});

describe('unsupported content', () => {
  it('RGB TIFF', () =>
    expectRefusal(readFixture('bad-rgb.tif'), 'unsupported_format', 'the TIFF has 3 samples per pixel (RGB); only single-channel (greyscale) frames are read'));
  it('64-bit integer TIFF', () =>
    expectRefusal(readFixture('bad-int64.tif'), 'unsupported_format', 'the TIFF holds 64-bit signed integer samples; only 8, 16 and 32 bits are read'));
  it('JPEG-compressed TIFF', () =>
    expectRefusal(readFixture('bad-jpeg-compressed.tif'), 'unsupported_format', 'the TIFF is compressed with JPEG; only uncompressed, LZW, deflate and PackBits are read'));
  it('RGB PNG', () => expectRefusal(readFixture('bad-rgb.png'), 'unsupported_format', 'the PNG is RGB; only single-channel greyscale frames are read'));
  it('FITS with 64-bit integers', () =>
    expectRefusal(
      fitsFile(['SIMPLE  =                    T', 'BITPIX  =                   64', 'NAXIS   =                    2', 'NAXIS1  =                    4', 'NAXIS2  =                    4'], 128),
      'unsupported_format',
      'the FITS image holds 64-bit integers (BITPIX = 64); only 8, 16, 32, -32 and -64 are read',
    ));
  it('FITS with no image', () =>
    expectRefusal(fitsFile(['SIMPLE  =                    T', 'BITPIX  =                   16', 'NAXIS   =                    0']), 'invalid_frame', 'the FITS primary HDU holds no image (NAXIS = 0)'));
  it('FITS with an illegal BITPIX', () =>
    expectRefusal(
      fitsFile(['SIMPLE  =                    T', 'BITPIX  =                   12', 'NAXIS   =                    2', 'NAXIS1  =                    4', 'NAXIS2  =                    4'], 32),
      'corrupt_file',
      'the FITS header has BITPIX = 12, which the standard does not allow',
    ));
});

describe('absurd sizes and limits, refused before allocating', () => {
  it('TIFF header claiming 100000 x 100000', () =>
    expectRefusal(readFixture('bad-huge.tif'), 'too_large', 'the TIFF declares 100000 x 100000 = 10000000000 pixels; the limit is 67108864 pixels and 65536 a side'));
  it('FITS header claiming 100000 x 100000', () =>
    expectRefusal(readFixture('bad-huge.fits'), 'too_large', 'the FITS image declares 100000 x 100000 = 10000000000 pixels; the limit is 67108864 pixels and 65536 a side'));
  it('caller limit on pixels', () =>
    expectRefusal(readFixture('tifffile-u16-le.tif'), 'too_large', 'the TIFF declares 37 x 23 = 851 pixels; the limit is 850 pixels and 65536 a side', { limits: { maxPixels: 850 } }));
  it('caller limit on decoded bytes', () =>
    expectRefusal(readFixture('magick-u16.png'), 'too_large', 'the PNG needs 1702 bytes of decoded samples; the limit is 1701 bytes', { limits: { maxDecompressedBytes: 1701 } }));
  it('caller limit on pages', () =>
    expectRefusal(readFixture('tifffile-u16-3pages-le.tif'), 'too_large', 'the TIFF has more than 2 pages', { limits: { maxPages: 2 } }));
  it('a zero-width FITS image', () =>
    expectRefusal(
      fitsFile(['SIMPLE  =                    T', 'BITPIX  =                   16', 'NAXIS   =                    2', 'NAXIS1  =                    0', 'NAXIS2  =                    4']),
      'invalid_frame',
      'the FITS image declares an image of 0 x 4 pixels; both sides must be at least 1',
    ));
  it('a tag claiming a billion strip offsets', async () => {
    const bytes = readFixture('tifffile-u16-le.tif').slice();
    new DataView(bytes.buffer).setUint32(entryOffset(bytes, 273) + 4, 1e9, true);
    await expectRefusal(bytes, 'corrupt_file', `tag 273 of page 0 of the TIFF claims 1000000000 values at bytes ${new DataView(bytes.buffer).getUint32(entryOffset(bytes, 273) + 8, true)}-${new DataView(bytes.buffer).getUint32(entryOffset(bytes, 273) + 8, true) + 4e9}, past the file's ${bytes.length} bytes`);
  });
  it('bad limits', () => expectRefusal(readFixture('magick-u8.png'), 'invalid_input', 'frame limit maxPixels must be a positive number, got -1', { limits: { maxPixels: -1 } }));
});

describe('pages', () => {
  it('TIFF page past the end', () => expectRefusal(readFixture('tifffile-u16-3pages-le.tif'), 'invalid_frame', 'page 3 does not exist: the TIFF has 3 pages (0-2)', { page: 3 }));
  it('negative page', () => expectRefusal(readFixture('tifffile-u16-le.tif'), 'invalid_frame', 'page -1 does not exist: the TIFF has 1 page (0-0)', { page: -1 }));
  it('fractional page', () => expectRefusal(readFixture('hand-u16-cube.fits'), 'invalid_frame', 'page 0.5 does not exist: the FITS image has 2 pages (0-1)', { page: 0.5 }));
  it('PNG has one page', () => expectRefusal(readFixture('magick-u8.png'), 'invalid_frame', 'page 1 does not exist: the PNG has 1 page (0-0)', { page: 1 }));
  it('a page chain that loops', () => expectRefusal(readFixture('bad-ifd-loop.tif'), 'corrupt_file', "the TIFF's chain of pages loops back to byte 8"));
});

describe('truncated', () => {
  const tif = readFixture('tifffile-u16-le.tif');
  it('inside the signature', () => expectRefusal(tif.subarray(0, 3), 'truncated_file', 'the file stops after 3 bytes, inside its signature'));
  it('inside the TIFF header', () => expectRefusal(tif.subarray(0, 5), 'truncated_file', 'the TIFF ends inside its 5-byte header'));
  it('inside the tag directory', () =>
    expectRefusal(tif.subarray(0, 30), 'truncated_file', 'the TIFF ends inside the tag directory of page 0 (needs 170 bytes, has 30)'));
  it('inside the strips', () =>
    expectRefusal(tif.subarray(0, 900), 'truncated_file', 'strip 1 of the TIFF runs past the end of the file (to byte 980, the file has 900)'));
  it('LZW TIFF whose directory sits at the end', () =>
    expectRefusal(readFixture('tiffcp-u16-lzw-le.tif').subarray(0, 1500), 'truncated_file', "page 0 of the TIFF should start at byte 2014, outside the file's 1500 bytes"));
  it('PNG cut in its image data', async () => {
    const err = await failure(readFixture('magick-u16.png').subarray(0, 800));
    expect(err.code).toBe('truncated_file');
    expect(err.message).toMatch(/^the PNG is cut short \(no IEND chunk at its end; the decoder said: .+\)$/);
  });
  it('PNG cut in its header', () => expectRefusal(readFixture('magick-u16.png').subarray(0, 20), 'truncated_file', 'the PNG ends inside its header (20 bytes)'));
  it('FITS cut in its data', () => expectRefusal(readFixture('hand-i16.fits').subarray(0, 3000), 'truncated_file', 'the FITS data of plane 0 ends at byte 4582, the file has 3000'));
  it('FITS cut in its header', () => expectRefusal(readFixture('hand-i16.fits').subarray(0, 400), 'truncated_file', "the FITS header has no END card in the file's 400 bytes"));
  it('every cut of a small TIFF, PNG and FITS fails cleanly or decodes the same pixels', async () => {
    // Truncation anywhere must give an EngineError, never a crash or a hang. Cuts that leave all
    // sample data (e.g. trailing padding) may still decode; then the pixels must be the full file's.
    for (const name of ['tiffcp-u16-lzwpred-be.tif', 'tifffile-u16-tiled-be.tif', 'magick-u8.png', 'hand-u8.fits']) {
      const whole = readFixture(name);
      const full = await decodeFrame(whole);
      for (let cut = 0; cut < whole.length; cut += 97) {
        try {
          const frame = await decodeFrame(whole.subarray(0, cut));
          expect(Buffer.from(frame.data.buffer).equals(Buffer.from(full.data.buffer)), `${name} cut at ${cut}`).toBe(true);
        } catch (err) {
          expect(err, `${name} cut at ${cut}`).toBeInstanceOf(EngineError);
        }
      }
    }
  });
});

describe('corrupt', () => {
  it('deflate strip with damaged bytes fails its checksum', async () => {
    const bytes = readFixture('tiffcp-u16-zip-le.tif').slice();
    for (let i = 200; i < 1200; i += 7) bytes[i] ^= 0x5a;
    await expectRefusal(bytes, 'corrupt_file', 'strip 0 of the TIFF could not be decompressed: incorrect data check');
  });
  it('PNG with a damaged byte fails its CRC', async () => {
    const bytes = readFixture('magick-u16.png').slice();
    bytes[300] ^= 0xff;
    const err = await failure(bytes);
    expect(err.code).toBe('corrupt_file');
    expect(err.message).toMatch(/^the PNG could not be decoded: CRC mismatch for chunk IDAT/);
  });
  it('PackBits that overflows its strip', async () => {
    const bytes = readFixture('tiffcp-u16-packbits-le.tif').slice();
    for (let i = 8; i < 500; i += 3) bytes[i] = 0x81;
    await expectRefusal(bytes, 'corrupt_file', 'strip 0 of the TIFF: PackBits data unpacks to more bytes than the strip holds');
  });
  it('LZW strip that is not LZW', async () => {
    const bytes = readFixture('tiffcp-u16-lzw-le.tif').slice();
    bytes.fill(0xff, 8, 300); // code 511 straight after the start: no such dictionary entry
    await expectRefusal(bytes, 'corrupt_file', 'strip 0 of the TIFF: LZW data starts with code 511, which is not yet defined');
  });
  it('LZW strip cut short inside a file that is otherwise whole', async () => {
    // StripByteCounts shortened to 20 bytes: the codes end early, too few samples come out.
    const bytes = readFixture('tiffcp-u16-lzw-le.tif').slice();
    const dv = new DataView(bytes.buffer);
    const entry = entryOffset(bytes, 279);
    const countsAt = dv.getUint32(entry + 4, true) === 1 ? entry + 8 : dv.getUint32(entry + 8, true);
    dv.setUint32(countsAt, 20, true);
    const err = await failure(bytes);
    expect(err.code).toBe('corrupt_file');
    expect(err.message).toMatch(/^strip 0 of the TIFF holds \d+ bytes of samples where \d+ are needed$/);
  });
  it('TIFF whose first directory offset is 0', () =>
    expectRefusal(new Uint8Array([0x49, 0x49, 42, 0, 0, 0, 0, 0]), 'corrupt_file', 'the TIFF holds no image (its first directory offset is 0)'));
  it('random bytes behind a TIFF signature', async () => {
    // A fixed xorshift sequence (so a failure is reproducible): every result must be an EngineError.
    let s = 2463534242;
    for (let trial = 0; trial < 200; trial++) {
      const bytes = new Uint8Array(64 + (trial % 50) * 13);
      for (let i = 0; i < bytes.length; i++) {
        s ^= s << 13;
        s ^= s >>> 17;
        s ^= s << 5;
        bytes[i] = s & 0xff;
      }
      bytes.set(trial % 2 ? [0x49, 0x49, 42, 0, 8, 0, 0, 0] : [0x4d, 0x4d, 0, 42, 0, 0, 0, 8]);
      await decodeFrame(bytes).then(
        () => undefined,
        (err: unknown) => expect(err).toBeInstanceOf(EngineError),
      );
    }
  });
});
