/** Read-only listing of an instrument's spectra with their frame and version facts. */
import { and, desc, eq, sql } from 'drizzle-orm';
import type { Executor } from '../../db/client.ts';
import { calibrationVersions, frames, spectra } from '../../db/schema/index.ts';

export function listSpectrumSummaries(db: Executor, instrumentId: string, options: { stale?: boolean; limit: number }) {
  const conditions = [eq(spectra.instrumentId, instrumentId)];
  if (options.stale !== undefined) conditions.push(eq(spectra.stale, options.stale));
  return db
    .select({
      id: spectra.id,
      frameId: spectra.frameId,
      frameName: frames.originalName,
      takenAt: frames.takenAt,
      versionId: spectra.versionId,
      version: spectra.versionNumber,
      versionState: calibrationVersions.state,
      stale: spectra.stale,
      driftFlagged: spectra.driftFlagged,
      createdAt: spectra.createdAt,
      updatedAt: spectra.updatedAt,
    })
    .from(spectra)
    .innerJoin(frames, eq(frames.id, spectra.frameId))
    .innerJoin(calibrationVersions, eq(calibrationVersions.id, spectra.versionId))
    .where(and(...conditions))
    .orderBy(desc(frames.takenAt), desc(spectra.updatedAt))
    .limit(options.limit);
}

/** Frames with a stale spectrum and no fresh one (the re-apply route's selection, counted). */
export async function countStaleFrames(db: Executor, instrumentId: string): Promise<number> {
  const [row] = await db
    .select({ n: sql<number>`count(DISTINCT ${spectra.frameId})::int` })
    .from(spectra)
    .where(
      and(
        eq(spectra.instrumentId, instrumentId),
        eq(spectra.stale, true),
        sql`NOT EXISTS (SELECT 1 FROM spectra fresh WHERE fresh.frame_id = ${spectra.frameId} AND NOT fresh.stale)`,
      ),
    );
  return row?.n ?? 0;
}
