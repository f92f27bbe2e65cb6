/**
 * Spectra: the result of applying one calibration version to one frame, at most one row per
 * (frame, version) so retried or duplicated jobs upsert instead of adding rows. `result` is the
 * `orderly apply --json` object; the drift columns are copied out of it for the drift plot.
 */
import { sql } from 'drizzle-orm';
import { boolean, doublePrecision, index, integer, jsonb, pgTable, text, unique, uuid } from 'drizzle-orm/pg-core';
import type { AppliedSpectrum } from '../../../shared/engine/apply.ts';
import { id, timestamps } from './columns.ts';
import { instruments } from './instruments.ts';
import { frames } from './frames.ts';
import { calibrationVersions } from './calibration-versions.ts';
import { users } from './users.ts';

export const spectra = pgTable(
  'spectra',
  {
    id: id(),
    instrumentId: uuid('instrument_id')
      .notNull()
      .references(() => instruments.id, { onDelete: 'cascade' }),
    frameId: uuid('frame_id')
      .notNull()
      .references(() => frames.id, { onDelete: 'cascade' }),
    versionId: uuid('version_id')
      .notNull()
      .references(() => calibrationVersions.id, { onDelete: 'cascade' }),
    versionNumber: integer('version_number').notNull(),
    result: jsonb('result').$type<AppliedSpectrum>().notNull(),
    /** The signal/background bands used and where they came from (frame, instrument, calibration). */
    regions: jsonb('regions').$type<unknown>(),
    regionsSource: text('regions_source').notNull(),
    driftShiftPx: doublePrecision('drift_shift_px'),
    driftShiftPxSigma: doublePrecision('drift_shift_px_sigma'),
    driftShiftMeV: doublePrecision('drift_shift_mev'),
    driftShiftMeVSigma: doublePrecision('drift_shift_mev_sigma'),
    driftMatchedPeaks: integer('drift_matched_peaks').notNull().default(0),
    driftFlagged: boolean('drift_flagged').notNull().default(false),
    /** Set when the version was superseded or withdrawn after this spectrum was made. */
    stale: boolean('stale').notNull().default(false),
    createdBy: uuid('created_by').references(() => users.id, { onDelete: 'set null' }),
    ...timestamps,
  },
  (t) => [
    unique('spectra_frame_version_unique').on(t.frameId, t.versionId),
    index('spectra_instrument_idx').on(t.instrumentId),
    index('spectra_stale_idx').on(t.instrumentId).where(sql`${t.stale}`),
  ],
);

export type SpectrumRow = typeof spectra.$inferSelect;
