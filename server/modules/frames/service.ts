/**
 * Frames. Rule (contract table): members read; owners, scientists, students and site admins
 * upload; owners, scientists and admins edit any frame's metadata and regions, students only
 * their own uploads; owners, scientists and admins delete a frame no spectrum was made from.
 * Uploads decode with the engine first and are all or nothing; every change is audited.
 */
import type {
  BulkUpdateFramesInput,
  Frame,
  FrameMetadata,
  ListFramesParams,
  Regions,
  UpdateFrameInput,
  UploadFields,
  UploadFramesResponse,
  FrameList,
} from '../../../shared/api/frames.ts';
import { bulkUpdateFramesSchema, updateFrameSchema } from '../../../shared/api/frames.ts';
import type { Instrument } from '../../../shared/api/instruments.ts';
import type { SessionUser } from '../../../shared/api/session.ts';
import type { Db, Executor } from '../../db/client.ts';
import type { FrameInsert, FrameRow, InstrumentRow } from '../../db/schema/index.ts';
import { instrumentAccess, requireRole, type InstrumentAccess } from '../../auth/access.ts';
import { ConflictError, ForbiddenError, NotFoundError, ValidationError } from '../../lib/errors.ts';
import type { FrameStore } from '../../storage/frame-store.ts';
import { recordAudit } from '../audit/service.ts';
import { toInstrument } from '../instruments/service.ts';
import { updateInstrumentRow } from '../instruments/queries.ts';
import type { DecodedFile } from './decode.ts';
import {
  countFramesWithSha,
  countSpectraOfFrame,
  deleteFrameRow,
  findExistingPages,
  findFrameById,
  findFramesByIds,
  insertFrames,
  listFrames,
  lockStoredFile,
  updateFrameRow,
  versionsUsingFrame,
} from './queries.ts';

export const UPLOAD_ROLES = ['owner', 'scientist', 'student'] as const;
export const EDIT_ANY_ROLES = ['owner', 'scientist'] as const;

export function toFrame(row: FrameRow, instrumentName: string): Frame {
  return {
    id: row.id,
    instrumentId: row.instrumentId,
    instrumentName,
    sha256: row.sha256,
    sizeBytes: row.sizeBytes,
    originalName: row.originalName,
    format: row.format,
    page: row.page,
    pageCount: row.pageCount,
    width: row.width,
    height: row.height,
    sampleFormat: row.sampleFormat,
    bitsPerSample: row.bitsPerSample,
    kind: row.kind,
    takenAt: row.takenAt.toISOString(),
    takenAtSource: row.takenAtSource,
    exposureS: row.exposureS,
    accumulations: row.accumulations,
    target: row.target,
    pressureMbar: row.pressureMbar,
    filters: row.filters,
    driverNm: row.driverNm,
    parity: row.parity,
    scanVariable: row.scanVariable,
    scanValue: row.scanValue,
    tags: row.tags,
    notes: row.notes,
    regions: row.regions ?? null,
    uploadedBy: row.uploadedBy,
    createdAt: row.createdAt.toISOString(),
    updatedAt: row.updatedAt.toISOString(),
  };
}

function snapshot(row: FrameRow) {
  const { createdAt: _c, updatedAt: _u, ...rest } = row;
  return rest;
}

/** Owner, scientist, admin: any frame; student: frames they uploaded; viewer: none. */
function canEditFrame(access: InstrumentAccess, user: SessionUser, frame: FrameRow): boolean {
  if (access.isAdmin || access.role === 'owner' || access.role === 'scientist') return true;
  return access.role === 'student' && frame.uploadedBy === user.id;
}

function requireEditable(access: InstrumentAccess, user: SessionUser, frame: FrameRow): void {
  if (!canEditFrame(access, user, frame)) {
    throw new ForbiddenError(
      access.role === 'student'
        ? `Students may edit only the frames they uploaded; ${frame.originalName} (page ${frame.page + 1}) was uploaded by someone else.`
        : 'Only owners, scientists, the uploading student and site admins may edit frame metadata.',
    );
  }
}

/** Spatial-axis length of a frame on this instrument (the axis the regions cut along). */
function spatialLength(instrument: InstrumentRow, frame: Pick<FrameRow, 'width' | 'height'>): number {
  return instrument.profile.spectralAxis === 'x' ? frame.height : frame.width;
}

/** 400 when a band reaches past the frame's spatial axis. */
export function checkRegionsFit(regions: Regions, length: number, what: string): void {
  const bands = [{ name: 'signal', ...regions.signal }, ...regions.background.map((b, i) => ({ name: `background[${i}]`, ...b }))];
  for (const band of bands) {
    if (band.end > length) throw new ValidationError(`regions.${band.name} ends at ${band.end} but ${what} has ${length} pixels along the spatial axis.`);
  }
}

/** Drizzle values for the metadata fields that are present (undefined = unchanged, null = cleared). */
function metadataValues(set: FrameMetadata): Partial<FrameInsert> {
  const out: Partial<FrameInsert> = {};
  if (set.takenAt !== undefined) {
    out.takenAt = new Date(set.takenAt);
    out.takenAtSource = 'entered';
  }
  const keys = ['kind', 'exposureS', 'accumulations', 'target', 'pressureMbar', 'filters', 'driverNm', 'parity', 'scanVariable', 'scanValue', 'tags', 'notes'] as const;
  for (const key of keys) {
    if (set[key] !== undefined) (out as Record<string, unknown>)[key] = set[key];
  }
  return out;
}

export interface FramesDeps {
  db: Db;
  store: FrameStore;
}

/**
 * Stores decoded uploads: one row per page, one stored file per distinct content. All or
 * nothing: a duplicate page → 409 and nothing stored; a failure after a file was written removes
 * the files this request added (unless another row refers to them).
 */
export async function storeUploads(deps: FramesDeps, user: SessionUser, instrumentId: string, files: DecodedFile[], fields: UploadFields): Promise<UploadFramesResponse> {
  const { db, store } = deps;
  if (files.length === 0) throw new ValidationError('No file in the upload; send the frame in the multipart field "file".');
  const seen = new Map<string, string>();
  for (const f of files) {
    const before = seen.get(f.sha256);
    if (before) throw new ConflictError(`${f.originalName} has the same content as ${before} in this upload; send each file once.`, { field: 'file' });
    seen.set(f.sha256, f.originalName);
  }
  const now = new Date();
  const written: string[] = [];
  try {
    return await db.transaction(async (tx) => {
      const access = await requireRole(tx, user, instrumentId, UPLOAD_ROLES, 'upload frames');
      const existing = await findExistingPages(tx, instrumentId, files.map((f) => f.sha256));
      for (const f of files) {
        for (const p of f.pages) {
          const dup = existing.find((e) => e.sha256 === f.sha256 && e.page === p.page);
          if (dup) {
            throw new ConflictError(`${f.originalName}${f.pages.length > 1 ? ` page ${p.page + 1}` : ''} is already on this instrument as frame ${dup.id}.`, { existingFrameId: dup.id });
          }
        }
      }
      const values: FrameInsert[] = files.flatMap((f) =>
        f.pages.map((p) => {
          const takenAtSource = fields.takenAt ? 'entered' : p.takenAt ? 'file' : 'upload';
          return {
            instrumentId,
            sha256: f.sha256,
            sizeBytes: f.bytes.byteLength,
            originalName: f.originalName,
            format: p.format,
            page: p.page,
            pageCount: p.pageCount,
            width: p.width,
            height: p.height,
            sampleFormat: p.sampleFormat,
            bitsPerSample: p.bitsPerSample,
            kind: fields.kind,
            takenAt: fields.takenAt ? new Date(fields.takenAt) : (p.takenAt ?? now),
            takenAtSource,
            exposureS: fields.exposureS ?? p.exposureS ?? null,
            accumulations: fields.accumulations ?? null,
            target: fields.target ?? null,
            pressureMbar: fields.pressureMbar ?? null,
            filters: fields.filters ?? [],
            driverNm: fields.driverNm ?? null,
            parity: fields.parity ?? null,
            scanVariable: fields.scanVariable ?? null,
            scanValue: fields.scanValue ?? null,
            tags: fields.tags ?? [],
            notes: fields.notes ?? '',
            uploadedBy: user.id,
          } satisfies FrameInsert;
        }),
      );
      const rows = await insertFrames(tx, values);
      for (const row of rows) {
        await recordAudit(tx, { actorId: user.id, action: 'frame.upload', entityType: 'frame', entityId: row.id, instrumentId, before: null, after: snapshot(row) });
      }
      // Files last: a refused row never leaves a file behind. The lock keeps a concurrent delete
      // of the same content from removing it between `has` and commit.
      for (const f of files) {
        await lockStoredFile(tx, f.sha256);
        if (!(await store.has(f.sha256))) {
          await store.put(f.sha256, f.bytes);
          written.push(f.sha256);
        }
      }
      const frames = rows.map((r) => toFrame(r, access.instrument.name));
      return { ...frames[0]!, frames };
    });
  } catch (error) {
    for (const key of written) {
      if ((await countFramesWithSha(db, key)) === 0) await store.delete(key);
    }
    throw error;
  }
}

export async function listFramesFor(db: Db, user: SessionUser, query: ListFramesParams): Promise<FrameList> {
  if (query.instrumentId) await instrumentAccess(db, user, query.instrumentId);
  const { rows, total } = await listFrames(db, user.isAdmin ? null : user.id, query);
  return { items: rows.map((r) => toFrame(r.frame, r.instrumentName)), total, page: query.page, pageSize: query.pageSize };
}

/** The frame with the user's access to its instrument; 404 for a missing frame or an instrument the user cannot see. */
export async function readableFrame(db: Executor, user: SessionUser, frameId: string): Promise<{ row: FrameRow; instrumentName: string; access: InstrumentAccess }> {
  const found = await findFrameById(db, frameId);
  if (!found) throw new NotFoundError('No such frame.');
  try {
    const access = await instrumentAccess(db, user, found.frame.instrumentId);
    return { row: found.frame, instrumentName: found.instrumentName, access };
  } catch (error) {
    if (error instanceof NotFoundError) throw new NotFoundError('No such frame.');
    throw error;
  }
}

export async function getFrame(db: Db, user: SessionUser, frameId: string): Promise<Frame> {
  const { row, instrumentName } = await readableFrame(db, user, frameId);
  return toFrame(row, instrumentName);
}

export async function getFrameFile(deps: FramesDeps, user: SessionUser, frameId: string): Promise<{ bytes: Uint8Array; sha256: string; originalName: string }> {
  const { row } = await readableFrame(deps.db, user, frameId);
  return { bytes: await deps.store.get(row.sha256), sha256: row.sha256, originalName: row.originalName };
}

export async function updateFrame(db: Db, user: SessionUser, frameId: string, input: UpdateFrameInput): Promise<Frame> {
  const value = updateFrameSchema.parse(input);
  return db.transaction(async (tx) => {
    const { row, instrumentName, access } = await readableFrame(tx, user, frameId);
    requireEditable(access, user, row);
    const set = metadataValues(value);
    if (value.regions !== undefined) {
      if (value.regions) checkRegionsFit(value.regions, spatialLength(access.instrument, row), `frame ${row.originalName}`);
      set.regions = value.regions;
    }
    if (Object.keys(set).length === 0) return toFrame(row, instrumentName);
    const updated = await updateFrameRow(tx, frameId, { ...set, updatedAt: new Date() });
    await recordAudit(tx, { actorId: user.id, action: value.regions !== undefined ? 'frame.update_regions' : 'frame.update', entityType: 'frame', entityId: frameId, instrumentId: row.instrumentId, before: snapshot(row), after: snapshot(updated) });
    return toFrame(updated, instrumentName);
  });
}

/** All or nothing: every id must exist, be readable (else 404) and editable (else 403). */
export async function bulkUpdateFrames(db: Db, user: SessionUser, input: BulkUpdateFramesInput): Promise<{ updated: number }> {
  const { ids, set } = bulkUpdateFramesSchema.parse(input);
  const unique = [...new Set(ids)];
  return db.transaction(async (tx) => {
    const found = await findFramesByIds(tx, unique);
    const missing = unique.filter((id) => !found.some((f) => f.frame.id === id));
    if (missing.length > 0) throw new NotFoundError(`No such frame: ${missing.join(', ')}.`);
    const accessByInstrument = new Map<string, InstrumentAccess>();
    for (const { frame } of found) {
      let access = accessByInstrument.get(frame.instrumentId);
      if (!access) {
        try {
          access = await instrumentAccess(tx, user, frame.instrumentId);
        } catch (error) {
          if (error instanceof NotFoundError) throw new NotFoundError(`No such frame: ${frame.id}.`);
          throw error;
        }
        accessByInstrument.set(frame.instrumentId, access);
      }
      requireEditable(access, user, frame);
    }
    const values = { ...metadataValues(set), updatedAt: new Date() };
    for (const { frame } of found) {
      const updated = await updateFrameRow(tx, frame.id, values);
      await recordAudit(tx, { actorId: user.id, action: 'frame.bulk_update', entityType: 'frame', entityId: frame.id, instrumentId: frame.instrumentId, before: snapshot(frame), after: snapshot(updated) });
    }
    return { updated: found.length };
  });
}

export async function deleteFrame(deps: FramesDeps, user: SessionUser, frameId: string): Promise<void> {
  const { db, store } = deps;
  await db.transaction(async (tx) => {
    const { row, access } = await readableFrame(tx, user, frameId);
    if (!access.isAdmin && !(access.role && (EDIT_ANY_ROLES as readonly string[]).includes(access.role))) {
      throw new ForbiddenError('Only owners, scientists and site admins may delete frames.');
    }
    const spectraCount = await countSpectraOfFrame(tx, frameId);
    if (spectraCount > 0) throw new ConflictError(`${spectraCount} spectra were made from this frame; it stays as their source.`, { spectra: spectraCount });
    const versions = await versionsUsingFrame(tx, frameId);
    if (versions.length > 0) {
      throw new ConflictError(`Calibration version ${versions.map((v) => `${v.number} (${v.state})`).join(', ')} was made from this frame; withdraw it first.`);
    }
    await recordAudit(tx, { actorId: user.id, action: 'frame.delete', entityType: 'frame', entityId: frameId, instrumentId: row.instrumentId, before: snapshot(row), after: null });
    await deleteFrameRow(tx, frameId);
    await lockStoredFile(tx, row.sha256);
    // Removed inside the transaction, under the file lock, so an upload of the same content waits.
    if ((await countFramesWithSha(tx, row.sha256)) === 0) await store.delete(row.sha256);
  });
}

/** PUT /api/instruments/:id/regions — owners, scientists, admins. */
export async function saveInstrumentRegions(db: Db, user: SessionUser, instrumentId: string, regions: Regions): Promise<Instrument> {
  return db.transaction(async (tx) => {
    const access = await requireRole(tx, user, instrumentId, EDIT_ANY_ROLES, 'save the default regions');
    const before = access.instrument;
    const row = await updateInstrumentRow(tx, instrumentId, { regions, updatedAt: new Date() });
    await recordAudit(tx, { actorId: user.id, action: 'instrument.update_regions', entityType: 'instrument', entityId: instrumentId, instrumentId, before: { regions: before.regions }, after: { regions: row.regions } });
    return toInstrument(row, access.role);
  });
}
