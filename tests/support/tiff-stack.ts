/**
 * A multi-page TIFF for tests: baseline uncompressed little-endian uint16 greyscale, one strip
 * per page, IFDs chained by their next-IFD offsets (TIFF 6.0, sections 2 and 8). The project's
 * own encoder writes single pages; CLI tests of `--page` and dark stacks need several.
 */
import type { Frame } from '../../shared/engine/types.ts';

const SHORT = 3;
const LONG = 4;

export function encodeTiffStack(pages: readonly Frame[]): Uint8Array {
  if (pages.length === 0) throw new Error('encodeTiffStack needs at least one page');
  const { width, height } = pages[0];
  if (pages.some((p) => p.width !== width || p.height !== height)) throw new Error('encodeTiffStack: every page must have the same size');
  const imageBytes = width * height * 2;
  const entryCount = 10;
  const ifdBytes = 2 + entryCount * 12 + 4;
  const pageBytes = imageBytes + (imageBytes % 2) + ifdBytes;
  const bytes = new Uint8Array(8 + pages.length * pageBytes);
  const view = new DataView(bytes.buffer);
  bytes[0] = bytes[1] = 0x49;
  view.setUint16(2, 42, true);
  pages.forEach((page, k) => {
    const imageAt = 8 + k * pageBytes;
    const ifdAt = imageAt + imageBytes + (imageBytes % 2);
    if (k === 0) view.setUint32(4, ifdAt, true);
    for (let i = 0; i < page.data.length; i++) view.setUint16(imageAt + 2 * i, Math.min(65535, Math.max(0, Math.round(page.data[i]))), true);
    // Tags in ascending order, every value inline (one strip per page).
    const entries: [number, number, number][] = [
      [256, LONG, width],
      [257, LONG, height],
      [258, SHORT, 16],
      [259, SHORT, 1],
      [262, SHORT, 1],
      [273, LONG, imageAt],
      [277, SHORT, 1],
      [278, LONG, height],
      [279, LONG, imageBytes],
      [339, SHORT, 1],
    ];
    view.setUint16(ifdAt, entries.length, true);
    entries.forEach(([tag, type, value], e) => {
      const at = ifdAt + 2 + 12 * e;
      view.setUint16(at, tag, true);
      view.setUint16(at + 2, type, true);
      view.setUint32(at + 4, 1, true);
      if (type === SHORT) view.setUint16(at + 8, value, true);
      else view.setUint32(at + 8, value, true);
    });
    view.setUint32(ifdAt + 2 + 12 * entries.length, k + 1 < pages.length ? 8 + (k + 1) * pageBytes + imageBytes + (imageBytes % 2) : 0, true);
  });
  return bytes;
}
