/** workbench_runs and calibration_versions table access, and the validity lookup. */
import { and, desc, eq, gt, inArray, isNull, lte, or, sql } from 'drizzle-orm';
import type { Executor } from '../../db/client.ts';
import type { VersionSpectrum } from '../../../shared/api/versions.ts';
import {
  calibrationVersions,
  frames,
  instruments,
  spectra,
  users,
  workbenchRuns,
  type CalibrationVersionRow,
  type WorkbenchRunRow,
} from '../../db/schema/index.ts';

type RunInsert = typeof workbenchRuns.$inferInsert;
type VersionInsert = typeof calibrationVersions.$inferInsert;

export async function insertRun(db: Executor, values: RunInsert): Promise<WorkbenchRunRow> {
  const [row] = await db.insert(workbenchRuns).values(values).returning();
  return row!;
}

export async function findRunById(db: Executor, id: string): Promise<WorkbenchRunRow | undefined> {
  const [row] = await db.select().from(workbenchRuns).where(eq(workbenchRuns.id, id));
  return row;
}

/**
 * Row lock on the instrument: every change of an instrument's versions takes it first, so
 * numbering and approvals of one instrument run one at a time (a second approval waits, then
 * sees the first one's result).
 */
export async function lockInstrument(db: Executor, instrumentId: string): Promise<void> {
  await db.select({ id: instruments.id }).from(instruments).where(eq(instruments.id, instrumentId)).for('update');
}

export async function nextVersionNumber(db: Executor, instrumentId: string): Promise<number> {
  const [row] = await db
    .select({ n: sql<number>`coalesce(max(${calibrationVersions.number}), 0)::int` })
    .from(calibrationVersions)
    .where(eq(calibrationVersions.instrumentId, instrumentId));
  return (row?.n ?? 0) + 1;
}

export async function insertVersion(db: Executor, values: VersionInsert): Promise<CalibrationVersionRow> {
  const [row] = await db.insert(calibrationVersions).values(values).returning();
  return row!;
}

export async function findVersionById(db: Executor, id: string): Promise<CalibrationVersionRow | undefined> {
  const [row] = await db.select().from(calibrationVersions).where(eq(calibrationVersions.id, id));
  return row;
}

export async function updateVersionRow(db: Executor, id: string, values: Partial<VersionInsert>): Promise<CalibrationVersionRow> {
  const [row] = await db.update(calibrationVersions).set(values).where(eq(calibrationVersions.id, id)).returning();
  return row!;
}

export function listVersionsOfInstrument(db: Executor, instrumentId: string): Promise<CalibrationVersionRow[]> {
  return db.select().from(calibrationVersions).where(eq(calibrationVersions.instrumentId, instrumentId)).orderBy(desc(calibrationVersions.number));
}

/** Approved and superseded versions: the ones that cover time. */
export function listEffectiveVersions(db: Executor, instrumentId: string): Promise<CalibrationVersionRow[]> {
  return db
    .select()
    .from(calibrationVersions)
    .where(and(eq(calibrationVersions.instrumentId, instrumentId), inArray(calibrationVersions.state, ['approved', 'superseded'])));
}

export function findPeople(db: Executor, ids: string[]): Promise<{ id: string; name: string; email: string }[]> {
  if (ids.length === 0) return Promise.resolve([]);
  return db.select({ id: users.id, name: users.name, email: users.email }).from(users).where(inArray(users.id, ids));
}

/**
 * The calibration version that applies to a frame taken at `t` on this instrument: the approved
 * or superseded version with validFrom ≤ t < validUntil (no validUntil = open end). Approved
 * intervals never overlap (approval enforces it), so at most one matches; the latest start wins
 * should old data ever disagree.
 */
export async function findVersionValidAt(db: Executor, instrumentId: string, t: Date): Promise<CalibrationVersionRow | undefined> {
  const [row] = await db
    .select()
    .from(calibrationVersions)
    .where(
      and(
        eq(calibrationVersions.instrumentId, instrumentId),
        inArray(calibrationVersions.state, ['approved', 'superseded']),
        lte(calibrationVersions.validFrom, t),
        or(isNull(calibrationVersions.validUntil), gt(calibrationVersions.validUntil, t)),
      ),
    )
    .orderBy(desc(calibrationVersions.validFrom))
    .limit(1);
  return row;
}

/** The spectra a version produced: how many, and the newest `limit` with their frames. */
export async function listSpectraOfVersion(db: Executor, versionId: string, limit = 100): Promise<{ count: number; rows: VersionSpectrum[] }> {
  const [{ count }] = await db.select({ count: sql<number>`count(*)::int` }).from(spectra).where(eq(spectra.versionId, versionId));
  const rows = await db
    .select({ frameId: spectra.frameId, frameName: frames.originalName, page: frames.page, takenAt: frames.takenAt, stale: spectra.stale, driftFlagged: spectra.driftFlagged, madeAt: spectra.createdAt })
    .from(spectra)
    .innerJoin(frames, eq(frames.id, spectra.frameId))
    .where(eq(spectra.versionId, versionId))
    .orderBy(desc(spectra.createdAt))
    .limit(limit);
  return {
    count,
    rows: rows.map((r) => ({
      frameId: r.frameId,
      frameName: r.page > 0 ? `${r.frameName} [page ${r.page}]` : r.frameName,
      takenAt: r.takenAt.toISOString(),
      stale: r.stale,
      driftFlagged: r.driftFlagged,
      madeAt: r.madeAt.toISOString(),
    })),
  };
}
