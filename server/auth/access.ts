/**
 * The permission rule, in one place.
 *
 * - Site admins read and manage every instrument.
 * - Members read their instruments; owners also edit, delete, invite and change roles.
 * - Non-members get 404 for an instrument, exactly as for one that does not exist, so ids do not
 *   leak which instruments exist. Members lacking the role get 403.
 */
import type { Role } from '../../shared/api/members.ts';
import type { SessionUser } from '../../shared/api/session.ts';
import type { Executor } from '../db/client.ts';
import { ForbiddenError, NotFoundError } from '../lib/errors.ts';
import { findInstrumentById } from '../modules/instruments/queries.ts';
import { findMembership } from '../modules/members/queries.ts';
import type { InstrumentRow } from '../db/schema/index.ts';

export interface InstrumentAccess {
  instrument: InstrumentRow;
  /** The user's role on the instrument; null for a site admin who is not a member. */
  role: Role | null;
  isAdmin: boolean;
  /** Owner or site admin: may edit, delete, invite, change roles, remove members. */
  canManage: boolean;
}

/** Access of `user` to the instrument; NotFoundError when it does not exist or the user may not see it. */
export async function instrumentAccess(db: Executor, user: SessionUser, instrumentId: string): Promise<InstrumentAccess> {
  const instrument = await findInstrumentById(db, instrumentId);
  const membership = instrument ? await findMembership(db, user.id, instrumentId) : undefined;
  if (!instrument || (!membership && !user.isAdmin)) throw new NotFoundError('No such instrument.');
  const role = membership?.role ?? null;
  return { instrument, role, isAdmin: user.isAdmin, canManage: user.isAdmin || role === 'owner' };
}

/** As `instrumentAccess`, then 403 unless owner or admin. */
export async function requireManage(db: Executor, user: SessionUser, instrumentId: string, what: string): Promise<InstrumentAccess> {
  const access = await instrumentAccess(db, user, instrumentId);
  if (!access.canManage) throw new ForbiddenError(`Only owners of this instrument and site admins may ${what}.`);
  return access;
}

/**
 * As `instrumentAccess`, then 403 unless the user's role is one of `roles` or they are a site
 * admin (who may do everything a role may). `what` completes "…may <what>."
 */
export async function requireRole(db: Executor, user: SessionUser, instrumentId: string, roles: readonly Role[], what: string): Promise<InstrumentAccess> {
  const access = await instrumentAccess(db, user, instrumentId);
  if (!access.isAdmin && !(access.role && roles.includes(access.role))) {
    throw new ForbiddenError(`Only ${describeRoles(roles)} of this instrument and site admins may ${what}.`);
  }
  return access;
}

function describeRoles(roles: readonly Role[]): string {
  const plural = roles.map((r) => `${r}s`);
  return plural.length <= 1 ? (plural[0] ?? 'nobody') : `${plural.slice(0, -1).join(', ')} and ${plural.at(-1)}`;
}
