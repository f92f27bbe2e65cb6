/** The captured outbox: every message the in-process SMTP sink received, parsed and raw. */
import { pgTable, text, timestamp } from 'drizzle-orm/pg-core';
import { id, timestamps } from './columns.ts';

export const mails = pgTable('mails', {
  id: id(),
  from: text('from').notNull(),
  to: text('to').notNull(),
  subject: text('subject').notNull(),
  text: text('text').notNull(),
  html: text('html'),
  receivedAt: timestamp('received_at', { withTimezone: true }).notNull().defaultNow(),
  /** The whole RFC 5322 message as received. */
  raw: text('raw').notNull(),
  ...timestamps,
});

export type MailRow = typeof mails.$inferSelect;
