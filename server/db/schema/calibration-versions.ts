/**
 * Calibration versions of an instrument: draft → in_review → approved → superseded / withdrawn.
 * The calibration is copied from the workbench run at creation, so an approved version never
 * depends on another row changing. `history` lists the state changes (who, when, comment).
 */
import { doublePrecision, index, integer, jsonb, pgTable, text, timestamp, unique, uuid } from 'drizzle-orm/pg-core';
import type { VersionState } from '../../../shared/api/versions.ts';
import type { Calibration } from '../../../shared/engine/types.ts';
import { id, timestamps } from './columns.ts';
import { instruments } from './instruments.ts';
import { users } from './users.ts';
import { workbenchRuns } from './workbench-runs.ts';

export interface VersionHistoryRow {
  from: VersionState | null;
  to: VersionState;
  byId: string | null;
  at: string;
  comment: string;
}

export const calibrationVersions = pgTable(
  'calibration_versions',
  {
    id: id(),
    instrumentId: uuid('instrument_id')
      .notNull()
      .references(() => instruments.id, { onDelete: 'cascade' }),
    number: integer('number').notNull(),
    state: text('state').$type<VersionState>().notNull().default('draft'),
    validFrom: timestamp('valid_from', { withTimezone: true }).notNull(),
    validUntil: timestamp('valid_until', { withTimezone: true }),
    note: text('note').notNull().default(''),
    authorId: uuid('author_id').references(() => users.id, { onDelete: 'set null' }),
    reviewerId: uuid('reviewer_id').references(() => users.id, { onDelete: 'set null' }),
    approvedAt: timestamp('approved_at', { withTimezone: true }),
    supersededById: uuid('superseded_by_id'),
    supersededAt: timestamp('superseded_at', { withTimezone: true }),
    runId: uuid('run_id')
      .notNull()
      .references(() => workbenchRuns.id, { onDelete: 'restrict' }),
    frameIds: uuid('frame_ids').array().notNull(),
    model: text('model').$type<'grating' | 'polynomial'>().notNull(),
    driverNm: doublePrecision('driver_nm').notNull(),
    rmsResidualPx: doublePrecision('rms_residual_px').notNull(),
    peakCount: integer('peak_count').notNull(),
    calibration: jsonb('calibration').$type<Calibration>().notNull(),
    history: jsonb('history').$type<VersionHistoryRow[]>().notNull().default([]),
    ...timestamps,
  },
  (t) => [
    unique('calibration_versions_instrument_number_unique').on(t.instrumentId, t.number),
    index('calibration_versions_validity_idx').on(t.instrumentId, t.state, t.validFrom),
  ],
);

export type CalibrationVersionRow = typeof calibrationVersions.$inferSelect;
