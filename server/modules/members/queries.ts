/** memberships and invitations table access. */
import { and, asc, eq, gt, isNull, sql } from 'drizzle-orm';
import type { Role } from '../../../shared/api/members.ts';
import type { Executor } from '../../db/client.ts';
import { instruments, invitations, memberships, users, type InvitationRow, type MembershipRow } from '../../db/schema/index.ts';

export async function findMembership(db: Executor, userId: string, instrumentId: string): Promise<MembershipRow | undefined> {
  const [row] = await db
    .select()
    .from(memberships)
    .where(and(eq(memberships.userId, userId), eq(memberships.instrumentId, instrumentId)));
  return row;
}

export function listMembershipsOfUser(db: Executor, userId: string): Promise<{ instrumentId: string; role: Role }[]> {
  return db
    .select({ instrumentId: memberships.instrumentId, role: memberships.role })
    .from(memberships)
    .where(eq(memberships.userId, userId))
    .orderBy(asc(memberships.createdAt));
}

export function listMembersOfInstrument(db: Executor, instrumentId: string) {
  return db
    .select({ userId: users.id, email: users.email, name: users.name, role: memberships.role, createdAt: memberships.createdAt })
    .from(memberships)
    .innerJoin(users, eq(users.id, memberships.userId))
    .where(eq(memberships.instrumentId, instrumentId))
    .orderBy(asc(users.name));
}

export async function insertMembership(db: Executor, values: { userId: string; instrumentId: string; role: Role }): Promise<MembershipRow> {
  const [row] = await db.insert(memberships).values(values).returning();
  return row!;
}

export async function updateMembershipRole(db: Executor, id: string, role: Role): Promise<MembershipRow> {
  const [row] = await db.update(memberships).set({ role }).where(eq(memberships.id, id)).returning();
  return row!;
}

export async function deleteMembership(db: Executor, id: string): Promise<void> {
  await db.delete(memberships).where(eq(memberships.id, id));
}

/** Owners of the instrument, locked FOR UPDATE so two concurrent demotions cannot both pass the last-owner check. */
export async function lockOwners(db: Executor, instrumentId: string): Promise<string[]> {
  const rows = await db
    .select({ userId: memberships.userId })
    .from(memberships)
    .where(and(eq(memberships.instrumentId, instrumentId), eq(memberships.role, 'owner')))
    .for('update');
  return rows.map((r) => r.userId);
}

export async function insertInvitation(
  db: Executor,
  values: { tokenHash: string; email: string; instrumentId: string; role: Role; invitedBy: string; expiresAt: Date },
): Promise<InvitationRow> {
  const [row] = await db.insert(invitations).values(values).returning();
  return row!;
}

/** The invitation with this token hash, its instrument's name and the inviter's name. */
export async function findInvitationByHash(db: Executor, tokenHash: string, lock = false) {
  const query = db
    .select({ invitation: invitations, instrumentName: instruments.name, invitedByName: users.name })
    .from(invitations)
    .innerJoin(instruments, eq(instruments.id, invitations.instrumentId))
    .leftJoin(users, eq(users.id, invitations.invitedBy))
    .where(eq(invitations.tokenHash, tokenHash));
  const [row] = lock ? await query.for('update', { of: invitations }) : await query;
  return row;
}

export async function markInvitationAccepted(db: Executor, id: string, userId: string): Promise<void> {
  await db.update(invitations).set({ acceptedAt: new Date(), acceptedBy: userId }).where(eq(invitations.id, id));
}

export function listPendingInvitations(db: Executor, instrumentId: string) {
  return db
    .select()
    .from(invitations)
    .where(and(eq(invitations.instrumentId, instrumentId), isNull(invitations.acceptedAt), gt(invitations.expiresAt, sql`now()`)))
    .orderBy(asc(invitations.createdAt));
}
