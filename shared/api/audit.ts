/** Audit events and the captured mail outbox. */
import { z } from 'zod';

/** GET /api/audit?instrumentId= (owner of that instrument or admin; without it, admin only). */
export const auditQuerySchema = z.object({
  instrumentId: z.uuid({ error: 'instrumentId must be a UUID' }).optional(),
  limit: z.coerce.number().int().min(1).max(500).default(100),
});
export type AuditQuery = z.infer<typeof auditQuerySchema>;

export interface AuditEvent {
  id: string;
  actorId: string | null;
  actorEmail: string | null;
  action: string;
  entityType: string;
  entityId: string;
  instrumentId: string | null;
  before: unknown;
  after: unknown;
  at: string;
}

/** One mail captured by the in-process SMTP sink (GET /api/outbox, admin). */
export interface OutboxMail {
  id: string;
  from: string;
  to: string;
  subject: string;
  text: string;
  html: string | null;
  receivedAt: string;
}
