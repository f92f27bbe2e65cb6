/**
 * Decoding uploads with the engine before anything is stored: every page of every file must
 * decode, or the whole upload is refused with the engine's message (HTTP 400/413/415, `bad_frame`).
 */
import { createHash } from 'node:crypto';
import { decodeFrame } from '../../../shared/engine/frames/index.ts';
import { EngineError, type EngineErrorCode } from '../../../shared/engine/errors.ts';
import type { Frame as EngineFrame } from '../../../shared/engine/types.ts';
import type { FrameFormat } from '../../../shared/api/frames.ts';
import { HttpError } from '../../lib/errors.ts';

/** What one page of an uploaded file is, as the engine read it. */
export interface DecodedPage {
  page: number;
  pageCount: number;
  format: FrameFormat;
  width: number;
  height: number;
  sampleFormat: EngineFrame['sampleFormat'];
  bitsPerSample: number;
  /** From the file's tags (TIFF DateTime, FITS DATE-OBS), as a Date; undefined when absent. */
  takenAt?: Date;
  exposureS?: number;
}

export interface DecodedFile {
  originalName: string;
  bytes: Uint8Array;
  sha256: string;
  pages: DecodedPage[];
}

const STATUS_OF: Partial<Record<EngineErrorCode, number>> = { too_large: 413, unsupported_format: 415 };

/** The HTTP error for an engine refusal: the engine's message, prefixed with the file's name. */
export function badFrameError(name: string, error: EngineError): HttpError {
  return new HttpError(STATUS_OF[error.code] ?? 400, 'bad_frame', `${name}: ${error.message}`, { file: name, engineCode: error.code });
}

/**
 * A tag time as a Date. TIFF DateTime carries no zone; the engine gives "YYYY-MM-DDTHH:MM:SS" and
 * we read it as UTC (what our simulator and most acquisition software that stamps UTC write).
 */
function tagTime(iso: string | undefined): Date | undefined {
  if (!iso) return undefined;
  const zoned = /(Z|[+-]\d{2}:\d{2})$/.test(iso) ? iso : `${iso}Z`;
  const date = new Date(zoned);
  return Number.isNaN(date.getTime()) ? undefined : date;
}

function describe(frame: EngineFrame): DecodedPage {
  return {
    page: frame.page,
    pageCount: frame.pageCount,
    format: frame.format === 'bigtiff' ? 'tiff' : frame.format,
    width: frame.width,
    height: frame.height,
    sampleFormat: frame.sampleFormat,
    bitsPerSample: Math.abs(frame.bitsPerSample),
    takenAt: tagTime(frame.takenAt),
    ...(frame.exposureS !== undefined && Number.isFinite(frame.exposureS) ? { exposureS: frame.exposureS } : {}),
  };
}

/** Decodes every page of one file (page data is dropped after each page); throws `bad_frame`. */
export async function decodeUpload(originalName: string, bytes: Uint8Array): Promise<DecodedFile> {
  const sha256 = createHash('sha256').update(bytes).digest('hex');
  const pages: DecodedPage[] = [];
  try {
    const first = await decodeFrame(bytes, { page: 0 });
    pages.push(describe(first));
    for (let page = 1; page < first.pageCount; page++) pages.push(describe(await decodeFrame(bytes, { page })));
  } catch (error) {
    if (error instanceof EngineError) throw badFrameError(originalName, error);
    throw error;
  }
  return { originalName, bytes, sha256, pages };
}
