/**
 * Instruments. Rule: any signed-in user may create one and becomes its owner (accounts exist
 * only through an invitation or create-admin, so this is a lab member starting a new set-up);
 * members read; owners and site admins edit and delete. Every change is audited.
 */
import type { CreateInstrumentInput, Instrument, UpdateInstrumentInput } from '../../../shared/api/instruments.ts';
import { createInstrumentSchema } from '../../../shared/api/instruments.ts';
import type { Role } from '../../../shared/api/members.ts';
import type { SessionUser } from '../../../shared/api/session.ts';
import type { Db } from '../../db/client.ts';
import type { InstrumentRow } from '../../db/schema/index.ts';
import { instrumentAccess, requireManage } from '../../auth/access.ts';
import { ConflictError } from '../../lib/errors.ts';
import { recordAudit } from '../audit/service.ts';
import { insertMembership } from '../members/queries.ts';
import {
  deleteInstrumentRow,
  findInstrumentByName,
  insertInstrument,
  listAllInstruments,
  listInstrumentsOfMember,
  updateInstrumentRow,
} from './queries.ts';

export function toInstrument(row: InstrumentRow, myRole: Role | null): Instrument {
  return {
    id: row.id,
    name: row.name,
    description: row.description,
    profile: row.profile,
    pixelCount: row.pixelCount,
    notes: row.notes,
    settings: row.settings,
    regions: row.regions ?? null,
    createdAt: row.createdAt.toISOString(),
    updatedAt: row.updatedAt.toISOString(),
    myRole,
  };
}

/** The audit snapshot of an instrument (the row minus timestamps). */
function snapshot(row: InstrumentRow) {
  const { createdAt: _c, updatedAt: _u, ...rest } = row;
  return rest;
}

export async function listInstruments(db: Db, user: SessionUser): Promise<Instrument[]> {
  const rows = user.isAdmin ? await listAllInstruments(db, user.id) : await listInstrumentsOfMember(db, user.id);
  return rows.map(({ instrument, role }) => toInstrument(instrument, role));
}

export async function getInstrument(db: Db, user: SessionUser, instrumentId: string): Promise<Instrument> {
  const access = await instrumentAccess(db, user, instrumentId);
  return toInstrument(access.instrument, access.role);
}

export async function createInstrument(db: Db, user: SessionUser, input: CreateInstrumentInput): Promise<Instrument> {
  const value = createInstrumentSchema.parse(input);
  return db.transaction(async (tx) => {
    if (await findInstrumentByName(tx, value.name)) throw new ConflictError(`An instrument named "${value.name}" already exists.`, { field: 'name' });
    const row = await insertInstrument(tx, { ...value, pixelCount: value.profile.pixelCount });
    await insertMembership(tx, { userId: user.id, instrumentId: row.id, role: 'owner' });
    await recordAudit(tx, {
      actorId: user.id,
      action: 'instrument.create',
      entityType: 'instrument',
      entityId: row.id,
      instrumentId: row.id,
      before: null,
      after: snapshot(row),
    });
    return toInstrument(row, 'owner');
  });
}

export async function updateInstrument(db: Db, user: SessionUser, instrumentId: string, input: UpdateInstrumentInput): Promise<Instrument> {
  return db.transaction(async (tx) => {
    const access = await requireManage(tx, user, instrumentId, 'edit it');
    const before = access.instrument;
    if (input.name !== undefined && (await findInstrumentByName(tx, input.name, instrumentId))) {
      throw new ConflictError(`An instrument named "${input.name}" already exists.`, { field: 'name' });
    }
    const row = await updateInstrumentRow(tx, instrumentId, {
      ...(input.name !== undefined ? { name: input.name } : {}),
      ...(input.description !== undefined ? { description: input.description } : {}),
      ...(input.notes !== undefined ? { notes: input.notes } : {}),
      ...(input.profile ? { profile: input.profile as InstrumentRow['profile'], pixelCount: input.profile.pixelCount } : {}),
      ...(input.settings ? { settings: { ...before.settings, ...input.settings } } : {}),
      updatedAt: new Date(),
    });
    await recordAudit(tx, {
      actorId: user.id,
      action: 'instrument.update',
      entityType: 'instrument',
      entityId: row.id,
      instrumentId: row.id,
      before: snapshot(before),
      after: snapshot(row),
    });
    return toInstrument(row, access.role);
  });
}

export async function deleteInstrument(db: Db, user: SessionUser, instrumentId: string): Promise<void> {
  await db.transaction(async (tx) => {
    const access = await requireManage(tx, user, instrumentId, 'delete it');
    // Recorded before the delete: the FK then sets instrument_id to null, entityId keeps the id.
    await recordAudit(tx, {
      actorId: user.id,
      action: 'instrument.delete',
      entityType: 'instrument',
      entityId: instrumentId,
      instrumentId,
      before: snapshot(access.instrument),
      after: null,
    });
    await deleteInstrumentRow(tx, instrumentId);
  });
}
