/**
 * Calibration versions. Rule (contract table): members read; owners, scientists and admins save
 * drafts from a unique workbench run, edit their own drafts and submit them; owners and admins
 * approve or send back (not their own when the instrument forbids self-approval); owners and
 * admins withdraw any version, an author their own while draft or in review. Every change of an
 * instrument's versions locks the instrument row first (SELECT … FOR UPDATE), so numbering and
 * the validity check of two approvals at once are serialised: one wins, the other gets 409.
 */
import type { SessionUser } from '../../../shared/api/session.ts';
import type { CreateVersionInput, UpdateVersionInput, Version, VersionDetail, VersionState } from '../../../shared/api/versions.ts';
import { createVersionSchema, updateVersionSchema } from '../../../shared/api/versions.ts';
import type { Db, Executor } from '../../db/client.ts';
import type { CalibrationVersionRow, VersionHistoryRow } from '../../db/schema/index.ts';
import { instrumentAccess, requireRole, type InstrumentAccess } from '../../auth/access.ts';
import { ConflictError, ForbiddenError, HttpError, NotFoundError, ValidationError } from '../../lib/errors.ts';
import { recordAudit } from '../audit/service.ts';
import {
  findPeople,
  findRunById,
  findVersionById,
  insertVersion,
  listEffectiveVersions,
  listSpectraOfVersion,
  listVersionsOfInstrument,
  lockInstrument,
  nextVersionNumber,
  updateVersionRow,
} from './queries.ts';

export { findVersionValidAt } from './queries.ts';

const AUTHOR_ROLES = ['owner', 'scientist'] as const;

export function toVersion(row: CalibrationVersionRow): Version {
  return {
    id: row.id,
    instrumentId: row.instrumentId,
    number: row.number,
    state: row.state,
    validFrom: row.validFrom.toISOString(),
    validUntil: row.validUntil?.toISOString() ?? null,
    note: row.note,
    authorId: row.authorId,
    reviewerId: row.reviewerId,
    approvedAt: row.approvedAt?.toISOString() ?? null,
    supersededById: row.supersededById,
    supersededAt: row.supersededAt?.toISOString() ?? null,
    runId: row.runId,
    frameIds: row.frameIds,
    model: row.model,
    driverNm: row.driverNm,
    rmsResidualPx: row.rmsResidualPx,
    peakCount: row.peakCount,
    createdAt: row.createdAt.toISOString(),
    updatedAt: row.updatedAt.toISOString(),
  };
}

/** Audit snapshot: the row without the bulky calibration JSON and timestamps. */
function snapshot(row: CalibrationVersionRow) {
  const { calibration: _c, history: _h, createdAt: _ca, updatedAt: _ua, ...rest } = row;
  return rest;
}

const STATE_WORDS: Record<VersionState, string> = {
  draft: 'a draft',
  in_review: 'in review',
  approved: 'approved',
  superseded: 'superseded',
  withdrawn: 'withdrawn',
};

function stateError(row: CalibrationVersionRow, wanted: string): HttpError {
  return new HttpError(409, 'state', `Version ${row.number} is ${STATE_WORDS[row.state]}; ${wanted}.`, { state: row.state });
}

function historyEntry(from: VersionState | null, to: VersionState, user: SessionUser, comment = ''): VersionHistoryRow {
  return { from, to, byId: user.id, at: new Date().toISOString(), comment };
}

function fmt(d: Date | null): string {
  return d ? d.toISOString() : 'open end';
}

/**
 * The version with the user's access, after locking its instrument: the row is read again
 * under the lock, so the state checks see every transition committed before.
 */
async function lockedVersion(tx: Executor, user: SessionUser, versionId: string): Promise<{ row: CalibrationVersionRow; access: InstrumentAccess }> {
  const first = await findVersionById(tx, versionId);
  if (!first) throw new NotFoundError('No such version.');
  let access: InstrumentAccess;
  try {
    access = await instrumentAccess(tx, user, first.instrumentId);
  } catch (error) {
    if (error instanceof NotFoundError) throw new NotFoundError('No such version.');
    throw error;
  }
  await lockInstrument(tx, first.instrumentId);
  const row = await findVersionById(tx, versionId);
  if (!row) throw new NotFoundError('No such version.');
  return { row, access };
}

function isAuthorRole(access: InstrumentAccess): boolean {
  return access.isAdmin || access.role === 'owner' || access.role === 'scientist';
}

/** Author (still owner/scientist) or owner/admin; 403 otherwise. */
function requireAuthorOrManager(access: InstrumentAccess, user: SessionUser, row: CalibrationVersionRow, what: string): void {
  if (access.canManage) return;
  if (isAuthorRole(access) && row.authorId === user.id) return;
  throw new ForbiddenError(`Only the author of version ${row.number}, owners of this instrument and site admins may ${what}.`);
}

/** Owner/admin, and not the author when the instrument forbids self-approval. */
function requireReviewer(access: InstrumentAccess, user: SessionUser, row: CalibrationVersionRow, what: string): void {
  if (!access.canManage) throw new ForbiddenError(`Only owners of this instrument and site admins may ${what}.`);
  if (access.instrument.settings.forbidSelfApproval !== false && row.authorId === user.id) {
    throw new ForbiddenError(`This instrument forbids approving one's own versions: you wrote version ${row.number}, so another owner must ${what}.`);
  }
}

export async function createVersion(db: Db, user: SessionUser, instrumentId: string, input: CreateVersionInput): Promise<Version> {
  const value = createVersionSchema.parse(input);
  return db.transaction(async (tx) => {
    await requireRole(tx, user, instrumentId, AUTHOR_ROLES, 'save calibration drafts');
    const run = await findRunById(tx, value.runId);
    if (!run || run.instrumentId !== instrumentId) throw new NotFoundError('No such workbench run on this instrument.');
    const calibration = run.result.calibration;
    if (run.status !== 'unique' || !calibration) {
      throw new HttpError(400, 'ambiguous', `Workbench run ${run.id} is ${run.status} (${run.result.message}); only a unique result can be saved: pin an order, add a known line or a filter whose edge falls in range, or widen the range, and run again.`, {
        status: run.status,
      });
    }
    await lockInstrument(tx, instrumentId);
    const number = await nextVersionNumber(tx, instrumentId);
    const best = run.result.hypotheses[0];
    const row = await insertVersion(tx, {
      instrumentId,
      number,
      state: 'draft',
      validFrom: new Date(value.validFrom),
      validUntil: value.validUntil ? new Date(value.validUntil) : null,
      note: value.note,
      authorId: user.id,
      runId: run.id,
      frameIds: run.inputs.frameIds,
      model: calibration.model,
      driverNm: calibration.driverNm,
      rmsResidualPx: best?.rmsResidualPx ?? Number.NaN,
      peakCount: calibration.points.length,
      calibration,
      history: [historyEntry(null, 'draft', user)],
    });
    await recordAudit(tx, { actorId: user.id, action: 'version.create', entityType: 'calibration_version', entityId: row.id, instrumentId, before: null, after: snapshot(row) });
    return toVersion(row);
  });
}

export async function listVersions(db: Db, user: SessionUser, instrumentId: string): Promise<Version[]> {
  await instrumentAccess(db, user, instrumentId);
  return (await listVersionsOfInstrument(db, instrumentId)).map(toVersion);
}

export async function getVersion(db: Db, user: SessionUser, versionId: string): Promise<VersionDetail> {
  const row = await findVersionById(db, versionId);
  if (!row) throw new NotFoundError('No such version.');
  try {
    await instrumentAccess(db, user, row.instrumentId);
  } catch (error) {
    if (error instanceof NotFoundError) throw new NotFoundError('No such version.');
    throw error;
  }
  const run = await findRunById(db, row.runId);
  const ids = [row.authorId, row.reviewerId, ...row.history.map((h) => h.byId)].filter((x): x is string => !!x);
  const people = new Map((await findPeople(db, [...new Set(ids)])).map((p) => [p.id, p]));
  const person = (id: string | null) => (id ? (people.get(id) ?? null) : null);
  const made = await listSpectraOfVersion(db, row.id);
  return {
    ...toVersion(row),
    spectraCount: made.count,
    spectra: made.rows,
    calibration: row.calibration,
    result: run!.result,
    inputs: run!.inputs,
    author: person(row.authorId),
    reviewer: person(row.reviewerId),
    history: row.history.map((h) => ({ from: h.from, to: h.to, by: person(h.byId), at: h.at, comment: h.comment })),
  };
}

export async function updateVersion(db: Db, user: SessionUser, versionId: string, input: UpdateVersionInput): Promise<Version> {
  const value = updateVersionSchema.parse(input);
  return db.transaction(async (tx) => {
    const { row, access } = await lockedVersion(tx, user, versionId);
    requireAuthorOrManager(access, user, row, 'edit it');
    if (row.state === 'approved' || row.state === 'superseded' || row.state === 'withdrawn') {
      throw new HttpError(409, 'immutable', `Version ${row.number} is ${row.state} and cannot change; save a new version to correct it.`, { state: row.state });
    }
    if (row.state !== 'draft') throw stateError(row, 'send it back to draft to change it');
    const validFrom = value.validFrom !== undefined ? new Date(value.validFrom) : row.validFrom;
    const validUntil = value.validUntil !== undefined ? (value.validUntil ? new Date(value.validUntil) : null) : row.validUntil;
    if (validUntil && validUntil <= validFrom) throw new ValidationError('validUntil must be after validFrom.', { issues: [{ path: 'validUntil', message: 'validUntil must be after validFrom' }] });
    const updated = await updateVersionRow(tx, versionId, { validFrom, validUntil, ...(value.note !== undefined ? { note: value.note } : {}), updatedAt: new Date() });
    await recordAudit(tx, { actorId: user.id, action: 'version.update', entityType: 'calibration_version', entityId: versionId, instrumentId: row.instrumentId, before: snapshot(row), after: snapshot(updated) });
    return toVersion(updated);
  });
}

export async function submitVersion(db: Db, user: SessionUser, versionId: string, comment: string): Promise<Version> {
  return db.transaction(async (tx) => {
    const { row, access } = await lockedVersion(tx, user, versionId);
    requireAuthorOrManager(access, user, row, 'submit it for review');
    if (row.state !== 'draft') throw stateError(row, 'only a draft can be submitted');
    const updated = await updateVersionRow(tx, versionId, { state: 'in_review', history: [...row.history, historyEntry('draft', 'in_review', user, comment)], updatedAt: new Date() });
    await recordAudit(tx, { actorId: user.id, action: 'version.submit', entityType: 'calibration_version', entityId: versionId, instrumentId: row.instrumentId, before: snapshot(row), after: snapshot(updated) });
    return toVersion(updated);
  });
}

export async function rejectVersion(db: Db, user: SessionUser, versionId: string, comment: string): Promise<Version> {
  return db.transaction(async (tx) => {
    const { row, access } = await lockedVersion(tx, user, versionId);
    requireReviewer(access, user, row, 'send it back');
    if (row.state !== 'in_review') throw stateError(row, 'only a version in review can be sent back to draft');
    const updated = await updateVersionRow(tx, versionId, { state: 'draft', reviewerId: user.id, history: [...row.history, historyEntry('in_review', 'draft', user, comment)], updatedAt: new Date() });
    await recordAudit(tx, { actorId: user.id, action: 'version.reject', entityType: 'calibration_version', entityId: versionId, instrumentId: row.instrumentId, before: snapshot(row), after: { ...snapshot(updated), comment } });
    return toVersion(updated);
  });
}

/**
 * in_review → approved. Every approved version whose interval contains X.validFrom and starts
 * earlier is cut there and becomes superseded by X; a version that starts inside X's interval,
 * or a superseded one still covering X.validFrom, is a 409 conflict and X stays in review.
 */
export async function approveVersion(db: Db, user: SessionUser, versionId: string, comment: string): Promise<Version> {
  return db.transaction(async (tx) => {
    const { row: x, access } = await lockedVersion(tx, user, versionId);
    requireReviewer(access, user, x, 'approve it');
    if (x.state !== 'in_review') throw stateError(x, 'only a version in review can be approved');
    const from = x.validFrom.getTime();
    const until = x.validUntil?.getTime() ?? Number.POSITIVE_INFINITY;
    const others = (await listEffectiveVersions(tx, x.instrumentId)).filter((y) => y.id !== x.id);
    for (const y of others) {
      const yFrom = y.validFrom.getTime();
      const yUntil = y.validUntil?.getTime() ?? Number.POSITIVE_INFINITY;
      const startsInside = yFrom >= from && yFrom < until;
      const supersededCovering = y.state === 'superseded' && yFrom < from && yUntil > from;
      if (startsInside || supersededCovering) {
        throw new ConflictError(
          `Version ${x.number} (valid from ${fmt(x.validFrom)}) overlaps version ${y.number}, ${y.state}, valid from ${fmt(y.validFrom)} until ${fmt(y.validUntil)}; change the validity or withdraw version ${y.number}.`,
          { versionId: y.id, number: y.number, state: y.state },
        );
      }
    }
    const now = new Date();
    for (const y of others) {
      const yUntil = y.validUntil?.getTime() ?? Number.POSITIVE_INFINITY;
      if (y.state === 'approved' && y.validFrom.getTime() < from && yUntil > from) {
        const cut = await updateVersionRow(tx, y.id, {
          state: 'superseded',
          validUntil: x.validFrom,
          supersededById: x.id,
          supersededAt: x.validFrom,
          history: [...y.history, historyEntry('approved', 'superseded', user, `superseded by version ${x.number} from ${fmt(x.validFrom)}`)],
          updatedAt: now,
        });
        await recordAudit(tx, { actorId: user.id, action: 'version.supersede', entityType: 'calibration_version', entityId: y.id, instrumentId: y.instrumentId, before: snapshot(y), after: snapshot(cut) });
      }
    }
    const approved = await updateVersionRow(tx, x.id, {
      state: 'approved',
      reviewerId: user.id,
      approvedAt: now,
      history: [...x.history, historyEntry('in_review', 'approved', user, comment)],
      updatedAt: now,
    });
    await recordAudit(tx, { actorId: user.id, action: 'version.approve', entityType: 'calibration_version', entityId: x.id, instrumentId: x.instrumentId, before: snapshot(x), after: snapshot(approved) });
    return toVersion(approved);
  });
}

/**
 * → withdrawn. Owners/admins: any state but withdrawn; the author: while draft or in review.
 * Withdrawing an approved version gives the version it superseded its time back.
 */
export async function withdrawVersion(db: Db, user: SessionUser, versionId: string, comment: string): Promise<Version> {
  return db.transaction(async (tx) => {
    const { row, access } = await lockedVersion(tx, user, versionId);
    if (!access.canManage) {
      const early = row.state === 'draft' || row.state === 'in_review';
      if (!(isAuthorRole(access) && row.authorId === user.id)) throw new ForbiddenError(`Only the author of version ${row.number}, owners of this instrument and site admins may withdraw it.`);
      if (!early && row.state !== 'withdrawn') throw new ForbiddenError(`Version ${row.number} is ${row.state}; only owners of this instrument and site admins may withdraw it now.`);
    }
    if (row.state === 'withdrawn') throw stateError(row, 'it cannot be withdrawn again');
    const now = new Date();
    if (row.state === 'approved') {
      const restored = (await listEffectiveVersions(tx, row.instrumentId)).filter((y) => y.state === 'superseded' && y.supersededById === row.id);
      for (const y of restored) {
        const back = await updateVersionRow(tx, y.id, {
          state: 'approved',
          validUntil: row.validUntil,
          supersededById: null,
          supersededAt: null,
          history: [...y.history, historyEntry('superseded', 'approved', user, `version ${row.number} withdrawn`)],
          updatedAt: now,
        });
        await recordAudit(tx, { actorId: user.id, action: 'version.restore', entityType: 'calibration_version', entityId: y.id, instrumentId: y.instrumentId, before: snapshot(y), after: snapshot(back) });
      }
    }
    const updated = await updateVersionRow(tx, versionId, { state: 'withdrawn', history: [...row.history, historyEntry(row.state, 'withdrawn', user, comment)], updatedAt: now });
    await recordAudit(tx, { actorId: user.id, action: 'version.withdraw', entityType: 'calibration_version', entityId: versionId, instrumentId: row.instrumentId, before: snapshot(row), after: { ...snapshot(updated), comment } });
    return toVersion(updated);
  });
}
