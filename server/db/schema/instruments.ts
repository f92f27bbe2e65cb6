/** Spectrometers. `profile` is the nominal geometry, validated by `instrumentProfileSchema`. */
import { relations } from 'drizzle-orm';
import { integer, jsonb, pgTable, text } from 'drizzle-orm/pg-core';
import type { InstrumentProfileInput } from '../../../shared/api/instrument-profile.ts';
import type { InstrumentSettings } from '../../../shared/api/instruments.ts';
import type { Regions } from '../../../shared/api/frames.ts';
import { id, timestamps } from './columns.ts';
import { memberships } from './memberships.ts';
import { invitations } from './invitations.ts';

export const instruments = pgTable('instruments', {
  id: id(),
  name: text('name').notNull().unique(),
  description: text('description').notNull().default(''),
  profile: jsonb('profile').$type<InstrumentProfileInput>().notNull(),
  /** Copied from `profile.pixelCount` so lists and queries need not open the JSON. */
  pixelCount: integer('pixel_count').notNull(),
  notes: text('notes').notNull().default(''),
  settings: jsonb('settings').$type<InstrumentSettings>().notNull().default({ forbidSelfApproval: true }),
  /** Default signal/background regions for frames without their own (issue 4); null = automatic. */
  regions: jsonb('regions').$type<Regions>(),
  ...timestamps,
});

export const instrumentsRelations = relations(instruments, ({ many }) => ({
  memberships: many(memberships),
  invitations: many(invitations),
}));

export type InstrumentRow = typeof instruments.$inferSelect;
