/** Workbench runs: the engine's calibrate result on the server, kept so a draft cites a run, not client numbers. */
import { index, jsonb, pgTable, text, uuid } from 'drizzle-orm/pg-core';
import type { WorkbenchRun } from '../../../shared/api/workbench.ts';
import { id, timestamps } from './columns.ts';
import { instruments } from './instruments.ts';
import { users } from './users.ts';

export const workbenchRuns = pgTable(
  'workbench_runs',
  {
    id: id(),
    instrumentId: uuid('instrument_id')
      .notNull()
      .references(() => instruments.id, { onDelete: 'cascade' }),
    createdBy: uuid('created_by').references(() => users.id, { onDelete: 'set null' }),
    /** `unique` | `ambiguous` | `failed`, copied out of `result` for queries. */
    status: text('status').$type<WorkbenchRun['result']['status']>().notNull(),
    inputs: jsonb('inputs').$type<WorkbenchRun['inputs']>().notNull(),
    result: jsonb('result').$type<WorkbenchRun['result']>().notNull(),
    ...timestamps,
  },
  (t) => [index('workbench_runs_instrument_idx').on(t.instrumentId, t.createdAt)],
);

export type WorkbenchRunRow = typeof workbenchRuns.$inferSelect;
