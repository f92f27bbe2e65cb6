/** Who a notice goes to: owners of an instrument, one user, users who made spectra with a version. */
import { and, eq, gte, inArray } from 'drizzle-orm';
import type { Executor } from '../../db/client.ts';
import { calibrationVersions, instruments, memberships, spectra, users } from '../../db/schema/index.ts';

export interface Recipient {
  id: string;
  email: string;
  name: string;
}

export function listOwners(db: Executor, instrumentId: string): Promise<Recipient[]> {
  return db
    .select({ id: users.id, email: users.email, name: users.name })
    .from(memberships)
    .innerJoin(users, eq(users.id, memberships.userId))
    .where(and(eq(memberships.instrumentId, instrumentId), eq(memberships.role, 'owner')));
}

export async function findRecipient(db: Executor, userId: string): Promise<Recipient | undefined> {
  const [row] = await db.select({ id: users.id, email: users.email, name: users.name }).from(users).where(eq(users.id, userId));
  return row;
}

/** Distinct users who made spectra with any of `versionIds` since `since`. */
export function listSpectrumMakers(db: Executor, versionIds: string[], since: Date): Promise<Recipient[]> {
  if (versionIds.length === 0) return Promise.resolve([]);
  return db
    .selectDistinct({ id: users.id, email: users.email, name: users.name })
    .from(spectra)
    .innerJoin(users, eq(users.id, spectra.createdBy))
    .where(and(inArray(spectra.versionId, versionIds), gte(spectra.createdAt, since)));
}

export async function instrumentName(db: Executor, instrumentId: string): Promise<string> {
  const [row] = await db.select({ name: instruments.name }).from(instruments).where(eq(instruments.id, instrumentId));
  return row?.name ?? 'an instrument';
}

/** Versions an approval superseded (they point at it). */
export function listVersionsSupersededBy(db: Executor, versionId: string) {
  return db
    .select({ id: calibrationVersions.id, number: calibrationVersions.number, authorId: calibrationVersions.authorId })
    .from(calibrationVersions)
    .where(and(eq(calibrationVersions.supersededById, versionId), eq(calibrationVersions.state, 'superseded')));
}
