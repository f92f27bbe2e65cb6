/** The captured outbox as the API shows it (newest first, without the raw message). */
import type { OutboxMail } from '../../../shared/api/audit.ts';
import type { Executor } from '../../db/client.ts';
import { listMails } from './queries.ts';

export async function readOutbox(db: Executor): Promise<OutboxMail[]> {
  return (await listMails(db)).map((m) => ({
    id: m.id,
    from: m.from,
    to: m.to,
    subject: m.subject,
    text: m.text,
    html: m.html,
    receivedAt: m.receivedAt.toISOString(),
  }));
}
