/**
 * Frames: upload metadata, list query, edits, and the Frame as the API returns it.
 * Upload (`POST /api/instruments/:id/frames`) is multipart: every metadata field arrives as text,
 * so `uploadFieldsSchema` coerces; PATCH and bulk-update take JSON (`frameMetadataSchema`).
 */
import { z } from 'zod';

export const frameKinds = ['signal', 'dark'] as const;
export type FrameKind = (typeof frameKinds)[number];
export const frameFormats = ['tiff', 'png', 'fits'] as const;
export type FrameFormat = (typeof frameFormats)[number];
export const takenAtSources = ['file', 'entered', 'upload'] as const;
export type TakenAtSource = (typeof takenAtSources)[number];
export const parities = ['odd', 'all'] as const;
export type FrameParity = (typeof parities)[number];

const band = z
  .object({
    start: z.number({ error: 'start must be a pixel number' }).int({ message: 'start must be a whole pixel' }).nonnegative({ message: 'start must be ≥ 0' }),
    end: z.number({ error: 'end must be a pixel number' }).int({ message: 'end must be a whole pixel' }).positive({ message: 'end must be > 0' }),
  })
  .refine((b) => b.end > b.start, { message: 'end must be greater than start' });

/** Signal band, background bands (spatial axis, [start, end) pixels) and line tilt/curvature. */
export const regionsSchema = z.object({
  signal: band,
  background: z.array(band).max(8, { message: 'at most 8 background bands' }).default([]),
  lineShape: z
    .object({
      tiltPxPerPx: z.number({ error: 'tiltPxPerPx must be a number' }).min(-5).max(5),
      curvaturePxPerPx2: z.number({ error: 'curvaturePxPerPx2 must be a number' }).min(-1).max(1),
    })
    .optional(),
});
export type Regions = z.infer<typeof regionsSchema>;
export type RegionsInput = z.input<typeof regionsSchema>;

const text = (label: string, max: number) => z.string({ error: `${label} must be text` }).trim().max(max, { message: `${label} must be at most ${max} characters` });
const isoTime = z.iso.datetime({ offset: true, error: 'takenAt must be an ISO 8601 time, e.g. 2026-11-30T14:05:00Z' });
const positive = (label: string) => z.number({ error: `${label} must be a number` }).positive({ message: `${label} must be positive` });
const nonNegative = (label: string) => z.number({ error: `${label} must be a number` }).nonnegative({ message: `${label} must be ≥ 0` });
const list = z.array(z.string().trim().min(1).max(100)).max(50);

/** Metadata a person may set (upload fields, PATCH, bulk update). Null clears a field. */
export const frameMetadataSchema = z.object({
  takenAt: isoTime.optional(),
  kind: z.enum(frameKinds, { error: 'kind must be "signal" or "dark"' }).optional(),
  exposureS: positive('exposureS').max(1e6).nullable().optional(),
  accumulations: z.number({ error: 'accumulations must be a number' }).int({ message: 'accumulations must be a whole number' }).min(1, { message: 'accumulations must be ≥ 1' }).nullable().optional(),
  target: text('target', 200).nullable().optional(),
  pressureMbar: nonNegative('pressureMbar').max(1e5).nullable().optional(),
  filters: list.optional(),
  driverNm: positive('driverNm').max(100_000).nullable().optional(),
  parity: z.enum(parities, { error: 'parity must be "odd" or "all"' }).nullable().optional(),
  scanVariable: text('scanVariable', 200).nullable().optional(),
  scanValue: z.number({ error: 'scanValue must be a number' }).nullable().optional(),
  tags: list.optional(),
  notes: text('notes', 10_000).optional(),
});
export type FrameMetadataInput = z.input<typeof frameMetadataSchema>;
export type FrameMetadata = z.output<typeof frameMetadataSchema>;

/** PATCH /api/frames/:frameId — metadata and/or regions (null removes the frame's own regions). */
export const updateFrameSchema = frameMetadataSchema.extend({ regions: regionsSchema.nullable().optional() });
export type UpdateFrameInput = z.input<typeof updateFrameSchema>;

/** POST /api/frames/bulk-update */
export const bulkUpdateFramesSchema = z.object({
  ids: z.array(z.uuid({ error: 'ids must be frame UUIDs' })).min(1, { message: 'ids must name at least one frame' }).max(1000),
  set: frameMetadataSchema.refine((s) => Object.keys(s).length > 0, { message: 'set must change at least one field' }),
});
export type BulkUpdateFramesInput = z.input<typeof bulkUpdateFramesSchema>;
export interface BulkUpdateFramesResponse {
  updated: number;
}

// Multipart text → typed values; an empty field counts as absent.
const blankToUndefined = (v: unknown) => (typeof v === 'string' && v.trim() === '' ? undefined : v);
const num = (label: string) => z.preprocess(blankToUndefined, z.coerce.number({ error: `${label} must be a number` }).optional());
const csv = z.preprocess(
  (v) => (typeof v === 'string' ? v.split(',').map((s) => s.trim()).filter(Boolean) : v),
  list.optional(),
);

/** The text fields of the multipart upload, coerced. Unknown fields are ignored. */
export const uploadFieldsSchema = z.object({
  takenAt: z.preprocess(blankToUndefined, isoTime.optional()),
  kind: z.preprocess(blankToUndefined, z.enum(frameKinds, { error: 'kind must be "signal" or "dark"' }).default('signal')),
  exposureS: num('exposureS').pipe(positive('exposureS').optional()),
  accumulations: num('accumulations').pipe(z.number().int({ message: 'accumulations must be a whole number' }).min(1, { message: 'accumulations must be ≥ 1' }).optional()),
  target: z.preprocess(blankToUndefined, text('target', 200).optional()),
  pressureMbar: num('pressureMbar').pipe(nonNegative('pressureMbar').optional()),
  driverNm: num('driverNm').pipe(positive('driverNm').optional()),
  parity: z.preprocess(blankToUndefined, z.enum(parities, { error: 'parity must be "odd" or "all"' }).optional()),
  filters: csv,
  scanVariable: z.preprocess(blankToUndefined, text('scanVariable', 200).optional()),
  scanValue: num('scanValue'),
  tags: csv,
  notes: z.preprocess(blankToUndefined, text('notes', 10_000).optional()),
});
export type UploadFields = z.output<typeof uploadFieldsSchema>;

export const frameSortKeys = ['takenAt', 'createdAt', 'originalName', 'scanValue', 'driverNm'] as const;
export type FrameSortKey = (typeof frameSortKeys)[number];

/** GET /api/frames query. `from`/`to` bound takenAt (inclusive from, exclusive to). */
export const listFramesQuerySchema = z.object({
  instrumentId: z.uuid({ error: 'instrumentId must be a UUID' }).optional(),
  kind: z.enum(frameKinds, { error: 'kind must be "signal" or "dark"' }).optional(),
  tag: z.string().trim().min(1).max(100).optional(),
  from: z.iso.datetime({ offset: true, error: 'from must be an ISO 8601 time' }).optional(),
  to: z.iso.datetime({ offset: true, error: 'to must be an ISO 8601 time' }).optional(),
  /** Substring of the original name, target, notes or scan variable (case-insensitive). */
  q: z.string().trim().max(200).optional(),
  sort: z.enum(frameSortKeys, { error: `sort must be one of ${frameSortKeys.join(', ')}` }).default('takenAt'),
  order: z.enum(['asc', 'desc'], { error: 'order must be asc or desc' }).default('desc'),
  page: z.coerce.number().int().min(1, { message: 'page must be ≥ 1' }).default(1),
  pageSize: z.coerce.number().int().min(1).max(200, { message: 'pageSize must be at most 200' }).default(50),
});
export type ListFramesQuery = z.input<typeof listFramesQuerySchema>;
export type ListFramesParams = z.output<typeof listFramesQuerySchema>;

/** A frame as the API returns it (one page of a stored file). */
export interface Frame {
  id: string;
  instrumentId: string;
  instrumentName: string;
  sha256: string;
  sizeBytes: number;
  originalName: string;
  format: FrameFormat;
  page: number;
  pageCount: number;
  width: number;
  height: number;
  sampleFormat: 'uint' | 'int' | 'float';
  bitsPerSample: number;
  kind: FrameKind;
  takenAt: string;
  takenAtSource: TakenAtSource;
  exposureS: number | null;
  accumulations: number | null;
  target: string | null;
  pressureMbar: number | null;
  filters: string[];
  driverNm: number | null;
  parity: FrameParity | null;
  scanVariable: string | null;
  scanValue: number | null;
  tags: string[];
  notes: string;
  regions: Regions | null;
  uploadedBy: string | null;
  createdAt: string;
  updatedAt: string;
}

export interface FrameList {
  items: Frame[];
  total: number;
  page: number;
  pageSize: number;
}

/** 201 of the upload: the first frame's fields at top level, every frame in `frames`. */
export type UploadFramesResponse = Frame & { frames: Frame[] };
