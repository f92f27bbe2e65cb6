/** Who may do what on an instrument: one role per (user, instrument). */
import { relations } from 'drizzle-orm';
import { pgTable, unique, uuid } from 'drizzle-orm/pg-core';
import { roleEnum } from './enums.ts';
import { id, timestamps } from './columns.ts';
import { users } from './users.ts';
import { instruments } from './instruments.ts';

export const memberships = pgTable(
  'memberships',
  {
    id: id(),
    userId: uuid('user_id')
      .notNull()
      .references(() => users.id, { onDelete: 'cascade' }),
    instrumentId: uuid('instrument_id')
      .notNull()
      .references(() => instruments.id, { onDelete: 'cascade' }),
    role: roleEnum('role').notNull(),
    ...timestamps,
  },
  (t) => [unique('memberships_user_instrument_unique').on(t.userId, t.instrumentId)],
);

export const membershipsRelations = relations(memberships, ({ one }) => ({
  user: one(users, { fields: [memberships.userId], references: [users.id] }),
  instrument: one(instruments, { fields: [memberships.instrumentId], references: [instruments.id] }),
}));

export type MembershipRow = typeof memberships.$inferSelect;
