/**
 * Undoing the TIFF predictors ourselves (TIFF 6.0 section 14; Adobe Photoshop TIFF Technical Note 3
 * for the floating-point predictor), because geotiff 3.0.5 applies the horizontal predictor in the
 * host's byte order and so returns wrong pixels for big-endian files (see shared/STACK.md).
 * Both functions work in place on a decoded block that the caller owns (never on the input file).
 */

/**
 * Horizontal differencing (Predictor = 2), one sample per pixel: each sample was stored as the
 * difference from its left neighbour, modulo 2^bits, in the file's byte order.
 */
export function undoHorizontalPredictor(
  block: Uint8Array,
  rows: number,
  rowSamples: number,
  bytesPerSample: number,
  littleEndian: boolean,
): void {
  const rowBytes = rowSamples * bytesPerSample;
  for (let r = 0; r < rows; r++) {
    const start = r * rowBytes;
    const end = start + rowBytes;
    if (bytesPerSample === 1) {
      for (let p = start + 1; p < end; p++) block[p] = (block[p] + block[p - 1]) & 0xff;
    } else if (bytesPerSample === 2) {
      const lo = littleEndian ? 0 : 1;
      const hi = 1 - lo;
      let prev = block[start + lo] | (block[start + hi] << 8);
      for (let p = start + 2; p < end; p += 2) {
        const v = (prev + (block[p + lo] | (block[p + hi] << 8))) & 0xffff;
        block[p + lo] = v & 0xff;
        block[p + hi] = v >>> 8;
        prev = v;
      }
    } else if (bytesPerSample === 4) {
      const view = new DataView(block.buffer, block.byteOffset, block.byteLength);
      let prev = view.getUint32(start, littleEndian);
      for (let p = start + 4; p < end; p += 4) {
        const v = (prev + view.getUint32(p, littleEndian)) >>> 0;
        view.setUint32(p, v, littleEndian);
        prev = v;
      }
    } else {
      throw new Error(`horizontal predictor on ${bytesPerSample * 8}-bit samples`);
    }
  }
}

/**
 * Floating-point predictor (Predictor = 3): each row holds the samples' bytes split into planes,
 * most significant byte first, then byte-wise differenced. Undoing it yields each row's samples
 * as big-endian bytes whatever the file's byte order, so the caller must read the block as
 * big-endian. `scratch` must hold at least one row.
 */
export function undoFloatingPointPredictor(
  block: Uint8Array,
  rows: number,
  rowSamples: number,
  bytesPerSample: number,
  scratch: Uint8Array,
): void {
  const rowBytes = rowSamples * bytesPerSample;
  for (let r = 0; r < rows; r++) {
    const start = r * rowBytes;
    const end = start + rowBytes;
    for (let p = start + 1; p < end; p++) block[p] = (block[p] + block[p - 1]) & 0xff;
    scratch.set(block.subarray(start, end));
    for (let i = 0; i < rowSamples; i++) {
      for (let b = 0; b < bytesPerSample; b++) block[start + i * bytesPerSample + b] = scratch[b * rowSamples + i];
    }
  }
}
