/** spectra and drift_episodes table access. */
import { and, asc, desc, eq, gte, inArray, isNotNull, isNull, lt, sql } from 'drizzle-orm';
import type { Executor } from '../../db/client.ts';
import { calibrationVersions, driftEpisodes, frames, spectra, type SpectrumRow } from '../../db/schema/index.ts';

export type SpectrumUpsert = Omit<typeof spectra.$inferInsert, 'id' | 'createdAt' | 'updatedAt' | 'stale'>;

/**
 * Insert or replace the spectrum of (frame, version): the unique key makes a retried or
 * duplicated job update the one row instead of adding another. A re-made spectrum is fresh.
 */
export async function upsertSpectrum(db: Executor, values: SpectrumUpsert): Promise<SpectrumRow> {
  const [row] = await db
    .insert(spectra)
    .values({ ...values, stale: false })
    .onConflictDoUpdate({
      target: [spectra.frameId, spectra.versionId],
      set: {
        result: values.result,
        regions: values.regions,
        regionsSource: values.regionsSource,
        driftShiftPx: values.driftShiftPx,
        driftShiftPxSigma: values.driftShiftPxSigma,
        driftShiftMeV: values.driftShiftMeV,
        driftShiftMeVSigma: values.driftShiftMeVSigma,
        driftMatchedPeaks: values.driftMatchedPeaks,
        driftFlagged: values.driftFlagged,
        versionNumber: values.versionNumber,
        createdBy: values.createdBy,
        createdAt: sql`now()`,
        stale: false,
        updatedAt: sql`now()`,
      },
    })
    .returning();
  return row;
}

export async function findSpectrum(db: Executor, frameId: string, versionId: string): Promise<SpectrumRow | undefined> {
  const [row] = await db
    .select()
    .from(spectra)
    .where(and(eq(spectra.frameId, frameId), eq(spectra.versionId, versionId)));
  return row;
}

export async function findSpectrumById(db: Executor, id: string): Promise<SpectrumRow | undefined> {
  const [row] = await db.select().from(spectra).where(eq(spectra.id, id));
  return row;
}

/** Mark (or clear) every spectrum of a version as stale. */
export async function markVersionSpectraStale(db: Executor, versionId: string, stale: boolean): Promise<number> {
  const rows = await db.update(spectra).set({ stale }).where(eq(spectra.versionId, versionId)).returning({ id: spectra.id });
  return rows.length;
}

export async function setSpectrumStale(db: Executor, id: string, stale: boolean): Promise<void> {
  await db.update(spectra).set({ stale }).where(eq(spectra.id, id));
}

/** Frames of an instrument that have a stale spectrum and no fresh one: what "re-apply" redoes. */
export async function listStaleFrameIds(db: Executor, instrumentId: string): Promise<string[]> {
  const rows = await db
    .selectDistinct({ frameId: spectra.frameId })
    .from(spectra)
    .where(
      and(
        eq(spectra.instrumentId, instrumentId),
        eq(spectra.stale, true),
        sql`NOT EXISTS (SELECT 1 FROM spectra fresh WHERE fresh.frame_id = ${spectra.frameId} AND NOT fresh.stale)`,
      ),
    );
  return rows.map((r) => r.frameId);
}

export function listSpectraOfInstrument(db: Executor, instrumentId: string) {
  return db.select().from(spectra).where(eq(spectra.instrumentId, instrumentId)).orderBy(asc(spectra.createdAt));
}

/** Every spectrum of these frames (for a run's scan), newest first per frame. */
export function listSpectraOfFrames(db: Executor, frameIds: string[]) {
  if (frameIds.length === 0) return Promise.resolve([] as SpectrumRow[]);
  return db
    .select()
    .from(spectra)
    .where(inArray(spectra.frameId, frameIds))
    .orderBy(desc(spectra.updatedAt));
}

export async function findOpenEpisode(db: Executor, instrumentId: string) {
  const [row] = await db
    .select()
    .from(driftEpisodes)
    .where(and(eq(driftEpisodes.instrumentId, instrumentId), isNull(driftEpisodes.closedAt)));
  return row;
}

/** Open an episode unless one is open; returns the new row, or undefined when one already was (so only one caller notifies). */
export async function openEpisode(db: Executor, values: { instrumentId: string; firstSpectrumId: string; firstFrameId: string }) {
  const rows = await db
    .insert(driftEpisodes)
    .values(values)
    .onConflictDoNothing({ target: driftEpisodes.instrumentId, where: sql`${driftEpisodes.closedAt} IS NULL` })
    .returning();
  return rows[0];
}

export async function closeEpisode(db: Executor, instrumentId: string): Promise<void> {
  await db
    .update(driftEpisodes)
    .set({ closedAt: sql`now()` })
    .where(and(eq(driftEpisodes.instrumentId, instrumentId), isNull(driftEpisodes.closedAt)));
}

export function listEpisodes(db: Executor, instrumentId: string, from?: Date, to?: Date) {
  const conditions = [eq(driftEpisodes.instrumentId, instrumentId)];
  if (from) conditions.push(gte(driftEpisodes.openedAt, from));
  if (to) conditions.push(lt(driftEpisodes.openedAt, to));
  return db
    .select()
    .from(driftEpisodes)
    .where(and(...conditions))
    .orderBy(asc(driftEpisodes.openedAt));
}

/** Drift points: the fresh spectrum of each frame with a measured shift, ordered by frame time. */
export function listDriftRows(db: Executor, instrumentId: string, from?: Date, to?: Date) {
  const conditions = [eq(spectra.instrumentId, instrumentId), eq(spectra.stale, false), isNotNull(spectra.driftShiftPx)];
  if (from) conditions.push(gte(frames.takenAt, from));
  if (to) conditions.push(lt(frames.takenAt, to));
  return db
    .select({ spectrum: spectra, takenAt: frames.takenAt })
    .from(spectra)
    .innerJoin(frames, eq(frames.id, spectra.frameId))
    .where(and(...conditions))
    .orderBy(asc(frames.takenAt), desc(spectra.updatedAt));
}

/** Spectra of versions that are approved (again) are current: clear their stale mark. */
export async function clearStaleOfApprovedVersions(db: Executor, instrumentId: string): Promise<void> {
  await db
    .update(spectra)
    .set({ stale: false })
    .where(
      and(
        eq(spectra.instrumentId, instrumentId),
        eq(spectra.stale, true),
        inArray(spectra.versionId, db.select({ id: calibrationVersions.id }).from(calibrationVersions).where(eq(calibrationVersions.state, 'approved'))),
      ),
    );
}

/** The instrument's spectra with their frame and version facts, newest frame first. */
export function listSpectrumSummaries(db: Executor, instrumentId: string, options: { stale?: boolean; limit: number }) {
  const conditions = [eq(spectra.instrumentId, instrumentId)];
  if (options.stale !== undefined) conditions.push(eq(spectra.stale, options.stale));
  return db
    .select({
      spectrum: spectra,
      frameName: frames.originalName,
      takenAt: frames.takenAt,
      versionState: calibrationVersions.state,
    })
    .from(spectra)
    .innerJoin(frames, eq(frames.id, spectra.frameId))
    .innerJoin(calibrationVersions, eq(calibrationVersions.id, spectra.versionId))
    .where(and(...conditions))
    .orderBy(desc(frames.takenAt), desc(spectra.updatedAt))
    .limit(options.limit);
}
