/**
 * What spectra read from issue 4's tables (frames, calibration versions, instrument regions),
 * behind one small interface so this module depends on their shape in one place.
 */
import type { Regions } from '../../../shared/api/frames.ts';
import type { Calibration } from '../../../shared/engine/types.ts';
import { and, asc, eq, inArray } from 'drizzle-orm';
import type { Executor } from '../../db/client.ts';
import { calibrationVersions, frames, instruments, type CalibrationVersionRow, type FrameRow } from '../../db/schema/index.ts';
import { findVersionValidAt } from '../versions/queries.ts';

export interface FrameFacts {
  id: string;
  instrumentId: string;
  sha256: string;
  page: number;
  kind: 'signal' | 'dark';
  takenAt: Date;
  regions: Regions | null;
  scanVariable: string | null;
  scanValue: number | null;
  /** The frame's own parity ('all' for a two-colour frame), when recorded; overrides the calibration's when labelling. */
  parity: 'odd' | 'all' | null;
}

export interface VersionFacts {
  id: string;
  instrumentId: string;
  number: number;
  state: string;
  calibration: Calibration;
}

export interface SpectrumSources {
  frame(db: Executor, frameId: string): Promise<FrameFacts | undefined>;
  /** Signal frames of an instrument: the given ids (only those on the instrument), or all with a scan variable. */
  framesOf(db: Executor, instrumentId: string, select: { ids: string[] } | { scanVariable: string }): Promise<FrameFacts[]>;
  /** The approved or superseded version whose validity covers t. */
  versionValidAt(db: Executor, instrumentId: string, t: Date): Promise<VersionFacts | undefined>;
  versionByNumber(db: Executor, instrumentId: string, number: number): Promise<VersionFacts | undefined>;
  instrumentRegions(db: Executor, instrumentId: string): Promise<Regions | null>;
}

/** The sources over issue 4's tables; the validity lookup is theirs (`findVersionValidAt`). */
export const dbSources: SpectrumSources = {
  async frame(db, frameId) {
    const [row] = await db.select().from(frames).where(eq(frames.id, frameId));
    return row ? toFacts(row) : undefined;
  },
  async framesOf(db, instrumentId, select) {
    const where =
      'ids' in select
        ? and(eq(frames.instrumentId, instrumentId), inArray(frames.id, select.ids.length > 0 ? select.ids : ['00000000-0000-0000-0000-000000000000']))
        : and(eq(frames.instrumentId, instrumentId), eq(frames.scanVariable, select.scanVariable), eq(frames.kind, 'signal'));
    const rows = await db.select().from(frames).where(where).orderBy(asc(frames.scanValue), asc(frames.takenAt));
    return rows.map(toFacts);
  },
  async versionValidAt(db, instrumentId, t) {
    const row = await findVersionValidAt(db, instrumentId, t);
    return row ? toVersionFacts(row) : undefined;
  },
  async versionByNumber(db, instrumentId, number) {
    const [row] = await db
      .select()
      .from(calibrationVersions)
      .where(and(eq(calibrationVersions.instrumentId, instrumentId), eq(calibrationVersions.number, number)));
    return row ? toVersionFacts(row) : undefined;
  },
  async instrumentRegions(db, instrumentId) {
    const [row] = await db.select({ regions: instruments.regions }).from(instruments).where(eq(instruments.id, instrumentId));
    return row?.regions ?? null;
  },
};

function toFacts(row: FrameRow): FrameFacts {
  return {
    id: row.id,
    instrumentId: row.instrumentId,
    sha256: row.sha256,
    page: row.page,
    kind: row.kind,
    takenAt: row.takenAt,
    regions: row.regions ?? null,
    scanVariable: row.scanVariable,
    scanValue: row.scanValue,
    parity: row.parity ?? null,
  };
}

function toVersionFacts(row: CalibrationVersionRow): VersionFacts {
  return { id: row.id, instrumentId: row.instrumentId, number: row.number, state: row.state, calibration: row.calibration };
}
