/**
 * Members and invitations. Owners and site admins invite, change roles and remove members;
 * every member may list the members. An instrument always keeps at least one owner.
 * Invitations are single-use (accepted_at, under a row lock) and expire after 7 days.
 */
import type {
  AcceptInvitationInput,
  CreateInvitationInput,
  InvitationCreated,
  InvitationPreview,
  MembersResponse,
  Role,
} from '../../../shared/api/members.ts';
import { paths } from '../../../shared/api/paths.ts';
import type { SessionUser } from '../../../shared/api/session.ts';
import type { Db, Executor } from '../../db/client.ts';
import { instrumentAccess, requireManage } from '../../auth/access.ts';
import { randomSecret, sha256Hex } from '../../auth/secrets.ts';
import { ConflictError, ForbiddenError, GoneError, HttpError, NotFoundError, ValidationError } from '../../lib/errors.ts';
import type { Mailer } from '../../mail/mailer.ts';
import { recordAudit } from '../audit/service.ts';
import { findUserByEmail } from '../users/queries.ts';
import { createUser, toSessionUser } from '../users/service.ts';
import {
  deleteMembership,
  findInvitationByHash,
  findMembership,
  insertInvitation,
  insertMembership,
  listMembersOfInstrument,
  listPendingInvitations,
  lockOwners,
  markInvitationAccepted,
  updateMembershipRole,
} from './queries.ts';

export const INVITATION_LIFETIME_MS = 7 * 24 * 3600 * 1000;

export async function listMembers(db: Executor, user: SessionUser, instrumentId: string): Promise<MembersResponse> {
  const access = await instrumentAccess(db, user, instrumentId);
  const members = (await listMembersOfInstrument(db, instrumentId)).map((m) => ({ ...m, createdAt: m.createdAt.toISOString() }));
  const invitations = access.canManage
    ? (await listPendingInvitations(db, instrumentId)).map((i) => ({
        id: i.id,
        email: i.email,
        role: i.role,
        expiresAt: i.expiresAt.toISOString(),
        createdAt: i.createdAt.toISOString(),
      }))
    : [];
  return { members, invitations };
}

export interface InviteDeps {
  db: Db;
  mailer: Mailer;
  appUrl: string;
}

/** Create the invitation and mail the one-time link `APP_URL/invite/<token>`. */
export async function inviteMember(
  { db, mailer, appUrl }: InviteDeps,
  user: SessionUser,
  instrumentId: string,
  input: CreateInvitationInput,
): Promise<InvitationCreated> {
  const token = randomSecret();
  const { invitation, instrumentName } = await db.transaction(async (tx) => {
    const access = await requireManage(tx, user, instrumentId, 'invite members');
    const existing = await findUserByEmail(tx, input.email);
    if (existing && (await findMembership(tx, existing.id, instrumentId))) {
      throw new ConflictError(`${input.email} is already a member of this instrument.`, { field: 'email' });
    }
    const row = await insertInvitation(tx, {
      tokenHash: sha256Hex(token),
      email: input.email,
      instrumentId,
      role: input.role,
      invitedBy: user.id,
      expiresAt: new Date(Date.now() + INVITATION_LIFETIME_MS),
    });
    await recordAudit(tx, {
      actorId: user.id,
      action: 'invitation.create',
      entityType: 'invitation',
      entityId: row.id,
      instrumentId,
      before: null,
      after: { email: row.email, role: row.role, expiresAt: row.expiresAt.toISOString() },
    });
    return { invitation: row, instrumentName: access.instrument.name };
  });
  const link = `${appUrl}${paths.invitePage(token)}`;
  const expires = invitation.expiresAt.toISOString().slice(0, 10);
  try {
    await mailer.send({
      to: invitation.email,
      subject: `${user.name} invited you to ${instrumentName} on Orderly`,
      text: `${user.name} invited you to join the instrument "${instrumentName}" on Orderly as ${invitation.role}.\n\nOpen this link to accept (it works once, until ${expires}):\n${link}\n`,
      html: `<p>${escapeHtml(user.name)} invited you to join the instrument <b>${escapeHtml(instrumentName)}</b> on Orderly as ${invitation.role}.</p><p><a href="${escapeHtml(link)}">Accept the invitation</a> (it works once, until ${expires}).</p>`,
    });
  } catch (error) {
    console.error('invitation mail failed:', (error as Error).message);
    throw new HttpError(500, 'internal', 'The invitation was saved but its e-mail could not be sent; check the mail settings and invite again.');
  }
  return { id: invitation.id, email: invitation.email, role: invitation.role, expiresAt: invitation.expiresAt.toISOString() };
}

function escapeHtml(text: string): string {
  return text.replace(/[&<>"']/g, (c) => `&#${c.charCodeAt(0)};`);
}

/** The invitation behind `token`, or 404 (unknown) / 410 (used, expired). */
async function usableInvitation(db: Executor, token: string, lock: boolean) {
  const found = await findInvitationByHash(db, sha256Hex(token), lock);
  if (!found) throw new NotFoundError('No such invitation.');
  if (found.invitation.acceptedAt) throw new GoneError('This invitation has already been used.');
  if (found.invitation.expiresAt.getTime() <= Date.now()) throw new GoneError('This invitation has expired; ask for a new one.');
  return found;
}

export async function previewInvitation(db: Executor, token: string): Promise<InvitationPreview> {
  const { invitation, instrumentName, invitedByName } = await usableInvitation(db, token, false);
  return {
    email: invitation.email,
    role: invitation.role,
    instrumentId: invitation.instrumentId,
    instrumentName,
    invitedByName: invitedByName ?? 'someone',
    expiresAt: invitation.expiresAt.toISOString(),
    accountExists: Boolean(await findUserByEmail(db, invitation.email)),
  };
}

/**
 * Accept: signed in as the invited address → add the membership; signed out → create the
 * account (name + password), refusing an e-mail that already has one (sign in first).
 */
export async function acceptInvitation(
  db: Db,
  signedIn: SessionUser | undefined,
  token: string,
  input: AcceptInvitationInput,
): Promise<{ user: SessionUser; instrumentId: string; role: Role; accountCreated: boolean }> {
  return db.transaction(async (tx) => {
    const { invitation } = await usableInvitation(tx, token, true);
    let user: SessionUser;
    let accountCreated = false;
    if (signedIn) {
      if (signedIn.email !== invitation.email) {
        throw new ForbiddenError(`This invitation is for ${invitation.email}; sign in with that address to accept it.`);
      }
      user = signedIn;
      if (await findMembership(tx, user.id, invitation.instrumentId)) throw new ConflictError('You are already a member of this instrument.');
    } else {
      if (await findUserByEmail(tx, invitation.email)) {
        throw new ConflictError(`An account for ${invitation.email} already exists; sign in, then open the link again.`, { field: 'email' });
      }
      const missing = [
        ...(input.name ? [] : [{ path: 'name', message: 'name is required to create the account' }]),
        ...(input.password ? [] : [{ path: 'password', message: 'password is required to create the account' }]),
      ];
      if (missing.length) throw new ValidationError(missing.map((m) => `${m.path}: ${m.message}`).join('; '), { issues: missing });
      user = toSessionUser(await createUser(tx, { email: invitation.email, name: input.name!, password: input.password! }));
      accountCreated = true;
    }
    const membership = await insertMembership(tx, { userId: user.id, instrumentId: invitation.instrumentId, role: invitation.role });
    await markInvitationAccepted(tx, invitation.id, user.id);
    await recordAudit(tx, {
      actorId: user.id,
      action: 'membership.create',
      entityType: 'membership',
      entityId: membership.id,
      instrumentId: invitation.instrumentId,
      before: null,
      after: { userId: user.id, role: membership.role, invitationId: invitation.id },
    });
    return { user, instrumentId: invitation.instrumentId, role: membership.role, accountCreated };
  });
}

async function targetMembership(tx: Executor, instrumentId: string, userId: string) {
  const membership = await findMembership(tx, userId, instrumentId);
  if (!membership) throw new NotFoundError('That user is not a member of this instrument.');
  return membership;
}

async function assertNotLastOwner(tx: Executor, instrumentId: string, userId: string): Promise<void> {
  const owners = await lockOwners(tx, instrumentId);
  if (owners.length <= 1 && owners.includes(userId)) throw new ConflictError('An instrument must keep at least one owner; make someone else owner first.');
}

export async function changeRole(db: Db, user: SessionUser, instrumentId: string, userId: string, role: Role): Promise<void> {
  await db.transaction(async (tx) => {
    await requireManage(tx, user, instrumentId, 'change roles');
    const membership = await targetMembership(tx, instrumentId, userId);
    if (membership.role === role) return;
    if (membership.role === 'owner') await assertNotLastOwner(tx, instrumentId, userId);
    await updateMembershipRole(tx, membership.id, role);
    await recordAudit(tx, {
      actorId: user.id,
      action: 'membership.update',
      entityType: 'membership',
      entityId: membership.id,
      instrumentId,
      before: { userId, role: membership.role },
      after: { userId, role },
    });
  });
}

export async function removeMember(db: Db, user: SessionUser, instrumentId: string, userId: string): Promise<void> {
  await db.transaction(async (tx) => {
    await requireManage(tx, user, instrumentId, 'remove members');
    const membership = await targetMembership(tx, instrumentId, userId);
    if (membership.role === 'owner') await assertNotLastOwner(tx, instrumentId, userId);
    await deleteMembership(tx, membership.id);
    await recordAudit(tx, {
      actorId: user.id,
      action: 'membership.delete',
      entityType: 'membership',
      entityId: membership.id,
      instrumentId,
      before: { userId, role: membership.role },
      after: null,
    });
  });
}
