import { EngineError } from '../errors.ts';
import { checkPageCount, type ResolvedFrameLimits } from './limits.ts';

/** What the 8- or 16-byte TIFF header says (TIFF 6.0 section 2; BigTIFF: Adobe/Aware proposal). */
export interface TiffHeader {
  littleEndian: boolean;
  bigTiff: boolean;
  firstIfdOffset: number;
}

/** True when the bytes start like a classic TIFF or a BigTIFF, in either byte order. */
export function looksLikeTiff(bytes: Uint8Array): boolean {
  if (bytes.length < 4) return false;
  const ii = bytes[0] === 0x49 && bytes[1] === 0x49 && bytes[3] === 0;
  const mm = bytes[0] === 0x4d && bytes[1] === 0x4d && bytes[2] === 0;
  const magic = ii ? bytes[2] : mm ? bytes[3] : -1;
  return magic === 42 || magic === 43;
}

function view(bytes: Uint8Array): DataView {
  return new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
}

function readOffset(dv: DataView, at: number, bigTiff: boolean, le: boolean): number {
  if (!bigTiff) return dv.getUint32(at, le);
  const v = dv.getBigUint64(at, le);
  // Offsets past 2^53 cannot index any file we can hold; treat them as damage, not as numbers.
  if (v > BigInt(Number.MAX_SAFE_INTEGER)) {
    throw new EngineError('corrupt_file', `the BigTIFF holds an impossible offset (${v})`);
  }
  return Number(v);
}

/** Reads and checks the header. The caller has already seen the magic bytes. */
export function readTiffHeader(bytes: Uint8Array): TiffHeader {
  const le = bytes[0] === 0x49;
  const dv = view(bytes);
  if (bytes.length < 8) throw new EngineError('truncated_file', `the TIFF ends inside its ${bytes.length}-byte header`);
  const bigTiff = dv.getUint16(2, le) === 43;
  if (bigTiff) {
    if (bytes.length < 16) throw new EngineError('truncated_file', 'the BigTIFF ends inside its 16-byte header');
    if (dv.getUint16(4, le) !== 8 || dv.getUint16(6, le) !== 0) {
      throw new EngineError('corrupt_file', 'the BigTIFF header does not declare 8-byte offsets');
    }
  }
  return { littleEndian: le, bigTiff, firstIfdOffset: readOffset(dv, bigTiff ? 8 : 4, bigTiff, le) };
}

/** Bytes per value of each TIFF field type (TIFF 6.0 section 2; BigTIFF adds 16-18). */
const FIELD_TYPE_BYTES: Record<number, number> = { 1: 1, 2: 1, 3: 2, 4: 4, 5: 8, 6: 1, 7: 1, 8: 2, 9: 4, 10: 8, 11: 4, 12: 8, 13: 4, 16: 8, 17: 8, 18: 8 };

/**
 * Checks that every tag's out-of-line values lie inside the file, so that a tag claiming a
 * billion strip offsets is refused here instead of making geotiff allocate for them.
 */
function checkEntries(bytes: Uint8Array, dv: DataView, first: number, entries: number, header: TiffHeader, page: number): void {
  const { littleEndian: le, bigTiff } = header;
  const entrySize = bigTiff ? 20 : 12;
  const inline = bigTiff ? 8 : 4;
  for (let i = 0; i < entries; i++) {
    const at = first + i * entrySize;
    const tag = dv.getUint16(at, le);
    const size = FIELD_TYPE_BYTES[dv.getUint16(at + 2, le)];
    if (size === undefined) continue; // unknown types are skipped, as readers must (TIFF 6.0 section 2)
    const count = bigTiff ? Number(dv.getBigUint64(at + 4, le)) : dv.getUint32(at + 4, le);
    const length = size * count;
    if (length <= inline) continue;
    const valueOffset = readOffset(dv, at + 4 + (bigTiff ? 8 : 4), bigTiff, le);
    if (valueOffset + length > bytes.length) {
      throw new EngineError(
        length > bytes.length ? 'corrupt_file' : 'truncated_file',
        `tag ${tag} of page ${page} of the TIFF claims ${count} values at bytes ${valueOffset}-${valueOffset + length}, past the file's ${bytes.length} bytes`,
        { tag, fileBytes: bytes.length },
      );
    }
  }
}

/**
 * Walks the chain of image file directories and counts pages, checking every directory lies
 * inside the file and the chain neither loops nor grows past `limits.maxPages`. geotiff's own
 * count follows a looping chain for ever, so the walk is done here, before geotiff sees the file.
 */
export function walkTiffPages(bytes: Uint8Array, header: TiffHeader, limits: ResolvedFrameLimits): number[] {
  const { littleEndian: le, bigTiff } = header;
  const dv = view(bytes);
  const countSize = bigTiff ? 8 : 2;
  const entrySize = bigTiff ? 20 : 12;
  const seen = new Set<number>();
  let offset = header.firstIfdOffset;
  let pages = 0;
  const starts: number[] = [];
  if (offset === 0) throw new EngineError('corrupt_file', 'the TIFF holds no image (its first directory offset is 0)');
  while (offset !== 0) {
    if (seen.has(offset)) {
      throw new EngineError('corrupt_file', `the TIFF's chain of pages loops back to byte ${offset}`, { offset });
    }
    seen.add(offset);
    if (offset < (bigTiff ? 16 : 8) || offset + countSize > bytes.length) {
      throw new EngineError(
        offset >= bytes.length ? 'truncated_file' : 'corrupt_file',
        `page ${pages} of the TIFF should start at byte ${offset}, outside the file's ${bytes.length} bytes`,
        { offset, fileBytes: bytes.length },
      );
    }
    const entries = bigTiff ? Number(dv.getBigUint64(offset, le)) : dv.getUint16(offset, le);
    const end = offset + countSize + entries * entrySize + (bigTiff ? 8 : 4);
    if (entries === 0) throw new EngineError('corrupt_file', `page ${pages} of the TIFF has an empty tag directory`);
    if (end > bytes.length) {
      throw new EngineError('truncated_file', `the TIFF ends inside the tag directory of page ${pages} (needs ${end} bytes, has ${bytes.length})`, {
        fileBytes: bytes.length,
      });
    }
    checkEntries(bytes, dv, offset + countSize, entries, header, pages);
    starts.push(offset);
    pages++;
    checkPageCount(pages, limits, 'the TIFF');
    offset = readOffset(dv, end - (bigTiff ? 8 : 4), bigTiff, le);
  }
  return starts;
}

/** One entry of a tag directory: its type, count and where its values are. */
interface TagEntry {
  type: number;
  count: number;
  /** Byte offset of the first value (inside the entry when the values fit there). */
  at: number;
}

/**
 * The tags of one page, read straight from the file in its byte order. (geotiff 3.0.5 reads large
 * out-of-line arrays such as StripOffsets as little-endian whatever the file says, so a
 * big-endian file with many strips gets wrong offsets there; this reader has no such path.)
 * Call after {@link walkTiffPages}, which has checked every value lies inside the file.
 */
export class TiffDirectory {
  private readonly entries = new Map<number, TagEntry>();
  private readonly dv: DataView;

  constructor(
    private readonly bytes: Uint8Array,
    private readonly header: TiffHeader,
    offset: number,
  ) {
    const { littleEndian: le, bigTiff } = header;
    this.dv = view(bytes);
    const count = bigTiff ? Number(this.dv.getBigUint64(offset, le)) : this.dv.getUint16(offset, le);
    const entrySize = bigTiff ? 20 : 12;
    for (let i = 0; i < count; i++) {
      const e = offset + (bigTiff ? 8 : 2) + i * entrySize;
      const tag = this.dv.getUint16(e, le);
      const type = this.dv.getUint16(e + 2, le);
      const n = bigTiff ? Number(this.dv.getBigUint64(e + 4, le)) : this.dv.getUint32(e + 4, le);
      const size = FIELD_TYPE_BYTES[type] ?? 0;
      const valueField = e + (bigTiff ? 12 : 8);
      const at = size * n <= (bigTiff ? 8 : 4) ? valueField : readOffset(this.dv, valueField, bigTiff, le);
      if (!this.entries.has(tag)) this.entries.set(tag, { type, count: n, at });
    }
  }

  has(tag: number): boolean {
    return this.entries.has(tag);
  }

  /** Integer values of a tag (BYTE, SHORT, LONG, LONG8 and their signed kinds); undefined if absent. */
  numbers(tag: number): number[] | undefined {
    const e = this.entries.get(tag);
    if (!e) return undefined;
    const read = this.reader(tag, e);
    const size = FIELD_TYPE_BYTES[e.type];
    const out = new Array<number>(e.count);
    for (let i = 0; i < e.count; i++) out[i] = read(e.at + i * size);
    return out;
  }

  /** The first integer value of a tag; undefined if absent. */
  number(tag: number): number | undefined {
    const e = this.entries.get(tag);
    return e && e.count > 0 ? this.reader(tag, e)(e.at) : undefined;
  }

  private reader(tag: number, e: TagEntry): (at: number) => number {
    const le = this.header.littleEndian;
    const dv = this.dv;
    switch (e.type) {
      case 1:
        return (at) => dv.getUint8(at);
      case 3:
        return (at) => dv.getUint16(at, le);
      case 4:
        return (at) => dv.getUint32(at, le);
      case 6:
        return (at) => dv.getInt8(at);
      case 8:
        return (at) => dv.getInt16(at, le);
      case 9:
        return (at) => dv.getInt32(at, le);
      case 16:
        return (at) => Number(dv.getBigUint64(at, le));
      case 17:
        return (at) => Number(dv.getBigInt64(at, le));
      default:
        throw new EngineError('corrupt_file', `tag ${tag} of the TIFF has type ${e.type} where an integer is needed`);
    }
  }

  /** An ASCII tag's text up to its first NUL; undefined if absent or not ASCII. */
  text(tag: number): string | undefined {
    const e = this.entries.get(tag);
    if (!e || e.type !== 2) return undefined;
    const raw = this.bytes.subarray(e.at, e.at + e.count);
    const nul = raw.indexOf(0);
    return String.fromCharCode(...(nul >= 0 ? raw.subarray(0, nul) : raw));
  }
}
