/** instruments table access. */
import { and, asc, eq, ne } from 'drizzle-orm';
import type { Role } from '../../../shared/api/members.ts';
import type { Executor } from '../../db/client.ts';
import { instruments, memberships, type InstrumentRow } from '../../db/schema/index.ts';

type InstrumentInsert = typeof instruments.$inferInsert;

export async function findInstrumentById(db: Executor, id: string): Promise<InstrumentRow | undefined> {
  const [row] = await db.select().from(instruments).where(eq(instruments.id, id));
  return row;
}

/** Another instrument with this name (case-sensitive, as the unique constraint). */
export async function findInstrumentByName(db: Executor, name: string, exceptId?: string): Promise<InstrumentRow | undefined> {
  const where = exceptId ? and(eq(instruments.name, name), ne(instruments.id, exceptId)) : eq(instruments.name, name);
  const [row] = await db.select().from(instruments).where(where);
  return row;
}

/** Instruments the user is a member of, with the role. */
export function listInstrumentsOfMember(db: Executor, userId: string): Promise<{ instrument: InstrumentRow; role: Role | null }[]> {
  return db
    .select({ instrument: instruments, role: memberships.role })
    .from(instruments)
    .innerJoin(memberships, and(eq(memberships.instrumentId, instruments.id), eq(memberships.userId, userId)))
    .orderBy(asc(instruments.name));
}

/** Every instrument, with the user's role where they are a member (for site admins). */
export function listAllInstruments(db: Executor, userId: string): Promise<{ instrument: InstrumentRow; role: Role | null }[]> {
  return db
    .select({ instrument: instruments, role: memberships.role })
    .from(instruments)
    .leftJoin(memberships, and(eq(memberships.instrumentId, instruments.id), eq(memberships.userId, userId)))
    .orderBy(asc(instruments.name));
}

export async function insertInstrument(db: Executor, values: InstrumentInsert): Promise<InstrumentRow> {
  const [row] = await db.insert(instruments).values(values).returning();
  return row!;
}

export async function updateInstrumentRow(db: Executor, id: string, values: Partial<InstrumentInsert>): Promise<InstrumentRow> {
  const [row] = await db.update(instruments).set(values).where(eq(instruments.id, id)).returning();
  return row!;
}

export async function deleteInstrumentRow(db: Executor, id: string): Promise<void> {
  await db.delete(instruments).where(eq(instruments.id, id));
}
