/**
 * Frames: one row per page of an uploaded camera file. The bytes live in the frame store under
 * their sha256 (a TIFF stack's pages share one stored file); the metadata lives here.
 */
import { sql } from 'drizzle-orm';
import { doublePrecision, index, integer, jsonb, pgTable, text, timestamp, unique, uuid } from 'drizzle-orm/pg-core';
import type { FrameFormat, FrameKind, FrameParity, Regions, TakenAtSource } from '../../../shared/api/frames.ts';
import { id, timestamps } from './columns.ts';
import { instruments } from './instruments.ts';
import { users } from './users.ts';

export const frames = pgTable(
  'frames',
  {
    id: id(),
    instrumentId: uuid('instrument_id')
      .notNull()
      .references(() => instruments.id, { onDelete: 'cascade' }),
    sha256: text('sha256').notNull(),
    sizeBytes: integer('size_bytes').notNull(),
    originalName: text('original_name').notNull(),
    format: text('format').$type<FrameFormat>().notNull(),
    page: integer('page').notNull(),
    pageCount: integer('page_count').notNull(),
    width: integer('width').notNull(),
    height: integer('height').notNull(),
    sampleFormat: text('sample_format').$type<'uint' | 'int' | 'float'>().notNull(),
    bitsPerSample: integer('bits_per_sample').notNull(),
    kind: text('kind').$type<FrameKind>().notNull().default('signal'),
    takenAt: timestamp('taken_at', { withTimezone: true }).notNull(),
    takenAtSource: text('taken_at_source').$type<TakenAtSource>().notNull(),
    exposureS: doublePrecision('exposure_s'),
    accumulations: integer('accumulations'),
    /** Gas or solid target. */
    target: text('target'),
    pressureMbar: doublePrecision('pressure_mbar'),
    filters: text('filters').array().notNull().default(sql`'{}'::text[]`),
    driverNm: doublePrecision('driver_nm'),
    parity: text('parity').$type<FrameParity>(),
    scanVariable: text('scan_variable'),
    scanValue: doublePrecision('scan_value'),
    tags: text('tags').array().notNull().default(sql`'{}'::text[]`),
    notes: text('notes').notNull().default(''),
    regions: jsonb('regions').$type<Regions>(),
    uploadedBy: uuid('uploaded_by').references(() => users.id, { onDelete: 'set null' }),
    ...timestamps,
  },
  (t) => [
    unique('frames_instrument_sha_page_unique').on(t.instrumentId, t.sha256, t.page),
    index('frames_instrument_taken_idx').on(t.instrumentId, t.takenAt),
    index('frames_sha_idx').on(t.sha256),
  ],
);

export type FrameRow = typeof frames.$inferSelect;
export type FrameInsert = typeof frames.$inferInsert;
