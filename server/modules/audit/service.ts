/**
 * Audit trail. Services call `recordAudit` inside the same transaction as the change, so a
 * change without its audit row (or the reverse) cannot be committed.
 */
import type { AuditEvent, AuditQuery } from '../../../shared/api/audit.ts';
import type { SessionUser } from '../../../shared/api/session.ts';
import type { Executor } from '../../db/client.ts';
import { ForbiddenError } from '../../lib/errors.ts';
import { instrumentAccess } from '../../auth/access.ts';
import { insertAuditEvent, listAuditEvents, type AuditInsert } from './queries.ts';

export function recordAudit(db: Executor, event: AuditInsert): Promise<void> {
  return insertAuditEvent(db, event);
}

/** With `instrumentId`: owners of it and admins. Without: admins only (the whole site). */
export async function readAudit(db: Executor, user: SessionUser, query: AuditQuery): Promise<AuditEvent[]> {
  if (query.instrumentId) {
    const access = await instrumentAccess(db, user, query.instrumentId);
    if (!access.canManage) throw new ForbiddenError('Only owners of this instrument and site admins may read its audit trail.');
  } else if (!user.isAdmin) {
    throw new ForbiddenError('Only site admins may read the whole audit trail; pass instrumentId.');
  }
  const rows = await listAuditEvents(db, query);
  return rows.map(({ event, actorEmail }) => ({
    id: event.id,
    actorId: event.actorId,
    actorEmail,
    action: event.action,
    entityType: event.entityType,
    entityId: event.entityId,
    instrumentId: event.instrumentId,
    before: event.before,
    after: event.after,
    at: event.at.toISOString(),
  }));
}
