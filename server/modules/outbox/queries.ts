/** mails table access (the captured outbox). */
import { desc } from 'drizzle-orm';
import type { Executor } from '../../db/client.ts';
import { mails, type MailRow } from '../../db/schema/index.ts';

export async function insertMail(
  db: Executor,
  values: { from: string; to: string; subject: string; text: string; html: string | null; raw: string },
): Promise<void> {
  await db.insert(mails).values(values);
}

export function listMails(db: Executor, limit = 200): Promise<MailRow[]> {
  return db.select().from(mails).orderBy(desc(mails.receivedAt)).limit(limit);
}
