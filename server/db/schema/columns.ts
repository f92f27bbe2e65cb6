/** Column helpers every table shares. */
import { timestamp, uuid } from 'drizzle-orm/pg-core';

/** Primary key: a random UUID made by PostgreSQL, so ids do not reveal counts or order. */
export const id = () => uuid('id').primaryKey().defaultRandom();

/** `createdAt` / `updatedAt` as timestamptz; `updatedAt` is bumped by Drizzle on every update. */
export const timestamps = {
  createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  updatedAt: timestamp('updated_at', { withTimezone: true })
    .notNull()
    .defaultNow()
    .$onUpdate(() => new Date()),
};
