/**
 * Runs (bulk apply in the background) and their items, one per frame. Item states move
 * queued → running → done | failed, or queued → cancelled; the run's counts are derived from them.
 */
import { index, integer, jsonb, pgTable, text, timestamp, unique, uuid } from 'drizzle-orm/pg-core';
import type { RunItemState, RunState } from '../../../shared/api/runs.ts';
import { id, timestamps } from './columns.ts';
import { instruments } from './instruments.ts';
import { frames } from './frames.ts';
import { users } from './users.ts';

export const runs = pgTable(
  'runs',
  {
    id: id(),
    instrumentId: uuid('instrument_id')
      .notNull()
      .references(() => instruments.id, { onDelete: 'cascade' }),
    kind: text('kind').$type<'apply' | 'reapply'>().notNull(),
    state: text('state').$type<RunState>().notNull().default('queued'),
    /** A version number, or null for "the version valid at each frame's time". */
    versionNumber: integer('version_number'),
    scanVariable: text('scan_variable'),
    /** Modulation period for the scan fit: `{ value: number | 'detect' }` or null (default 2π). */
    period: jsonb('period').$type<{ value: number | 'detect' } | null>(),
    createdBy: uuid('created_by')
      .notNull()
      .references(() => users.id, { onDelete: 'cascade' }),
    finishedAt: timestamp('finished_at', { withTimezone: true }),
    /** When the "run finished" notice went out; set once, atomically, so it is sent once. */
    notifiedAt: timestamp('notified_at', { withTimezone: true }),
    ...timestamps,
  },
  (t) => [index('runs_instrument_idx').on(t.instrumentId)],
);

export const runItems = pgTable(
  'run_items',
  {
    id: id(),
    runId: uuid('run_id')
      .notNull()
      .references(() => runs.id, { onDelete: 'cascade' }),
    frameId: uuid('frame_id')
      .notNull()
      .references(() => frames.id, { onDelete: 'cascade' }),
    state: text('state').$type<RunItemState>().notNull().default('queued'),
    message: text('message'),
    /** pg-boss job id of the latest attempt (a retry makes a new job). */
    jobId: uuid('job_id'),
    workerId: text('worker_id'),
    attempts: integer('attempts').notNull().default(0),
    spectrumId: uuid('spectrum_id'),
    versionNumber: integer('version_number'),
    startedAt: timestamp('started_at', { withTimezone: true }),
    finishedAt: timestamp('finished_at', { withTimezone: true }),
    ...timestamps,
  },
  (t) => [unique('run_items_run_frame_unique').on(t.runId, t.frameId)],
);

export type RunRow = typeof runs.$inferSelect;
export type RunItemRow = typeof runItems.$inferSelect;
