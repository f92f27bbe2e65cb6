/** runs and run_items table access. */
import { and, asc, count, desc, eq, inArray, isNull, sql } from 'drizzle-orm';
import type { RunItemState } from '../../../shared/api/runs.ts';
import type { Executor } from '../../db/client.ts';
import { runItems, runs, users, type RunItemRow, type RunRow } from '../../db/schema/index.ts';

export async function insertRun(db: Executor, values: typeof runs.$inferInsert): Promise<RunRow> {
  const [row] = await db.insert(runs).values(values).returning();
  return row;
}

export async function insertRunItems(db: Executor, values: Array<typeof runItems.$inferInsert>): Promise<RunItemRow[]> {
  if (values.length === 0) return [];
  return db.insert(runItems).values(values).returning();
}

export async function findRun(db: Executor, runId: string): Promise<RunRow | undefined> {
  const [row] = await db.select().from(runs).where(eq(runs.id, runId));
  return row;
}

export function listRunItems(db: Executor, runId: string): Promise<RunItemRow[]> {
  return db.select().from(runItems).where(eq(runItems.runId, runId)).orderBy(asc(runItems.createdAt), asc(runItems.id));
}

export function listRunsOfInstrument(db: Executor, instrumentId: string, limit = 50): Promise<RunRow[]> {
  return db.select().from(runs).where(eq(runs.instrumentId, instrumentId)).orderBy(desc(runs.createdAt)).limit(limit);
}

/** The newest runs with their item counts and the starter's name, in one query (no per-run lookups). */
export function listRunSummaries(db: Executor, instrumentId: string, limit: number) {
  const countOf = (state: RunItemState) => sql<number>`count(${runItems.id}) FILTER (WHERE ${runItems.state} = ${state})::int`;
  return db
    .select({
      run: runs,
      createdByName: users.name,
      total: sql<number>`count(${runItems.id})::int`,
      done: countOf('done'),
      failed: countOf('failed'),
      cancelled: countOf('cancelled'),
    })
    .from(runs)
    .innerJoin(users, eq(users.id, runs.createdBy))
    .leftJoin(runItems, eq(runItems.runId, runs.id))
    .where(eq(runs.instrumentId, instrumentId))
    .groupBy(runs.id, users.name)
    .orderBy(desc(runs.createdAt), desc(runs.id))
    .limit(limit);
}

export async function findRunItem(db: Executor, itemId: string) {
  const [row] = await db.select({ item: runItems, run: runs }).from(runItems).innerJoin(runs, eq(runs.id, runItems.runId)).where(eq(runItems.id, itemId));
  return row;
}

/**
 * Take an item for `workerId`: queued → running, or running → running when the job came back
 * after its worker died. Done, failed and cancelled items are left alone (returns undefined),
 * which makes a duplicated job a no-op.
 */
export async function claimRunItem(db: Executor, itemId: string, workerId: string): Promise<RunItemRow | undefined> {
  const [row] = await db
    .update(runItems)
    .set({ state: 'running', workerId, attempts: sql`${runItems.attempts} + 1`, startedAt: sql`now()` })
    .where(and(eq(runItems.id, itemId), inArray(runItems.state, ['queued', 'running'])))
    .returning();
  return row;
}

export async function finishRunItem(
  db: Executor,
  itemId: string,
  workerId: string,
  values: { state: 'done' | 'failed'; message?: string | null; spectrumId?: string | null; versionNumber?: number | null },
): Promise<void> {
  await db
    .update(runItems)
    .set({ ...values, workerId, finishedAt: sql`now()` })
    .where(and(eq(runItems.id, itemId), eq(runItems.state, 'running')));
}

export async function markRunRunning(db: Executor, runId: string): Promise<void> {
  await db.update(runs).set({ state: 'running' }).where(and(eq(runs.id, runId), eq(runs.state, 'queued')));
}

export async function countItemStates(db: Executor, runId: string): Promise<Record<RunItemState, number>> {
  const rows = await db.select({ state: runItems.state, n: count() }).from(runItems).where(eq(runItems.runId, runId)).groupBy(runItems.state);
  const out: Record<RunItemState, number> = { queued: 0, running: 0, done: 0, failed: 0, cancelled: 0 };
  for (const r of rows) out[r.state] = Number(r.n);
  return out;
}

/** Set the final state once; returns the row only for the caller that finished it (it sends the notice). */
export async function finishRun(db: Executor, runId: string, state: RunRow['state']): Promise<RunRow | undefined> {
  const [row] = await db
    .update(runs)
    .set({ state, finishedAt: sql`now()`, notifiedAt: sql`now()` })
    .where(and(eq(runs.id, runId), isNull(runs.finishedAt)))
    .returning();
  return row;
}

export async function cancelQueuedItems(db: Executor, runId: string): Promise<string[]> {
  const rows = await db
    .update(runItems)
    .set({ state: 'cancelled', finishedAt: sql`now()`, message: 'cancelled before it started' })
    .where(and(eq(runItems.runId, runId), eq(runItems.state, 'queued')))
    .returning({ jobId: runItems.jobId });
  return rows.map((r) => r.jobId).filter((id): id is string => id !== null);
}

export async function setRunState(db: Executor, runId: string, state: RunRow['state']): Promise<void> {
  await db.update(runs).set({ state }).where(eq(runs.id, runId));
}

/** Failed items back to queued with a new job id each; the run reopens. Returns the items to enqueue. */
export async function requeueFailedItems(db: Executor, runId: string): Promise<Array<{ itemId: string; jobId: string }>> {
  const rows = await db
    .update(runItems)
    .set({ state: 'queued', message: null, finishedAt: null, jobId: sql`gen_random_uuid()` })
    .where(and(eq(runItems.runId, runId), eq(runItems.state, 'failed')))
    .returning({ itemId: runItems.id, jobId: runItems.jobId });
  if (rows.length > 0) await db.update(runs).set({ state: 'queued', finishedAt: null, notifiedAt: null }).where(eq(runs.id, runId));
  return rows.map((r) => ({ itemId: r.itemId, jobId: r.jobId! }));
}

export async function failItems(db: Executor, itemIds: string[], message: string): Promise<void> {
  if (itemIds.length === 0) return;
  await db.update(runItems).set({ state: 'failed', message, finishedAt: sql`now()` }).where(inArray(runItems.id, itemIds));
}
