/** api_tokens table access. */
import { and, desc, eq, isNull } from 'drizzle-orm';
import type { Executor } from '../../db/client.ts';
import { apiTokens, users, type ApiTokenRow, type UserRow } from '../../db/schema/index.ts';

export async function insertApiToken(db: Executor, values: { userId: string; name: string; tokenHash: string }): Promise<ApiTokenRow> {
  const [row] = await db.insert(apiTokens).values(values).returning();
  return row!;
}

export function listApiTokens(db: Executor, userId: string): Promise<ApiTokenRow[]> {
  return db.select().from(apiTokens).where(eq(apiTokens.userId, userId)).orderBy(desc(apiTokens.createdAt));
}

/** Marks the token revoked; returns the row, or undefined when it is not this user's. */
export async function revokeApiToken(db: Executor, userId: string, tokenId: string): Promise<ApiTokenRow | undefined> {
  const [row] = await db
    .update(apiTokens)
    .set({ revokedAt: new Date() })
    .where(and(eq(apiTokens.id, tokenId), eq(apiTokens.userId, userId)))
    .returning();
  return row;
}

/** The owner of an unrevoked token with this hash, stamping `lastUsedAt`. */
export async function useApiToken(db: Executor, tokenHash: string): Promise<UserRow | undefined> {
  const [token] = await db
    .update(apiTokens)
    .set({ lastUsedAt: new Date() })
    .where(and(eq(apiTokens.tokenHash, tokenHash), isNull(apiTokens.revokedAt)))
    .returning({ userId: apiTokens.userId });
  if (!token) return undefined;
  const [user] = await db.select().from(users).where(eq(users.id, token.userId));
  return user;
}
