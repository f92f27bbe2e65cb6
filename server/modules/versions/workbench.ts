/**
 * Workbench runs: the engine's calibrate pipeline on stored frames. Owners, scientists and site
 * admins run it; any member reads a run. The run is stored (and audited) so that a draft version
 * cites it instead of numbers a client sent.
 */
import type { Regions } from '../../../shared/api/frames.ts';
import type { SessionUser } from '../../../shared/api/session.ts';
import type { WorkbenchRun, WorkbenchRunInputs } from '../../../shared/api/workbench.ts';
import { calibrateFrame } from '../../../shared/engine/calibrate.ts';
import { EngineError } from '../../../shared/engine/errors.ts';
import { decodeFrame } from '../../../shared/engine/frames/index.ts';
import type { Frame as EngineFrame, InstrumentProfile } from '../../../shared/engine/types.ts';
import type { Db } from '../../db/client.ts';
import type { FrameRow, InstrumentRow, WorkbenchRunRow } from '../../db/schema/index.ts';
import { instrumentAccess, requireRole } from '../../auth/access.ts';
import { HttpError, NotFoundError, ValidationError } from '../../lib/errors.ts';
import type { FrameStore } from '../../storage/frame-store.ts';
import { recordAudit } from '../audit/service.ts';
import { findFramesByIds } from '../frames/queries.ts';
import { combineResults } from './combine.ts';
import { findRunById, insertRun } from './queries.ts';

export const WORKBENCH_ROLES = ['owner', 'scientist'] as const;

export function toWorkbenchRun(row: WorkbenchRunRow): WorkbenchRun {
  return { id: row.id, instrumentId: row.instrumentId, createdAt: row.createdAt.toISOString(), createdBy: row.createdBy, inputs: row.inputs, result: row.result };
}

/** The engine's profile of an instrument (the API stores it without `name`). */
export function engineProfile(instrument: InstrumentRow): InstrumentProfile {
  return { ...(instrument.profile as Omit<InstrumentProfile, 'name'>), name: instrument.name };
}

async function decodeStored(store: FrameStore, row: FrameRow, cache: Map<string, Uint8Array>): Promise<EngineFrame> {
  let bytes = cache.get(row.sha256);
  if (!bytes) {
    bytes = await store.get(row.sha256);
    cache.set(row.sha256, bytes);
  }
  try {
    return await decodeFrame(bytes, { page: row.page });
  } catch (error) {
    // Stored files decoded at upload; a failure now means the store is damaged.
    if (error instanceof EngineError) throw new HttpError(500, 'internal', `Stored file of frame ${row.id} no longer decodes: ${error.message}`);
    throw error;
  }
}

function pickRegions(input: WorkbenchRunInputs, frame: FrameRow, instrument: InstrumentRow): { regions: Regions | null; source: WorkbenchRun['inputs']['regionsSource'] } {
  if (input.regions) return { regions: input.regions, source: 'request' };
  if (frame.regions) return { regions: frame.regions, source: 'frame' };
  if (instrument.regions) return { regions: instrument.regions, source: 'instrument' };
  return { regions: null, source: 'automatic' };
}

export async function runWorkbench(deps: { db: Db; store: FrameStore }, user: SessionUser, instrumentId: string, input: WorkbenchRunInputs): Promise<WorkbenchRun> {
  const { db, store } = deps;
  const access = await requireRole(db, user, instrumentId, WORKBENCH_ROLES, 'run the workbench');
  const instrument = access.instrument;
  const frameIds = [...new Set(input.frameIds)];
  const ids = input.darkFrameId ? [...frameIds, input.darkFrameId] : frameIds;
  const found = new Map((await findFramesByIds(db, ids)).filter((f) => f.frame.instrumentId === instrumentId).map((f) => [f.frame.id, f.frame]));
  const missing = ids.filter((id) => !found.has(id));
  if (missing.length > 0) throw new NotFoundError(`No such frame on this instrument: ${missing.join(', ')}.`);
  const signals = frameIds.map((id) => found.get(id)!);
  const notSignal = signals.filter((f) => f.kind !== 'signal');
  if (notSignal.length > 0) throw new ValidationError(`frameIds must be signal frames; ${notSignal.map((f) => f.originalName).join(', ')} is marked dark (pass it as darkFrameId).`);
  const darkRow = input.darkFrameId ? found.get(input.darkFrameId)! : undefined;
  if (darkRow && darkRow.kind !== 'dark') throw new ValidationError(`darkFrameId must be a dark frame; ${darkRow.originalName} is marked signal.`);

  const cache = new Map<string, Uint8Array>();
  const dark = darkRow ? await decodeStored(store, darkRow, cache) : undefined;
  const profile = engineProfile(instrument);
  const results = [];
  let firstRegions: ReturnType<typeof pickRegions> | undefined;
  for (const row of signals) {
    const frame = await decodeStored(store, row, cache);
    if (dark && (dark.width !== frame.width || dark.height !== frame.height)) {
      throw new ValidationError(`The dark frame is ${dark.width} x ${dark.height} px but ${row.originalName} is ${frame.width} x ${frame.height} px.`);
    }
    const picked = pickRegions(input, row, instrument);
    firstRegions ??= picked;
    // A frame's recorded filters were in its beam: they always apply to its own peaks.
    const filters = [...new Set([...input.filters, ...row.filters])];
    const result = calibrateFrame(frame, {
      profile,
      driverNm: input.driverNm,
      driverTolerancePct: input.driverTolerancePct,
      blueShiftPct: input.blueShiftPct,
      parity: input.parity,
      filters,
      pins: input.pins,
      knownLines: input.knownLines,
      dark,
      signal: picked.regions?.signal,
      background: picked.regions && picked.regions.background.length > 0 ? picked.regions.background : undefined,
      lineShape: picked.regions?.lineShape,
      model: input.model,
    });
    // A known line the frame cannot use is bad input, not a failed calibration: refuse, store nothing.
    if (result.badOption) {
      const field = `${result.badOption.name}.${result.badOption.index}`;
      throw new ValidationError(`${field}: ${result.message}${signals.length > 1 ? ` (frame ${row.originalName})` : ''}`, { issues: [{ path: field, message: result.message }] });
    }
    results.push({ frameId: row.id, label: `${row.originalName}${row.pageCount > 1 ? ` page ${row.page + 1}` : ''}`, result });
  }
  const result = combineResults(results);
  const inputs = { ...input, frameIds, regionsUsed: firstRegions?.regions ?? null, regionsSource: firstRegions?.source ?? 'automatic' } satisfies WorkbenchRun['inputs'];
  return db.transaction(async (tx) => {
    const row = await insertRun(tx, { instrumentId, createdBy: user.id, status: result.status, inputs, result });
    await recordAudit(tx, {
      actorId: user.id,
      action: 'workbench.run',
      entityType: 'workbench_run',
      entityId: row.id,
      instrumentId,
      before: null,
      after: { inputs, status: result.status, message: result.message },
    });
    return toWorkbenchRun(row);
  });
}

/** Any member of the run's instrument reads it; others get 404. */
export async function getWorkbenchRun(db: Db, user: SessionUser, runId: string): Promise<WorkbenchRun> {
  const row = await findRunById(db, runId);
  if (!row) throw new NotFoundError('No such workbench run.');
  try {
    await instrumentAccess(db, user, row.instrumentId);
  } catch (error) {
    if (error instanceof NotFoundError) throw new NotFoundError('No such workbench run.');
    throw error;
  }
  return toWorkbenchRun(row);
}
