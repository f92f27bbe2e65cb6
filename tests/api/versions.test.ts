/**
 * Workbench runs and calibration versions over HTTP against the real PostgreSQL: the engine's
 * result checked against the simulator's truth, the role rule of every route, immutability of
 * approved versions, supersede from a later validity start, the self-approval setting, the
 * conflict of two approvals at once, and findVersionValidAt (API contract, issue 4).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { and, eq } from 'drizzle-orm';
import { paths } from '../../shared/api/paths.ts';
import { driverPriorOf } from '../../shared/engine/simulate/index.ts';
import type { SimFrame } from './frame-fixtures.ts';
import { auditEvents } from '../../server/db/schema/index.ts';
import { findVersionValidAt } from '../../server/modules/versions/service.ts';
import { startTestApp, type TestApp } from './helpers.ts';
import { as, cleanFrame, EVERYONE, makeWorld, tempStore, tiffOf, twoLineFrame, type Who, type World } from './frame-fixtures.ts';

const store = tempStore();
let t: TestApp;
const clean = cleanFrame('2026-11-30T10:00:00Z', 11);
const T0 = '2026-11-01T00:00:00.000Z';
const T1 = '2026-11-15T00:00:00.000Z';
const HOUR = 3600_000;

beforeAll(async () => {
  t = await startTestApp({ signInLimitPerMinute: 1000, frames: { store, maxBytes: 64 * 1024 * 1024 } });
});
afterAll(async () => t.close());

async function uploadFrame(w: World, sim: SimFrame, name = 'shot.tif'): Promise<string> {
  const res = await as(t.app, w.tokens.scientist).post(paths.instrumentFrames(w.instrument.id)).attach('file', Buffer.from(tiffOf(sim.frame)), name);
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return res.body.id;
}

/** The driver as the scenario's lab would state it (1σ and blue-shift allowance; simulate/driver-prior.ts). */
function runBody(sim: SimFrame, frameIds: string[], extra: Record<string, unknown> = {}) {
  return { frameIds, driverNm: sim.scenario.driver.nominalNm, ...driverPriorOf(sim.scenario.driver), parity: sim.scenario.parity, ...extra };
}

async function workbench(w: World, who: Who, body: object) {
  return as(t.app, w.tokens[who]).post(paths.workbenchRuns(w.instrument.id)).send(body);
}

/** A world with the clean frame uploaded and a unique run made by the scientist. */
async function setup(settings = { forbidSelfApproval: true }) {
  const w = await makeWorld(t.db, clean.scenario, settings);
  const frameId = await uploadFrame(w, clean);
  const run = await workbench(w, 'scientist', runBody(clean, [frameId]));
  expect(run.status, JSON.stringify(run.body)).toBe(201);
  expect(run.body.result.status).toBe('unique');
  return { w, frameId, runId: run.body.id as string };
}

async function draft(w: World, runId: string, validFrom: string, who: Who = 'scientist', token?: string) {
  const res = await as(t.app, token ?? w.tokens[who]).post(paths.instrumentVersions(w.instrument.id)).send({ runId, validFrom, note: `from ${validFrom}` });
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return res.body as { id: string; number: number; state: string };
}

const call = (w: World, who: Who, url: string, body: object = {}) => as(t.app, w.tokens[who]).post(url).send(body);

describe('workbench runs', () => {
  it('runs the engine on the stored frame; the orders match the simulator truth', async () => {
    const { w, runId } = await setup();
    const run = await as(t.app, w.tokens.viewer).get(paths.workbenchRun(runId)).expect(200);
    const result = run.body.result;
    expect(result.status).toBe('unique');
    expect(result.calibration.format).toBe('orderly-calibration/1');
    const labelled = result.peaks.filter((p: { harmonic: number | null }) => p.harmonic !== null);
    expect(labelled.length).toBeGreaterThanOrEqual(5);
    // Truth: the simulator's forward model (shared/engine/grating.ts) placed harmonic q at `pixel`.
    for (const p of labelled) {
      const truth = clean.truth.lines.reduce((a, b) => (Math.abs(b.pixel - p.pixel) < Math.abs(a.pixel - p.pixel) ? b : a));
      expect(Math.abs(truth.pixel - p.pixel)).toBeLessThan(2);
      expect(p.harmonic).toBe(truth.harmonic);
      expect(p.diffractionOrder).toBe(truth.diffractionOrder);
    }
    expect(run.body.inputs).toMatchObject({ regionsSource: 'automatic', ...driverPriorOf(clean.scenario.driver), model: 'auto', pins: [], filters: [] });
  });

  it('who may run it: owner, scientist, admin 201; student, viewer 403; non-member 404', async () => {
    const w = await makeWorld(t.db, clean.scenario);
    const frameId = await uploadFrame(w, clean);
    const expected: Record<Who, number> = { owner: 201, scientist: 201, admin: 201, student: 403, viewer: 403, outsider: 404 };
    for (const who of EVERYONE) {
      const res = await workbench(w, who, runBody(clean, [frameId], { model: who === 'admin' ? { polynomialDegree: 3 } : 'grating' }));
      expect(res.status, `${who}: ${JSON.stringify(res.body).slice(0, 200)}`).toBe(expected[who]);
    }
    const outsiderRead = await as(t.app, w.tokens.outsider).get(paths.instrumentVersions(w.instrument.id));
    expect(outsiderRead.status).toBe(404);
  });

  it('two frames of the same geometry: each decides, they agree → unique with perFrame', async () => {
    const w = await makeWorld(t.db, clean.scenario);
    const a = await uploadFrame(w, clean, 'a.tif');
    const b = await uploadFrame(w, cleanFrame('2026-11-30T10:05:00Z', 12), 'b.tif');
    const res = await workbench(w, 'owner', runBody(clean, [a, b]));
    expect(res.status, JSON.stringify(res.body).slice(0, 300)).toBe(201);
    expect(res.body.result.status).toBe('unique');
    expect(res.body.result.perFrame.map((p: { frameId: string; status: string }) => [p.frameId, p.status])).toEqual([
      [a, 'unique'],
      [b, 'unique'],
    ]);
  });

  it('refuses frames of another instrument (404) and a dark frame passed as signal (400)', async () => {
    const { w, frameId } = await setup();
    const other = await makeWorld(t.db, clean.scenario);
    const res = await workbench(other, 'owner', runBody(clean, [frameId]));
    expect(res.status).toBe(404);
    await as(t.app, w.tokens.owner).patch(paths.frame(frameId)).send({ kind: 'dark' }).expect(200);
    const dark = await workbench(w, 'owner', runBody(clean, [frameId]));
    expect(dark.status).toBe(400);
    expect(dark.body.error.message).toContain('darkFrameId');
  });

  it('an ambiguous run cannot become a version (400 ambiguous); a pin from the truth makes it unique', async () => {
    const two = twoLineFrame();
    const w = await makeWorld(t.db, two.scenario);
    const frameId = await uploadFrame(w, two, 'two-lines.tif');
    const amb = await workbench(w, 'scientist', runBody(two, [frameId]));
    expect(amb.status).toBe(201);
    expect(amb.body.result.status).toBe('ambiguous');
    const refused = await as(t.app, w.tokens.scientist).post(paths.instrumentVersions(w.instrument.id)).send({ runId: amb.body.id, validFrom: T0 });
    expect(refused.status).toBe(400);
    expect(refused.body.error.code).toBe('ambiguous');
    const line = two.truth.lines.find((l) => l.visible && l.diffractionOrder === 1)!;
    const pinned = await workbench(w, 'scientist', runBody(two, [frameId], { pins: [{ pixel: line.pixel, harmonic: line.harmonic }] }));
    expect(pinned.body.result.status, pinned.body.result.message).toBe('unique');
    const v = await draft(w, pinned.body.id, T0);
    expect(v).toMatchObject({ number: 1, state: 'draft' });
  });
});

describe('version states and who may change them', () => {
  it('draft → in review → approved with the role rule at every step; approved is immutable (409)', async () => {
    const { w, runId, frameId } = await setup();
    // Create: owner, scientist, admin; not student or viewer; non-member 404.
    for (const [who, status] of [['student', 403], ['viewer', 403], ['outsider', 404]] as const) {
      const res = await as(t.app, w.tokens[who]).post(paths.instrumentVersions(w.instrument.id)).send({ runId, validFrom: T0 });
      expect(res.status, who).toBe(status);
    }
    const v = await draft(w, runId, T0);
    expect(v).toMatchObject({ number: 1, state: 'draft', runId, frameIds: [frameId], model: 'grating' });

    // Edit a draft: the author, owners, admins.
    const edits: Record<Who, number> = { student: 403, viewer: 403, outsider: 404, scientist: 200, owner: 200, admin: 200 };
    for (const who of EVERYONE) {
      const res = await as(t.app, w.tokens[who]).patch(paths.version(v.id)).send({ note: `note by ${who}` });
      expect(res.status, who).toBe(edits[who]);
    }
    const badRange = await as(t.app, w.tokens.scientist).patch(paths.version(v.id)).send({ validUntil: '2026-10-01T00:00:00Z' });
    expect(badRange.status).toBe(400);

    // Submit: not student, viewer; non-member 404; the author may.
    for (const [who, status] of [['student', 403], ['viewer', 403], ['outsider', 404]] as const) {
      expect((await call(w, who, paths.versionSubmit(v.id))).status, who).toBe(status);
    }
    await call(w, 'scientist', paths.versionSubmit(v.id)).expect(200);
    const inReview = await as(t.app, w.tokens.scientist).patch(paths.version(v.id)).send({ note: 'late edit' });
    expect(inReview.status).toBe(409);
    expect(inReview.body.error.code).toBe('state');

    // Approve: owners and admins only.
    for (const [who, status] of [['scientist', 403], ['student', 403], ['viewer', 403], ['outsider', 404]] as const) {
      expect((await call(w, who, paths.versionApprove(v.id))).status, who).toBe(status);
    }
    const approved = await call(w, 'owner', paths.versionApprove(v.id), { comment: 'residuals fine' });
    expect(approved.status, JSON.stringify(approved.body)).toBe(200);
    expect(approved.body).toMatchObject({ state: 'approved', reviewerId: w.users.owner.id, validFrom: T0, validUntil: null });

    // Immutable: every role, every field.
    for (const who of ['scientist', 'owner', 'admin'] as const) {
      const res = await as(t.app, w.tokens[who]).patch(paths.version(v.id)).send({ note: 'sneaky' });
      expect(res.status, who).toBe(409);
      expect(res.body.error.code).toBe('immutable');
      expect(res.body.error.message).toBe('Version 1 is approved and cannot change; save a new version to correct it.');
    }
    const again = await call(w, 'owner', paths.versionApprove(v.id));
    expect(again.status).toBe(409);
    expect(again.body.error.code).toBe('state');
    expect(again.body.error.message).toContain('approved');

    const detail = await as(t.app, w.tokens.viewer).get(paths.version(v.id)).expect(200);
    expect(detail.body.note).toBe('note by admin');
    expect(detail.body.calibration.format).toBe('orderly-calibration/1');
    expect(detail.body.author).toMatchObject({ id: w.users.scientist.id, email: w.users.scientist.email });
    expect(detail.body.reviewer).toMatchObject({ id: w.users.owner.id });
    expect(detail.body.history.map((h: { to: string }) => h.to)).toEqual(['draft', 'in_review', 'approved']);
    expect(detail.body.history[2]).toMatchObject({ comment: 'residuals fine', by: { id: w.users.owner.id } });
    expect((await as(t.app, w.tokens.outsider).get(paths.version(v.id))).status).toBe(404);

    const audit = await t.db.select().from(auditEvents).where(and(eq(auditEvents.instrumentId, w.instrument.id), eq(auditEvents.entityId, v.id)));
    expect(audit.map((a) => a.action)).toEqual(expect.arrayContaining(['version.create', 'version.update', 'version.submit', 'version.approve']));
  });

  it('reject sends back to draft (owner only); withdraw: author while draft, owner any time', async () => {
    const { w, runId } = await setup();
    const v = await draft(w, runId, T0);
    await call(w, 'scientist', paths.versionSubmit(v.id)).expect(200);
    expect((await call(w, 'scientist', paths.versionReject(v.id), { comment: 'no' })).status).toBe(403);
    const back = await call(w, 'owner', paths.versionReject(v.id), { comment: 'pin H21 first' }).expect(200);
    expect(back.body.state).toBe('draft');
    expect((await call(w, 'student', paths.versionWithdraw(v.id), { comment: 'x' })).status).toBe(403);
    expect((await call(w, 'viewer', paths.versionWithdraw(v.id), { comment: 'x' })).status).toBe(403);
    await call(w, 'scientist', paths.versionWithdraw(v.id), { comment: 'superseded by a better run' }).expect(200);
    const gone = await call(w, 'owner', paths.versionWithdraw(v.id), { comment: 'again' });
    expect(gone.status).toBe(409);
    expect(gone.body.error.code).toBe('state');

    const v2 = await draft(w, runId, T0);
    await call(w, 'scientist', paths.versionSubmit(v2.id)).expect(200);
    await call(w, 'owner', paths.versionApprove(v2.id)).expect(200);
    const authorLate = await call(w, 'scientist', paths.versionWithdraw(v2.id), { comment: 'mine' });
    expect(authorLate.status).toBe(403);
    await call(w, 'owner', paths.versionWithdraw(v2.id), { comment: 'wrong driver' }).expect(200);
    expect(await findVersionValidAt(t.db, w.instrument.id, new Date(T1))).toBeUndefined();
  });

  it('forbidSelfApproval: the author-owner is refused (403), another owner approves; with the setting off the author may', async () => {
    const { w, runId } = await setup({ forbidSelfApproval: true });
    const own = await draft(w, runId, T0, 'owner');
    await call(w, 'owner', paths.versionSubmit(own.id)).expect(200);
    const self = await call(w, 'owner', paths.versionApprove(own.id));
    expect(self.status).toBe(403);
    expect(self.body.error.message).toContain('forbids');
    const selfReject = await call(w, 'owner', paths.versionReject(own.id), { comment: 'mine' });
    expect(selfReject.status).toBe(403);
    const other = await as(t.app, w.owner2.token).post(paths.versionApprove(own.id)).send({});
    expect(other.status).toBe(200);

    const lax = await setup({ forbidSelfApproval: false });
    const mine = await draft(lax.w, lax.runId, T0, 'owner');
    await call(lax.w, 'owner', paths.versionSubmit(mine.id)).expect(200);
    await call(lax.w, 'owner', paths.versionApprove(mine.id)).expect(200);
  });
});

describe('validity', () => {
  it('a later start supersedes from that time; findVersionValidAt picks by time; an overlap is a conflict; withdraw restores', async () => {
    const { w, runId } = await setup();
    const v1 = await draft(w, runId, T0);
    await call(w, 'scientist', paths.versionSubmit(v1.id)).expect(200);
    await call(w, 'owner', paths.versionApprove(v1.id)).expect(200);
    const at = (iso: string, deltaMs = 0) => findVersionValidAt(t.db, w.instrument.id, new Date(Date.parse(iso) + deltaMs));
    expect(await at(T0, -1)).toBeUndefined();
    expect((await at(T0))?.id).toBe(v1.id);
    expect((await at(T1, 30 * 24 * HOUR))?.id).toBe(v1.id);

    const v2 = await draft(w, runId, T1);
    await call(w, 'scientist', paths.versionSubmit(v2.id)).expect(200);
    await call(w, 'owner', paths.versionApprove(v2.id)).expect(200);
    const old = await as(t.app, w.tokens.viewer).get(paths.version(v1.id)).expect(200);
    expect(old.body).toMatchObject({ state: 'superseded', validFrom: T0, validUntil: T1, supersededById: v2.id, supersededAt: T1 });
    expect((await at(T1, -1))?.id).toBe(v1.id);
    expect((await at(T1))?.id).toBe(v2.id);
    expect((await at(T1, 24 * HOUR))?.id).toBe(v2.id);
    const superseded = await as(t.app, w.tokens.owner).patch(paths.version(v1.id)).send({ note: 'x' });
    expect(superseded.status).toBe(409);
    expect(superseded.body.error.code).toBe('immutable');

    // Starting between the two, open-ended: it would overlap version 2.
    const v3 = await draft(w, runId, new Date(Date.parse(T0) + 5 * 24 * HOUR).toISOString());
    await call(w, 'scientist', paths.versionSubmit(v3.id)).expect(200);
    const clash = await call(w, 'owner', paths.versionApprove(v3.id));
    expect(clash.status).toBe(409);
    expect(clash.body.error.code).toBe('conflict');
    expect(clash.body.error.message).toContain('overlaps version 2, approved, valid from 2026-11-15T00:00:00.000Z');
    expect((await as(t.app, w.tokens.owner).get(paths.version(v3.id))).body.state).toBe('in_review');

    const list = await as(t.app, w.tokens.viewer).get(paths.instrumentVersions(w.instrument.id)).expect(200);
    expect(list.body.map((v: { number: number; state: string }) => [v.number, v.state])).toEqual([
      [3, 'in_review'],
      [2, 'approved'],
      [1, 'superseded'],
    ]);

    await call(w, 'owner', paths.versionWithdraw(v2.id), { comment: 'realignment log was wrong' }).expect(200);
    const restored = await as(t.app, w.tokens.viewer).get(paths.version(v1.id)).expect(200);
    expect(restored.body).toMatchObject({ state: 'approved', validUntil: null, supersededById: null });
    expect((await at(T1, 24 * HOUR))?.id).toBe(v1.id);

    const actions = (await t.db.select().from(auditEvents).where(eq(auditEvents.instrumentId, w.instrument.id))).map((a) => a.action);
    expect(actions).toEqual(expect.arrayContaining(['workbench.run', 'version.supersede', 'version.withdraw', 'version.restore']));
  });

  it('two approvals at once with the same start: exactly one 200, the other 409 conflict (three rounds)', async () => {
    const { w, runId } = await setup();
    for (let round = 0; round < 3; round++) {
      const validFrom = new Date(Date.parse(T0) + round * 24 * HOUR).toISOString();
      const a = await draft(w, runId, validFrom);
      const b = await draft(w, runId, validFrom);
      await call(w, 'scientist', paths.versionSubmit(a.id)).expect(200);
      await call(w, 'scientist', paths.versionSubmit(b.id)).expect(200);
      const [ra, rb] = await Promise.all([call(w, 'owner', paths.versionApprove(a.id)), call(w, 'owner', paths.versionApprove(b.id))]);
      expect([ra.status, rb.status].sort(), `round ${round}: ${JSON.stringify([ra.body, rb.body])}`).toEqual([200, 409]);
      const loser = ra.status === 409 ? ra : rb;
      expect(loser.body.error.code).toBe('conflict');
      const winner = ra.status === 200 ? a : b;
      expect((await findVersionValidAt(t.db, w.instrument.id, new Date(validFrom)))?.id).toBe(winner.id);
    }
    const list = await as(t.app, w.tokens.viewer).get(paths.instrumentVersions(w.instrument.id)).expect(200);
    const states = list.body.map((v: { state: string }) => v.state);
    expect(states.filter((s: string) => s === 'approved')).toHaveLength(1);
    expect(states.filter((s: string) => s === 'superseded')).toHaveLength(2);
    expect(states.filter((s: string) => s === 'in_review')).toHaveLength(3);
  });
});
