/**
 * Drift episodes: from the first flagged spectrum of an instrument to the first one back within
 * threshold. At most one open episode per instrument (partial unique index), so concurrent
 * workers open it, and send its one notice, once.
 */
import { sql } from 'drizzle-orm';
import { pgTable, timestamp, uniqueIndex, uuid } from 'drizzle-orm/pg-core';
import { id, timestamps } from './columns.ts';
import { instruments } from './instruments.ts';

export const driftEpisodes = pgTable(
  'drift_episodes',
  {
    id: id(),
    instrumentId: uuid('instrument_id')
      .notNull()
      .references(() => instruments.id, { onDelete: 'cascade' }),
    firstSpectrumId: uuid('first_spectrum_id').notNull(),
    firstFrameId: uuid('first_frame_id').notNull(),
    openedAt: timestamp('opened_at', { withTimezone: true }).notNull().defaultNow(),
    closedAt: timestamp('closed_at', { withTimezone: true }),
    ...timestamps,
  },
  (t) => [uniqueIndex('drift_episodes_one_open').on(t.instrumentId).where(sql`${t.closedAt} IS NULL`)],
);

export type DriftEpisodeRow = typeof driftEpisodes.$inferSelect;
