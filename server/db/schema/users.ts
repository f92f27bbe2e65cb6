/** Accounts. E-mail is stored lowercased; a check and a unique index on lower(email) keep it so. */
import { relations, sql } from 'drizzle-orm';
import { boolean, check, pgTable, text, uniqueIndex } from 'drizzle-orm/pg-core';
import { id, timestamps } from './columns.ts';
import { memberships } from './memberships.ts';
import { apiTokens } from './api-tokens.ts';

export const users = pgTable(
  'users',
  {
    id: id(),
    email: text('email').notNull(),
    name: text('name').notNull(),
    /** `scrypt$N$r$p$salt$hash`, base64 parts; see server/auth/password.ts. */
    passwordHash: text('password_hash').notNull(),
    isAdmin: boolean('is_admin').notNull().default(false),
    ...timestamps,
  },
  (t) => [
    uniqueIndex('users_email_lower_unique').on(sql`lower(${t.email})`),
    check('users_email_is_lowercase', sql`${t.email} = lower(${t.email})`),
  ],
);

export const usersRelations = relations(users, ({ many }) => ({
  memberships: many(memberships),
  apiTokens: many(apiTokens),
}));

export type UserRow = typeof users.$inferSelect;
