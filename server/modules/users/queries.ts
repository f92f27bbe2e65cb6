/** Users table access. E-mails are compared lowercased, as stored. */
import { eq, sql } from 'drizzle-orm';
import type { Executor } from '../../db/client.ts';
import { users, type UserRow } from '../../db/schema/index.ts';

export async function findUserByEmail(db: Executor, email: string): Promise<UserRow | undefined> {
  const [row] = await db.select().from(users).where(sql`lower(${users.email}) = lower(${email})`);
  return row;
}

export async function findUserById(db: Executor, id: string): Promise<UserRow | undefined> {
  const [row] = await db.select().from(users).where(eq(users.id, id));
  return row;
}

export async function insertUser(
  db: Executor,
  values: { email: string; name: string; passwordHash: string; isAdmin?: boolean },
): Promise<UserRow> {
  const [row] = await db
    .insert(users)
    .values({ ...values, email: values.email.toLowerCase() })
    .returning();
  return row!;
}
