/** frames table access. */
import { and, asc, desc, eq, gte, ilike, inArray, lt, ne, or, sql, type SQL } from 'drizzle-orm';
import type { ListFramesParams } from '../../../shared/api/frames.ts';
import type { Executor } from '../../db/client.ts';
import { calibrationVersions, frames, instruments, memberships, spectra, type FrameInsert, type FrameRow } from '../../db/schema/index.ts';

export interface FrameWithInstrument {
  frame: FrameRow;
  instrumentName: string;
}

export async function findFrameById(db: Executor, id: string): Promise<FrameWithInstrument | undefined> {
  const [row] = await db
    .select({ frame: frames, instrumentName: instruments.name })
    .from(frames)
    .innerJoin(instruments, eq(instruments.id, frames.instrumentId))
    .where(eq(frames.id, id));
  return row;
}

export function findFramesByIds(db: Executor, ids: string[]): Promise<FrameWithInstrument[]> {
  if (ids.length === 0) return Promise.resolve([]);
  return db
    .select({ frame: frames, instrumentName: instruments.name })
    .from(frames)
    .innerJoin(instruments, eq(instruments.id, frames.instrumentId))
    .where(inArray(frames.id, ids));
}

/** Existing rows of this instrument with one of these (sha256, page) pairs. */
export function findExistingPages(db: Executor, instrumentId: string, shas: string[]): Promise<FrameRow[]> {
  if (shas.length === 0) return Promise.resolve([]);
  return db
    .select()
    .from(frames)
    .where(and(eq(frames.instrumentId, instrumentId), inArray(frames.sha256, shas)));
}

export function insertFrames(db: Executor, values: FrameInsert[]): Promise<FrameRow[]> {
  return db.insert(frames).values(values).returning();
}

export async function updateFrameRow(db: Executor, id: string, values: Partial<FrameInsert>): Promise<FrameRow> {
  const [row] = await db.update(frames).set(values).where(eq(frames.id, id)).returning();
  return row!;
}

export async function deleteFrameRow(db: Executor, id: string): Promise<void> {
  await db.delete(frames).where(eq(frames.id, id));
}

/** How many frame rows (any instrument) point at this stored file. */
export async function countFramesWithSha(db: Executor, sha256: string, exceptId?: string): Promise<number> {
  const where = exceptId ? and(eq(frames.sha256, sha256), ne(frames.id, exceptId)) : eq(frames.sha256, sha256);
  const [row] = await db.select({ n: sql<number>`count(*)::int` }).from(frames).where(where);
  return row?.n ?? 0;
}

/** Serialises store writes and deletes of one file across transactions (released at commit/rollback). */
export async function lockStoredFile(db: Executor, sha256: string): Promise<void> {
  await db.execute(sql`select pg_advisory_xact_lock(hashtextextended(${`frame-file:${sha256}`}, 0))`);
}

export async function countSpectraOfFrame(db: Executor, frameId: string): Promise<number> {
  const [row] = await db.select({ n: sql<number>`count(*)::int` }).from(spectra).where(eq(spectra.frameId, frameId));
  return row?.n ?? 0;
}

/** Versions (not withdrawn) that were calibrated from this frame. */
export function versionsUsingFrame(db: Executor, frameId: string): Promise<{ number: number; state: string }[]> {
  return db
    .select({ number: calibrationVersions.number, state: calibrationVersions.state })
    .from(calibrationVersions)
    .where(and(sql`${frameId}::uuid = any(${calibrationVersions.frameIds})`, ne(calibrationVersions.state, 'withdrawn')));
}

const SORT_COLUMNS = {
  takenAt: frames.takenAt,
  createdAt: frames.createdAt,
  originalName: frames.originalName,
  scanValue: frames.scanValue,
  driverNm: frames.driverNm,
} as const;

/**
 * One page of frames the user may read: `readableBy` null = every instrument (site admin), else
 * the user whose memberships decide. Nulls sort last either way; id breaks ties so pages are stable.
 */
export async function listFrames(db: Executor, readableBy: string | null, query: ListFramesParams): Promise<{ rows: FrameWithInstrument[]; total: number }> {
  const where: SQL[] = [];
  if (readableBy) {
    where.push(
      inArray(
        frames.instrumentId,
        db.select({ id: memberships.instrumentId }).from(memberships).where(eq(memberships.userId, readableBy)),
      ),
    );
  }
  if (query.instrumentId) where.push(eq(frames.instrumentId, query.instrumentId));
  if (query.kind) where.push(eq(frames.kind, query.kind));
  if (query.tag) where.push(sql`${query.tag} = any(${frames.tags})`);
  if (query.from) where.push(gte(frames.takenAt, new Date(query.from)));
  if (query.to) where.push(lt(frames.takenAt, new Date(query.to)));
  if (query.q) {
    const like = `%${query.q.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
    where.push(or(ilike(frames.originalName, like), ilike(frames.target, like), ilike(frames.notes, like), ilike(frames.scanVariable, like))!);
  }
  const condition = where.length > 0 ? and(...where) : undefined;
  const column = SORT_COLUMNS[query.sort];
  const direction = query.order === 'asc' ? sql`asc nulls last` : sql`desc nulls last`;
  const rows = await db
    .select({ frame: frames, instrumentName: instruments.name })
    .from(frames)
    .innerJoin(instruments, eq(instruments.id, frames.instrumentId))
    .where(condition)
    .orderBy(sql`${column} ${direction}`, query.order === 'asc' ? asc(frames.page) : desc(frames.page), asc(frames.id))
    .limit(query.pageSize)
    .offset((query.page - 1) * query.pageSize);
  const [count] = await db.select({ n: sql<number>`count(*)::int` }).from(frames).where(condition);
  return { rows, total: count?.n ?? 0 };
}
