/**
 * The connect-pg-simple session store's table, created by a migration rather than by the store
 * (`createTableIfMissing` off). Column names and types are the ones connect-pg-simple queries
 * (sid, sess, expire); `expire` is timestamptz, which its `to_timestamp()` comparisons accept.
 * No `updatedAt`: the store writes this table itself and would never bump it.
 */
import { index, json, pgTable, timestamp, varchar } from 'drizzle-orm/pg-core';

export const sessions = pgTable(
  'sessions',
  {
    sid: varchar('sid').primaryKey(),
    sess: json('sess').notNull(),
    expire: timestamp('expire', { withTimezone: true, precision: 6 }).notNull(),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index('sessions_expire_idx').on(t.expire)],
);
