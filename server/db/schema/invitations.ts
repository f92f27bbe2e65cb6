/** E-mailed invitations to an instrument. Only the SHA-256 of the token is stored. */
import { relations } from 'drizzle-orm';
import { index, pgTable, text, timestamp, uuid } from 'drizzle-orm/pg-core';
import { id, timestamps } from './columns.ts';
import { roleEnum } from './enums.ts';
import { users } from './users.ts';
import { instruments } from './instruments.ts';

export const invitations = pgTable(
  'invitations',
  {
    id: id(),
    tokenHash: text('token_hash').notNull().unique(),
    email: text('email').notNull(),
    instrumentId: uuid('instrument_id')
      .notNull()
      .references(() => instruments.id, { onDelete: 'cascade' }),
    role: roleEnum('role').notNull(),
    /** Null once the inviting account is deleted; the invitation stays valid. */
    invitedBy: uuid('invited_by').references(() => users.id, { onDelete: 'set null' }),
    expiresAt: timestamp('expires_at', { withTimezone: true }).notNull(),
    acceptedAt: timestamp('accepted_at', { withTimezone: true }),
    acceptedBy: uuid('accepted_by').references(() => users.id, { onDelete: 'set null' }),
    ...timestamps,
  },
  (t) => [index('invitations_instrument_idx').on(t.instrumentId)],
);

export const invitationsRelations = relations(invitations, ({ one }) => ({
  instrument: one(instruments, { fields: [invitations.instrumentId], references: [instruments.id] }),
  inviter: one(users, { fields: [invitations.invitedBy], references: [users.id] }),
}));

export type InvitationRow = typeof invitations.$inferSelect;
