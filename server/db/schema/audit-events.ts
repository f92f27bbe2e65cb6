/**
 * Who changed what, with the row before and after. `entityId` is text because entities of
 * several kinds (instruments, memberships) share the table. Instrument and actor links are
 * `set null` on delete so the history of a deleted instrument survives it.
 */
import { relations } from 'drizzle-orm';
import { index, jsonb, pgTable, text, timestamp, uuid } from 'drizzle-orm/pg-core';
import { id, timestamps } from './columns.ts';
import { users } from './users.ts';
import { instruments } from './instruments.ts';

export const auditEvents = pgTable(
  'audit_events',
  {
    id: id(),
    actorId: uuid('actor_id').references(() => users.id, { onDelete: 'set null' }),
    action: text('action').notNull(),
    entityType: text('entity_type').notNull(),
    entityId: text('entity_id').notNull(),
    instrumentId: uuid('instrument_id').references(() => instruments.id, { onDelete: 'set null' }),
    before: jsonb('before'),
    after: jsonb('after'),
    at: timestamp('at', { withTimezone: true }).notNull().defaultNow(),
    ...timestamps,
  },
  (t) => [index('audit_events_instrument_at_idx').on(t.instrumentId, t.at)],
);

export const auditEventsRelations = relations(auditEvents, ({ one }) => ({
  actor: one(users, { fields: [auditEvents.actorId], references: [users.id] }),
  instrument: one(instruments, { fields: [auditEvents.instrumentId], references: [instruments.id] }),
}));

export type AuditEventRow = typeof auditEvents.$inferSelect;
