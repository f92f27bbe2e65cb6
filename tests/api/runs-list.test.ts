/**
 * GET /api/instruments/:instrumentId/runs — the instrument page's "recent runs": newest first,
 * item counts per state, the starter's name; every member (viewers too) reads it, non-members
 * get 404, a bad limit is a 400 naming the field. Runs and items are inserted directly so the
 * counts are known exactly (the queue itself is tested in runs.test.ts).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { paths } from '../../shared/api/paths.ts';
import type { RunSummary } from '../../shared/api/runs.ts';
import { runItems, runs } from '../../server/db/schema/index.ts';
import { makeInstrument, makeUser, signIn } from './helpers.ts';
import { frameBytes, insertFrame, lab, startSpectraApp, type SpectraTestApp } from './spectra-fixtures.ts';

let t: SpectraTestApp;
beforeAll(async () => {
  lab();
  t = await startSpectraApp();
});
afterAll(async () => t.close());

describe('GET /api/instruments/:instrumentId/runs', () => {
  it('lists runs newest first with their counts and starter, for members only', async () => {
    const owner = await makeUser(t.db, 'owner');
    const student = await makeUser(t.db, 'student');
    const viewer = await makeUser(t.db, 'viewer');
    const outsider = await makeUser(t.db, 'outsider');
    const instrument = await makeInstrument(t.db, [
      [owner.id, 'owner'],
      [student.id, 'student'],
      [viewer.id, 'viewer'],
    ]);
    const frameIds: string[] = [];
    for (let k = 0; k < 3; k++) {
      const f = await insertFrame(t.db, t.store, instrument.id, frameBytes(200 + k), { takenAt: new Date(Date.UTC(2026, 10, 3, 9, k)) });
      frameIds.push(f.id);
    }
    // An older finished scan run (3 items: 2 done, 1 failed) and a newer one still running (1 queued, 1 done).
    const [older] = await t.db
      .insert(runs)
      .values({ instrumentId: instrument.id, kind: 'apply', state: 'failed', scanVariable: 'delay (fs)', createdBy: student.id, createdAt: new Date('2026-11-03T10:00:00Z'), finishedAt: new Date('2026-11-03T10:05:00Z') })
      .returning();
    await t.db.insert(runItems).values([
      { runId: older.id, frameId: frameIds[0], state: 'done' },
      { runId: older.id, frameId: frameIds[1], state: 'done' },
      { runId: older.id, frameId: frameIds[2], state: 'failed', message: 'no valid version' },
    ]);
    const [newer] = await t.db
      .insert(runs)
      .values({ instrumentId: instrument.id, kind: 'reapply', state: 'running', versionNumber: 2, createdBy: owner.id, createdAt: new Date('2026-11-04T08:00:00Z') })
      .returning();
    await t.db.insert(runItems).values([
      { runId: newer.id, frameId: frameIds[0], state: 'queued' },
      { runId: newer.id, frameId: frameIds[1], state: 'done' },
    ]);
    // A run with no items yet still lists, with zero counts.
    const [empty] = await t.db.insert(runs).values({ instrumentId: instrument.id, kind: 'apply', state: 'queued', createdBy: owner.id, createdAt: new Date('2026-11-02T08:00:00Z') }).returning();

    const studentClient = await signIn(t.app, student.email);
    const list = (await studentClient.agent.get(paths.instrumentRunsList(instrument.id)).expect(200)).body as RunSummary[];
    expect(list.map((r) => r.id)).toEqual([newer.id, older.id, empty.id]);
    expect(list[0]).toMatchObject({ state: 'running', kind: 'reapply', version: 2, scanVariable: null, total: 2, done: 1, failed: 0, cancelled: 0, createdBy: owner.id, createdByName: 'owner tester', createdAt: '2026-11-04T08:00:00.000Z', finishedAt: null });
    expect(list[1]).toMatchObject({ state: 'failed', version: 'valid', scanVariable: 'delay (fs)', total: 3, done: 2, failed: 1, createdByName: 'student tester', finishedAt: '2026-11-03T10:05:00.000Z' });
    expect(list[2]).toMatchObject({ total: 0, done: 0, failed: 0 });

    const viewerClient = await signIn(t.app, viewer.email);
    const limited = (await viewerClient.agent.get(paths.instrumentRunsList(instrument.id, 1)).expect(200)).body as RunSummary[];
    expect(limited.map((r) => r.id)).toEqual([newer.id]);

    const outsiderClient = await signIn(t.app, outsider.email);
    await outsiderClient.agent.get(paths.instrumentRunsList(instrument.id)).expect(404);

    const bad = await viewerClient.agent.get(paths.instrumentRunsList(instrument.id, 0)).expect(400);
    expect(JSON.stringify(bad.body)).toContain('limit must be ≥ 1');
    await viewerClient.agent.get(`${paths.instrumentRunsList(instrument.id)}?limit=many`).expect(400);
  });
});
