/** audit_events table access. */
import { desc, eq } from 'drizzle-orm';
import type { Executor } from '../../db/client.ts';
import { auditEvents, users } from '../../db/schema/index.ts';

export interface AuditInsert {
  actorId: string | null;
  action: string;
  entityType: string;
  entityId: string;
  instrumentId: string | null;
  before: unknown;
  after: unknown;
}

export async function insertAuditEvent(db: Executor, event: AuditInsert): Promise<void> {
  await db.insert(auditEvents).values({ ...event, before: event.before ?? null, after: event.after ?? null });
}

export function listAuditEvents(db: Executor, options: { instrumentId?: string; limit: number }) {
  const query = db
    .select({ event: auditEvents, actorEmail: users.email })
    .from(auditEvents)
    .leftJoin(users, eq(users.id, auditEvents.actorId));
  const filtered = options.instrumentId ? query.where(eq(auditEvents.instrumentId, options.instrumentId)) : query;
  return filtered.orderBy(desc(auditEvents.at), desc(auditEvents.createdAt)).limit(options.limit);
}
