import { EngineError } from '../errors.ts';

/** Ceilings checked against a file's header before any pixel buffer is allocated. */
export interface FrameLimits {
  /**
   * Largest width × height accepted.
   * @default 67108864 (64 Mpx)
   */
  maxPixels?: number;
  /**
   * Largest number of pages (TIFF IFDs, FITS planes) a file may declare.
   * @default 4096
   */
  maxPages?: number;
  /**
   * Largest size of the decoded sample data of the chosen page, in bytes.
   * @default 536870912 (512 MiB: 64 Mpx of 64-bit samples)
   */
  maxDecompressedBytes?: number;
  /**
   * Largest width or height on its own, so a 1 × 60-million "frame" is refused too.
   * @default 65536
   */
  maxSidePx?: number;
}

/** The limits with every default filled in. */
export type ResolvedFrameLimits = Required<FrameLimits>;

export const DEFAULT_FRAME_LIMITS: ResolvedFrameLimits = Object.freeze({
  maxPixels: 64 * 1024 * 1024,
  maxPages: 4096,
  maxDecompressedBytes: 512 * 1024 * 1024,
  maxSidePx: 65536,
});

/** Fills defaults and checks the caller's limits once, in one place. */
export function resolveLimits(limits: FrameLimits | undefined): ResolvedFrameLimits {
  const out = { ...DEFAULT_FRAME_LIMITS, ...(limits ?? {}) };
  for (const [key, value] of Object.entries(out)) {
    if (!Number.isFinite(value) || value < 1) {
      throw new EngineError('invalid_input', `frame limit ${key} must be a positive number, got ${String(value)}`);
    }
  }
  return out;
}

/**
 * Refuses a frame whose declared size is absurd or over the limits. Called with header values,
 * before the output is allocated, so a 100000 × 100000 header costs nothing.
 */
export function checkFrameSize(
  width: number,
  height: number,
  bytesPerSample: number,
  limits: ResolvedFrameLimits,
  what: string,
): void {
  if (!Number.isInteger(width) || !Number.isInteger(height) || width < 1 || height < 1) {
    throw new EngineError('invalid_frame', `${what} declares an image of ${width} x ${height} pixels; both sides must be at least 1`, {
      width,
      height,
    });
  }
  const pixels = width * height;
  if (width > limits.maxSidePx || height > limits.maxSidePx || pixels > limits.maxPixels) {
    throw new EngineError(
      'too_large',
      `${what} declares ${width} x ${height} = ${pixels} pixels; the limit is ${limits.maxPixels} pixels and ${limits.maxSidePx} a side`,
      { width, height, maxPixels: limits.maxPixels },
    );
  }
  const bytes = pixels * bytesPerSample;
  if (bytes > limits.maxDecompressedBytes) {
    throw new EngineError(
      'too_large',
      `${what} needs ${bytes} bytes of decoded samples; the limit is ${limits.maxDecompressedBytes} bytes`,
      { bytes, maxDecompressedBytes: limits.maxDecompressedBytes },
    );
  }
}

/** Refuses a file declaring more pages than allowed. */
export function checkPageCount(pageCount: number, limits: ResolvedFrameLimits, what: string): void {
  if (pageCount > limits.maxPages) {
    throw new EngineError('too_large', `${what} has more than ${limits.maxPages} pages`, { maxPages: limits.maxPages });
  }
}

/** Checks the requested page exists; pages are 0-based. */
export function checkPage(page: number, pageCount: number, what: string): void {
  if (!Number.isInteger(page) || page < 0 || page >= pageCount) {
    throw new EngineError(
      'invalid_frame',
      `page ${page} does not exist: ${what} has ${pageCount} page${pageCount === 1 ? '' : 's'} (0-${pageCount - 1})`,
      { page, pageCount },
    );
  }
}
