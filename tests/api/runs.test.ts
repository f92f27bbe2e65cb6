/**
 * Runs through the real pg-boss queue (`orderly-apply`) with an in-process worker: a scan of
 * simulated frames with a known per-order modulation, idempotence under duplicated jobs, cancel,
 * retry of failed frames, re-apply of stale spectra, role rules and the "run finished" notice.
 */
import { randomUUID } from 'node:crypto';
import { eq } from 'drizzle-orm';
import type PgBoss from 'pg-boss';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { paths } from '../../shared/api/paths.ts';
import type { Run } from '../../shared/api/runs.ts';
import { calibrationVersions, mails, runItems, spectra } from '../../server/db/schema/index.ts';
import { pgBossQueue, startBoss, type ApplyQueue } from '../../server/modules/runs/queue.ts';
import { processApplyItem } from '../../server/modules/runs/service.ts';
import { startApplyWorkers, type ApplyWorkers } from '../../server/modules/runs/worker.ts';
import { dbSources } from '../../server/modules/spectra/sources.ts';
import { makeInstrument, makeUser, signIn, type Client } from './helpers.ts';
import { frameBytes, insertApprovedVersion, insertFrame, lab, startSpectraApp, type SpectraTestApp } from './spectra-fixtures.ts';

let t: SpectraTestApp;
let boss: PgBoss;
let queue: ApplyQueue;
let workers: ApplyWorkers;
let paused = false;
/** A queue whose enqueue can be held back, so cancel finds queued items. */
const gatedQueue: ApplyQueue = {
  enqueue: async (items) => (paused ? undefined : queue.enqueue(items)),
  cancel: async (ids) => queue.cancel(ids),
};

beforeAll(async () => {
  lab();
  t = await startSpectraApp(gatedQueue);
  boss = await startBoss({ databaseUrl: t.databaseUrl, expireInSeconds: 30, maintenanceIntervalSeconds: 5 });
  queue = pgBossQueue(boss, 30);
  workers = await startApplyWorkers({ db: t.db, store: t.store, sources: dbSources, mailer: t.mailer, appUrl: 'http://127.0.0.1:5480' }, boss, { concurrency: 2, workerId: 'test-in-process' });
});
afterAll(async () => {
  await workers.stop();
  await boss.stop({ graceful: false, wait: true });
  await t.close();
});

async function waitForRun(c: Client, runId: string, timeoutMs = 60_000): Promise<Run> {
  const until = Date.now() + timeoutMs;
  for (;;) {
    const run: Run = (await c.agent.get(paths.run(runId)).expect(200)).body;
    if (run.finishedAt) return run;
    if (Date.now() > until) throw new Error(`run ${runId} still ${run.state} after ${timeoutMs} ms: ${JSON.stringify(run.items.map((i) => i.state))}`);
    await new Promise((r) => setTimeout(r, 200));
  }
}

async function world() {
  const owner = await makeUser(t.db, 'owner');
  const student = await makeUser(t.db, 'student');
  const student2 = await makeUser(t.db, 'student2');
  const viewer = await makeUser(t.db, 'viewer');
  const instrument = await makeInstrument(t.db, [
    [owner.id, 'owner'],
    [student.id, 'student'],
    [student2.id, 'student'],
    [viewer.id, 'viewer'],
  ]);
  const v1 = await insertApprovedVersion(t.db, instrument.id, owner.id, 1, new Date('2026-10-01T00:00:00Z'));
  return { owner, student, student2, viewer, instrument, v1 };
}

describe('runs', () => {
  it('a phase scan: every frame one spectrum, the map and yield curves, and the modulation fit recovers the simulated depth and phase', async () => {
    const w = await world();
    // Per-order modulation put in by the simulator: weight_q(x) = 1 + 0.4·cos(x + φ_q), φ_q = 0.1·q (invented).
    const n = 12;
    const harmonics = lab().harmonics;
    const ids: string[] = [];
    for (let k = 0; k < n; k++) {
      const x = (2 * Math.PI * k) / n;
      const weights = Object.fromEntries(harmonics.map((q) => [q, 1 + 0.4 * Math.cos(x + 0.1 * q)]));
      const f = await insertFrame(t.db, t.store, w.instrument.id, frameBytes(100 + k, { harmonicWeights: weights, noJitter: true }), {
        takenAt: new Date(Date.UTC(2026, 10, 12, 10, k)),
        scanVariable: 'two-colour phase (rad)',
        scanValue: x,
      });
      ids.push(f.id);
    }
    const c = await signIn(t.app, w.student.email);
    const created = await c.agent.post(paths.instrumentRuns(w.instrument.id)).set('X-CSRF-Token', c.csrf).send({ scanVariable: 'two-colour phase (rad)' }).expect(201);
    expect(created.body.total).toBe(n);
    const run = await waitForRun(c, created.body.id);
    expect(run.state).toBe('done');
    expect(run.done).toBe(n);
    for (const id of ids) expect(await t.db.select().from(spectra).where(eq(spectra.frameId, id))).toHaveLength(1);

    const scan = (await c.agent.get(paths.runScan(run.id)).expect(200)).body;
    expect(scan.values).toHaveLength(n);
    expect(scan.yieldMap.length).toBe(scan.harmonics.length);
    const strong = scan.modulation.filter((m: { harmonic: number; fit: { amplitude: number; offset: number; amplitudeSigma: number } | null }) => m.fit && m.fit.offset > 20 * m.fit.amplitudeSigma);
    expect(strong.length).toBeGreaterThanOrEqual(3);
    for (const m of strong) {
      expect(m.fit.periodFrom).toBe('default');
      expect(Math.abs(m.fit.modulationDepth - 0.4)).toBeLessThan(Math.max(0.02, 4 * (m.fit.amplitudeSigma / m.fit.offset)));
      const dphi = Math.atan2(Math.sin(m.fit.phaseRad - 0.1 * m.harmonic), Math.cos(m.fit.phaseRad - 0.1 * m.harmonic));
      expect(Math.abs(dphi)).toBeLessThan(Math.max(0.1, 4 * m.fit.phaseSigmaRad));
    }
    // The starter hears the run finished (the mail goes through SMTP to the sink after the run ends: wait for it).
    const finishedMails = async () => (await t.db.select().from(mails).where(eq(mails.to, w.student.email))).filter((m) => m.subject.includes(`${n} of ${n} frames done`));
    await expect.poll(finishedMails, { timeout: 15_000, interval: 200 }).toHaveLength(1);
  });

  it('a duplicated or retried job never makes a second row', async () => {
    const w = await world();
    const f = await insertFrame(t.db, t.store, w.instrument.id, frameBytes(130), { takenAt: new Date('2026-11-13T10:00:00Z') });
    const c = await signIn(t.app, w.student.email);
    const created = (await c.agent.post(paths.instrumentRuns(w.instrument.id)).set('X-CSRF-Token', c.csrf).send({ frameIds: [f.id] }).expect(201)).body;
    await waitForRun(c, created.id);
    const [item] = await t.db.select().from(runItems).where(eq(runItems.runId, created.id));
    // The same item delivered again (a second job, as after a lost acknowledgement), and run twice at once by hand.
    await queue.enqueue([{ itemId: item.id, jobId: randomUUID() }]);
    await t.db.update(runItems).set({ state: 'queued' }).where(eq(runItems.id, item.id));
    const deps = { db: t.db, store: t.store, sources: dbSources, mailer: t.mailer, appUrl: 'http://x' };
    await Promise.all([processApplyItem(deps, item.id, 'dup-a', { retryCount: 0, retryLimit: 3 }), processApplyItem(deps, item.id, 'dup-b', { retryCount: 0, retryLimit: 3 })]);
    await new Promise((r) => setTimeout(r, 1500));
    expect(await t.db.select().from(spectra).where(eq(spectra.frameId, f.id))).toHaveLength(1);
    expect((await t.db.select().from(runItems).where(eq(runItems.id, item.id)))[0].state).toBe('done');
  });

  it('frames with no calibration fail with the reason; retry after a version covers them finishes the run', async () => {
    const w = await world();
    const early = await insertFrame(t.db, t.store, w.instrument.id, frameBytes(140), { takenAt: new Date('2026-09-20T10:00:00Z') });
    const ok = await insertFrame(t.db, t.store, w.instrument.id, frameBytes(141), { takenAt: new Date('2026-11-14T10:00:00Z') });
    const c = await signIn(t.app, w.student.email);
    const created = (await c.agent.post(paths.instrumentRuns(w.instrument.id)).set('X-CSRF-Token', c.csrf).send({ frameIds: [early.id, ok.id] }).expect(201)).body;
    const run = await waitForRun(c, created.id);
    expect(run.state).toBe('done');
    expect(run.failed).toBe(1);
    expect(run.items.find((i) => i.frameId === early.id)!.message).toContain('No approved calibration');
    // Another student may not retry it; the starter may.
    const other = await signIn(t.app, w.student2.email);
    await other.agent.post(paths.runRetry(run.id)).set('X-CSRF-Token', other.csrf).expect(403);
    await t.db.update(calibrationVersions).set({ validFrom: new Date('2026-09-01T00:00:00Z') }).where(eq(calibrationVersions.id, w.v1.id));
    await c.agent.post(paths.runRetry(run.id)).set('X-CSRF-Token', c.csrf).expect(200);
    const again = await waitForRun(c, run.id);
    expect(again.failed).toBe(0);
    expect(again.done).toBe(2);
    await c.agent.post(paths.runRetry(run.id)).set('X-CSRF-Token', c.csrf).expect(409);
  });

  it('cancel: queued frames are cancelled and never applied', async () => {
    const w = await world();
    const f = await insertFrame(t.db, t.store, w.instrument.id, frameBytes(150), { takenAt: new Date('2026-11-15T10:00:00Z') });
    const c = await signIn(t.app, w.student.email);
    paused = true;
    const created = (await c.agent.post(paths.instrumentRuns(w.instrument.id)).set('X-CSRF-Token', c.csrf).send({ frameIds: [f.id] }).expect(201)).body;
    paused = false;
    const viewer = await signIn(t.app, w.viewer.email);
    await viewer.agent.post(paths.runCancel(created.id)).set('X-CSRF-Token', viewer.csrf).expect(403);
    const cancelled = (await c.agent.post(paths.runCancel(created.id)).set('X-CSRF-Token', c.csrf).expect(200)).body;
    expect(cancelled.state).toBe('cancelled');
    expect(cancelled.items[0].state).toBe('cancelled');
    expect(cancelled.finishedAt).not.toBeNull();
    await c.agent.post(paths.runCancel(created.id)).set('X-CSRF-Token', c.csrf).expect(409);
    expect(await t.db.select().from(spectra).where(eq(spectra.frameId, f.id))).toHaveLength(0);
  });

  it('viewers cannot start runs; bad bodies are 400; frames of another instrument are 404', async () => {
    const w = await world();
    const other = await world();
    const theirs = await insertFrame(t.db, t.store, other.instrument.id, frameBytes(160), { takenAt: new Date('2026-11-16T10:00:00Z') });
    const viewer = await signIn(t.app, w.viewer.email);
    await viewer.agent.post(paths.instrumentRuns(w.instrument.id)).set('X-CSRF-Token', viewer.csrf).send({ scanVariable: 'x' }).expect(403);
    const c = await signIn(t.app, w.student.email);
    const both = await c.agent.post(paths.instrumentRuns(w.instrument.id)).set('X-CSRF-Token', c.csrf).send({ frameIds: [theirs.id], scanVariable: 'x' });
    expect(both.status).toBe(400);
    await c.agent.post(paths.instrumentRuns(w.instrument.id)).set('X-CSRF-Token', c.csrf).send({ frameIds: [theirs.id] }).expect(404);
    await c.agent.post(paths.instrumentRuns(w.instrument.id)).set('X-CSRF-Token', c.csrf).send({ frameIds: [theirs.id], version: 0 }).expect(400);
  });

  it('re-apply: stale spectra are redone with the now-valid version in one run', async () => {
    const w = await world();
    const before = await insertFrame(t.db, t.store, w.instrument.id, frameBytes(170), { takenAt: new Date('2026-11-17T10:00:00Z') });
    const after = await insertFrame(t.db, t.store, w.instrument.id, frameBytes(171), { takenAt: new Date('2026-11-19T10:00:00Z') });
    const c = await signIn(t.app, w.student.email);
    await c.agent.get(paths.frameSpectrum(before.id)).expect(200);
    await c.agent.get(paths.frameSpectrum(after.id)).expect(200);
    await c.agent.post(paths.instrumentReapply(w.instrument.id)).set('X-CSRF-Token', c.csrf).expect(409);
    // Version 2 from Nov 18 supersedes version 1 (as approval does) and its spectra are marked.
    const v2From = new Date('2026-11-18T00:00:00Z');
    await t.db.update(calibrationVersions).set({ state: 'superseded', validUntil: v2From }).where(eq(calibrationVersions.id, w.v1.id));
    await insertApprovedVersion(t.db, w.instrument.id, w.owner.id, 2, v2From);
    await t.db.update(spectra).set({ stale: true }).where(eq(spectra.versionId, w.v1.id));

    const listed = (await c.agent.get(paths.instrumentSpectra(w.instrument.id, true)).expect(200)).body;
    expect(listed.staleFrames).toBe(2);
    expect(listed.items.map((i: { frameId: string; version: number; versionState: string }) => [i.version, i.versionState])).toEqual([
      [1, 'superseded'],
      [1, 'superseded'],
    ]);
    const created = (await c.agent.post(paths.instrumentReapply(w.instrument.id)).set('X-CSRF-Token', c.csrf).expect(201)).body;
    expect(created.kind).toBe('reapply');
    expect(created.total).toBe(2);
    const run = await waitForRun(c, created.id);
    expect(run.done).toBe(2);
    expect(run.items.find((i) => i.frameId === before.id)!.version).toBe(1);
    expect(run.items.find((i) => i.frameId === after.id)!.version).toBe(2);
    const fresh = await t.db.select().from(spectra).where(eq(spectra.frameId, after.id));
    expect(fresh.map((s) => [s.versionNumber, s.stale]).sort()).toEqual([
      [1, true],
      [2, false],
    ]);
    expect((await c.agent.get(paths.instrumentSpectra(w.instrument.id)).expect(200)).body.staleFrames).toBe(0);
    // Nothing left to re-apply.
    await c.agent.post(paths.instrumentReapply(w.instrument.id)).set('X-CSRF-Token', c.csrf).expect(409);
  });
});
