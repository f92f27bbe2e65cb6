/** Accounts: creating them (with the duplicate e-mail rule) and checking passwords. */
import type { SessionUser } from '../../../shared/api/session.ts';
import type { Executor } from '../../db/client.ts';
import type { UserRow } from '../../db/schema/index.ts';
import { dummyPasswordHash, hashPassword, verifyPassword } from '../../auth/password.ts';
import { ConflictError } from '../../lib/errors.ts';
import { findUserByEmail, insertUser } from './queries.ts';

/** The public face of a user row (never the hash). */
export function toSessionUser(row: UserRow): SessionUser {
  return { id: row.id, email: row.email, name: row.name, isAdmin: row.isAdmin };
}

/**
 * Create an account. A second account with the same e-mail (any letter case) is a ConflictError;
 * the unique index on lower(email) backs this up under races.
 */
export async function createUser(
  db: Executor,
  input: { email: string; name: string; password: string; isAdmin?: boolean },
): Promise<UserRow> {
  const email = input.email.trim().toLowerCase();
  if (await findUserByEmail(db, email)) throw new ConflictError(`An account for ${email} already exists.`, { field: 'email' });
  return insertUser(db, { email, name: input.name, passwordHash: await hashPassword(input.password), isAdmin: input.isAdmin ?? false });
}

/** The user whose e-mail and password match, or null. Unknown e-mails cost a hash check too. */
export async function checkCredentials(db: Executor, email: string, password: string): Promise<UserRow | null> {
  const row = await findUserByEmail(db, email);
  if (!row) {
    await verifyPassword(password, await dummyPasswordHash());
    return null;
  }
  return (await verifyPassword(password, row.passwordHash)) ? row : null;
}
