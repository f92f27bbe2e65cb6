/** Personal API tokens: the secret is returned once at creation; only its SHA-256 is kept. */
import type { ApiTokenCreated, ApiTokenInfo } from '../../../shared/api/session.ts';
import type { Executor } from '../../db/client.ts';
import type { ApiTokenRow, UserRow } from '../../db/schema/index.ts';
import { newApiToken, sha256Hex } from '../../auth/secrets.ts';
import { NotFoundError } from '../../lib/errors.ts';
import { insertApiToken, listApiTokens, revokeApiToken, useApiToken } from './queries.ts';

function toInfo(row: ApiTokenRow): ApiTokenInfo {
  return {
    id: row.id,
    name: row.name,
    createdAt: row.createdAt.toISOString(),
    lastUsedAt: row.lastUsedAt?.toISOString() ?? null,
    revokedAt: row.revokedAt?.toISOString() ?? null,
  };
}

export async function createToken(db: Executor, userId: string, name: string): Promise<ApiTokenCreated> {
  const token = newApiToken();
  const row = await insertApiToken(db, { userId, name, tokenHash: sha256Hex(token) });
  return { ...toInfo(row), token };
}

export async function listTokens(db: Executor, userId: string): Promise<ApiTokenInfo[]> {
  return (await listApiTokens(db, userId)).map(toInfo);
}

/** Revoke one of the user's own tokens; someone else's token id is a 404. */
export async function revokeToken(db: Executor, userId: string, tokenId: string): Promise<void> {
  if (!(await revokeApiToken(db, userId, tokenId))) throw new NotFoundError('No such token.');
}

export function userForApiToken(db: Executor, token: string): Promise<UserRow | undefined> {
  return useApiToken(db, sha256Hex(token));
}
