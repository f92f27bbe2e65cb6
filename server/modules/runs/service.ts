/**
 * Runs: apply calibrations to many frames in the background. Creating a run stores the run and
 * one item per frame in one transaction (with its audit event), then queues one job per item.
 * Workers (`processApplyItem`) make each spectrum through the spectra service, whose upsert on
 * (frame, version) keeps one row per pair however often a job runs.
 */
import { randomUUID } from 'node:crypto';
import { analyseScan, type ScanFrame } from '../../../shared/analysis/scan.ts';
import type { SinusoidOptions } from '../../../shared/analysis/sinusoid.ts';
import type { Run, RunState, RunSummary, ScanResponse } from '../../../shared/api/runs.ts';
import type { SessionUser } from '../../../shared/api/session.ts';
import { EngineError } from '../../../shared/engine/errors.ts';
import type { createRunSchema } from '../../../shared/api/runs.ts';
import { instrumentAccess, type InstrumentAccess } from '../../auth/access.ts';
import type { Executor } from '../../db/client.ts';
import type { RunItemRow, RunRow } from '../../db/schema/index.ts';
import { ForbiddenError, HttpError, NotFoundError, ValidationError } from '../../lib/errors.ts';
import { recordAudit } from '../audit/service.ts';
import { notifyRunFinished } from '../notices/service.ts';
import { listSpectraOfFrames, listStaleFrameIds, setSpectrumStale } from '../spectra/queries.ts';
import { makeSpectrum, mayMakeSpectra, resolveVersion, type SpectraDeps } from '../spectra/service.ts';
import type { ApplyQueue } from './queue.ts';
import {
  cancelQueuedItems,
  claimRunItem,
  countItemStates,
  failItems,
  findRun,
  findRunItem,
  finishRun,
  finishRunItem,
  insertRun,
  insertRunItems,
  listRunItems,
  listRunSummaries,
  markRunRunning,
  requeueFailedItems,
  setRunState,
} from './queries.ts';

export interface RunsDeps extends SpectraDeps {
  queue: ApplyQueue;
}

type CreateRun = ReturnType<typeof createRunSchema.parse>;

function requireMaker(access: InstrumentAccess): void {
  if (!mayMakeSpectra(access)) throw new ForbiddenError('Viewers cannot make spectra or start runs.');
}

/** Owners, scientists and admins manage every run; students their own. */
function requireRunManager(access: InstrumentAccess, run: RunRow, user: SessionUser): void {
  if (access.isAdmin || access.role === 'owner' || access.role === 'scientist') return;
  if (access.role === 'student' && run.createdBy === user.id) return;
  throw new ForbiddenError(access.role === 'student' ? 'Students may cancel or retry only their own runs.' : 'Viewers cannot cancel or retry runs.');
}

export function toRun(run: RunRow, items: RunItemRow[]): Run {
  const n = (s: string) => items.filter((i) => i.state === s).length;
  return {
    id: run.id,
    instrumentId: run.instrumentId,
    kind: run.kind,
    state: run.state,
    version: run.versionNumber ?? 'valid',
    scanVariable: run.scanVariable,
    period: run.period?.value ?? null,
    total: items.length,
    done: n('done'),
    failed: n('failed'),
    cancelled: n('cancelled'),
    createdBy: run.createdBy,
    createdAt: run.createdAt.toISOString(),
    finishedAt: run.finishedAt?.toISOString() ?? null,
    items: items.map((i) => ({
      frameId: i.frameId,
      state: i.state,
      message: i.message,
      workerId: i.workerId,
      spectrumId: i.spectrumId,
      version: i.versionNumber,
      attempts: i.attempts,
    })),
  };
}

async function startRun(
  deps: RunsDeps,
  user: SessionUser,
  instrumentId: string,
  values: { kind: 'apply' | 'reapply'; frameIds: string[]; versionNumber: number | null; scanVariable: string | null; period: CreateRun['period'] },
): Promise<Run> {
  const { run, items } = await deps.db.transaction(async (tx) => {
    const run = await insertRun(tx, {
      instrumentId,
      kind: values.kind,
      versionNumber: values.versionNumber,
      scanVariable: values.scanVariable,
      period: values.period !== undefined ? { value: values.period } : null,
      createdBy: user.id,
    });
    const items = await insertRunItems(
      tx,
      values.frameIds.map((frameId) => ({ runId: run.id, frameId, jobId: randomUUID() })),
    );
    await recordAudit(tx, {
      actorId: user.id,
      action: values.kind === 'reapply' ? 'run.reapply' : 'run.create',
      entityType: 'run',
      entityId: run.id,
      instrumentId,
      before: null,
      after: { frames: items.length, version: values.versionNumber ?? 'valid', scanVariable: values.scanVariable },
    });
    return { run, items };
  });
  try {
    await deps.queue.enqueue(items.map((i) => ({ itemId: i.id, jobId: i.jobId! })));
  } catch (error) {
    // The run is stored; without jobs its items would wait forever, so say why they failed.
    await failItems(
      deps.db,
      items.map((i) => i.id),
      `could not be queued: ${(error as Error).message}`,
    );
    await maybeFinishRun(deps, run.id);
  }
  return toRun((await findRun(deps.db, run.id))!, await listRunItems(deps.db, run.id));
}

/** POST /api/instruments/:instrumentId/runs */
export async function createRun(deps: RunsDeps, user: SessionUser, instrumentId: string, input: CreateRun): Promise<Run> {
  const access = await instrumentAccess(deps.db, user, instrumentId);
  requireMaker(access);
  const versionNumber = input.version === 'valid' ? null : input.version;
  if (versionNumber !== null) {
    const v = await deps.sources.versionByNumber(deps.db, instrumentId, versionNumber);
    if (!v) throw new NotFoundError(`This instrument has no calibration version ${versionNumber}.`);
    if (v.state === 'withdrawn') throw new HttpError(409, 'state', `Version ${versionNumber} is withdrawn and cannot be applied.`);
  }
  const ids = input.frameIds ? [...new Set(input.frameIds)] : null;
  const frames = await deps.sources.framesOf(deps.db, instrumentId, ids ? { ids } : { scanVariable: input.scanVariable! });
  if (ids) {
    const found = new Set(frames.map((f) => f.id));
    const missing = ids.filter((id) => !found.has(id));
    if (missing.length > 0) throw new NotFoundError(`No such frame on this instrument: ${missing.slice(0, 5).join(', ')}${missing.length > 5 ? '…' : ''}`);
    const dark = frames.filter((f) => f.kind === 'dark');
    if (dark.length > 0) throw new ValidationError(`Dark frames cannot be applied: ${dark.map((f) => f.id).join(', ')}`);
  }
  if (frames.length === 0) throw new ValidationError(`No signal frames on this instrument have scan variable "${input.scanVariable}".`);
  const scanVariable = input.scanVariable ?? (frames.every((f) => f.scanVariable && f.scanVariable === frames[0].scanVariable) ? frames[0].scanVariable : null);
  return startRun(deps, user, instrumentId, { kind: 'apply', frameIds: frames.map((f) => f.id), versionNumber, scanVariable, period: input.period });
}

/** POST /api/instruments/:instrumentId/spectra/reapply: every frame whose spectra are all stale, with the now-valid version. */
export async function reapplyStale(deps: RunsDeps, user: SessionUser, instrumentId: string): Promise<Run> {
  const access = await instrumentAccess(deps.db, user, instrumentId);
  requireMaker(access);
  const frameIds = await listStaleFrameIds(deps.db, instrumentId);
  if (frameIds.length === 0) throw new HttpError(409, 'conflict', 'No stale spectra on this instrument: nothing to re-apply.');
  return startRun(deps, user, instrumentId, { kind: 'reapply', frameIds, versionNumber: null, scanVariable: null, period: undefined });
}

async function runWithAccess(deps: RunsDeps, user: SessionUser, runId: string) {
  const run = await findRun(deps.db, runId);
  if (!run) throw new NotFoundError('No such run.');
  const access = await instrumentAccess(deps.db, user, run.instrumentId).catch(() => {
    throw new NotFoundError('No such run.');
  });
  return { run, access };
}

export async function getRun(deps: RunsDeps, user: SessionUser, runId: string): Promise<Run> {
  const { run } = await runWithAccess(deps, user, runId);
  return toRun(run, await listRunItems(deps.db, runId));
}

/** Every member (viewers too) reads the instrument's recent runs; non-members get 404 from instrumentAccess. */
export async function listRuns(db: Executor, user: SessionUser, instrumentId: string, limit: number): Promise<RunSummary[]> {
  await instrumentAccess(db, user, instrumentId);
  const rows = await listRunSummaries(db, instrumentId, limit);
  return rows.map(({ run, createdByName, total, done, failed, cancelled }) => ({
    id: run.id,
    kind: run.kind,
    state: run.state,
    version: run.versionNumber ?? 'valid',
    scanVariable: run.scanVariable,
    total,
    done,
    failed,
    cancelled,
    createdBy: run.createdBy,
    createdByName,
    createdAt: run.createdAt.toISOString(),
    finishedAt: run.finishedAt?.toISOString() ?? null,
  }));
}

/** Queued items are cancelled (their jobs too); running ones finish. */
export async function cancelRun(deps: RunsDeps, user: SessionUser, runId: string): Promise<Run> {
  const { run, access } = await runWithAccess(deps, user, runId);
  requireRunManager(access, run, user);
  if (run.finishedAt) throw new HttpError(409, 'state', `The run is already ${run.state}.`);
  const jobIds = await deps.db.transaction(async (tx) => {
    const ids = await cancelQueuedItems(tx, runId);
    await setRunState(tx, runId, 'cancelled');
    await recordAudit(tx, { actorId: user.id, action: 'run.cancel', entityType: 'run', entityId: runId, instrumentId: run.instrumentId, before: { state: run.state }, after: { state: 'cancelled', cancelledItems: ids.length } });
    return ids;
  });
  await deps.queue.cancel(jobIds);
  await maybeFinishRun(deps, runId);
  return getRun(deps, user, runId);
}

/** Failed items only, each with a new job. */
export async function retryRun(deps: RunsDeps, user: SessionUser, runId: string): Promise<Run> {
  const { run, access } = await runWithAccess(deps, user, runId);
  requireRunManager(access, run, user);
  const requeued = await deps.db.transaction(async (tx) => {
    const items = await requeueFailedItems(tx, runId);
    if (items.length === 0) throw new HttpError(409, 'state', 'The run has no failed frames to retry.');
    await recordAudit(tx, { actorId: user.id, action: 'run.retry', entityType: 'run', entityId: runId, instrumentId: run.instrumentId, before: { state: run.state }, after: { retried: items.length } });
    return items;
  });
  await deps.queue.enqueue(requeued);
  return getRun(deps, user, runId);
}

/** Finish the run when no item is queued or running; the caller that finishes it sends the notice. */
export async function maybeFinishRun(deps: RunsDeps | SpectraDeps, runId: string): Promise<void> {
  const counts = await countItemStates(deps.db, runId);
  if (counts.queued + counts.running > 0) return;
  const run = await findRun(deps.db, runId);
  if (!run || run.finishedAt) return;
  const state: RunState = run.state === 'cancelled' ? 'cancelled' : counts.done === 0 && counts.failed > 0 ? 'failed' : 'done';
  const finished = await finishRun(deps.db, runId, state);
  if (!finished) return;
  await notifyRunFinished(deps, {
    runId,
    instrumentId: run.instrumentId,
    starterId: run.createdBy,
    state,
    total: counts.queued + counts.running + counts.done + counts.failed + counts.cancelled,
    done: counts.done,
    failed: counts.failed,
    cancelled: counts.cancelled,
  });
}

export interface JobMeta {
  retryCount: number;
  retryLimit: number;
}

/**
 * One job: make the item's spectrum. Errors about the frame or calibration (no calibration,
 * engine refusals) fail the item at once; unexpected errors are rethrown so pg-boss retries,
 * and fail the item on the last attempt.
 */
export async function processApplyItem(deps: SpectraDeps, itemId: string, workerId: string, meta: JobMeta): Promise<void> {
  const found = await findRunItem(deps.db, itemId);
  if (!found) return;
  const claimed = await claimRunItem(deps.db, itemId, workerId);
  if (!claimed) return;
  const { run } = found;
  await markRunRunning(deps.db, run.id);
  try {
    const frame = await deps.sources.frame(deps.db, claimed.frameId);
    if (!frame) throw new NotFoundError('The frame was deleted.');
    const version = await resolveVersion(deps, frame, run.versionNumber);
    const row = await makeSpectrum(deps, frame, version, run.createdBy);
    // Re-applying found the same version still valid at the frame's time: its spectrum stands.
    if (run.kind === 'reapply' && row.stale) await setSpectrumStale(deps.db, row.id, false);
    await finishRunItem(deps.db, itemId, workerId, { state: 'done', spectrumId: row.id, versionNumber: version.number, message: null });
  } catch (error) {
    const expected = error instanceof HttpError || error instanceof EngineError;
    if (!expected && meta.retryCount < meta.retryLimit) throw error;
    await finishRunItem(deps.db, itemId, workerId, { state: 'failed', message: (error as Error).message });
  }
  await maybeFinishRun(deps, run.id);
}

/** GET /api/runs/:runId/scan */
export async function scanOfRun(deps: RunsDeps, user: SessionUser, runId: string, period?: number | 'detect'): Promise<ScanResponse> {
  const { run } = await runWithAccess(deps, user, runId);
  const items = await listRunItems(deps.db, runId);
  const byId = new Map(items.filter((i) => i.spectrumId).map((i) => [i.spectrumId!, i]));
  const spectra = (await listSpectraOfFrames(deps.db, items.map((i) => i.frameId))).filter((s) => byId.has(s.id));
  const frames: ScanFrame[] = [];
  for (const s of spectra) {
    const frame = await deps.sources.frame(deps.db, s.frameId);
    if (!frame || frame.scanValue == null) continue;
    frames.push({ frameId: s.frameId, scanValue: frame.scanValue, orders: s.result.orders, cutoffEv: s.result.cutoffEv ?? null });
  }
  if (frames.length === 0) throw new HttpError(409, 'conflict', 'No finished frame of this run has a scan value; a scan needs frames with scanValue set.');
  const options: SinusoidOptions = { period: period ?? run.period?.value ?? undefined };
  let analysis;
  try {
    analysis = analyseScan(frames, options);
  } catch (error) {
    throw new ValidationError((error as Error).message);
  }
  return { ...analysis, runId, scanVariable: run.scanVariable, framesUsed: frames.length, framesSkipped: items.length - frames.length };
}
