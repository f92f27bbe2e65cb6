/**
 * Workers as separate processes (`node --import tsx server/worker.ts`, what `npm run worker`
 * runs) against the same PostgreSQL and frame folder: one killed with SIGKILL in the middle of a
 * run and a fresh one started after it; and two at once sharing a run. Every frame must end with
 * exactly one spectrum, and each item names the worker that made it.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { eq, inArray } from 'drizzle-orm';
import type PgBoss from 'pg-boss';
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { paths } from '../../shared/api/paths.ts';
import type { Run } from '../../shared/api/runs.ts';
import { runItems, spectra } from '../../server/db/schema/index.ts';
import { pgBossQueue, startBoss } from '../../server/modules/runs/queue.ts';
import { makeInstrument, makeUser, signIn, type Client } from './helpers.ts';
import { frameBytes, insertApprovedVersion, insertFrame, lab, startSpectraApp, type SpectraTestApp } from './spectra-fixtures.ts';

/** A lost job (worker killed) is retried after this many seconds; maintenance looks every second. */
const EXPIRE_S = 3;

let t: SpectraTestApp;
let boss: PgBoss;
const children: ChildProcess[] = [];

beforeAll(async () => {
  lab();
  boss = await startBoss({ databaseUrl: (await import('vitest')).inject('databaseUrl'), expireInSeconds: EXPIRE_S, maintenanceIntervalSeconds: 1 });
  t = await startSpectraApp(pgBossQueue(boss, EXPIRE_S));
});
afterEach(async () => {
  for (const c of children.splice(0)) {
    if (c.exitCode === null && c.signalCode === null) {
      c.kill('SIGTERM');
      await new Promise((r) => c.once('exit', r));
    }
  }
});
afterAll(async () => {
  await boss.stop({ graceful: false, wait: true });
  await t.close();
});

/** Start a worker process and wait for its "ready" line. */
async function startWorker(id: string): Promise<ChildProcess> {
  const child = spawn(process.execPath, ['--import', 'tsx', 'server/worker.ts'], {
    env: {
      ...process.env,
      DATABASE_URL: t.databaseUrl,
      FRAME_STORAGE: 'local',
      FRAME_STORAGE_DIR: t.storeDir,
      SMTP_URL: `smtp://127.0.0.1:${t.smtpPort}`,
      MAIL_SINK: 'on',
      SESSION_SECRET: 'worker-test-secret-0123456789',
      APPLY_JOB_EXPIRE_S: String(EXPIRE_S),
      QUEUE_MAINTENANCE_S: '1',
      WORKER_ID: id,
      NODE_NO_WARNINGS: '1',
    },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  children.push(child);
  let stderr = '';
  child.stderr!.on('data', (d: Buffer) => (stderr += d.toString()));
  await new Promise<void>((resolve, reject) => {
    const timer = setTimeout(() => reject(new Error(`worker ${id} not ready after 30 s: ${stderr}`)), 30_000);
    child.stdout!.on('data', (d: Buffer) => {
      if (d.toString().includes(`worker ${id} ready`)) {
        clearTimeout(timer);
        resolve();
      }
    });
    child.once('exit', (code) => reject(new Error(`worker ${id} exited with ${code}: ${stderr}`)));
  });
  return child;
}

async function readRun(c: Client, runId: string): Promise<Run> {
  return (await c.agent.get(paths.run(runId)).expect(200)).body;
}

async function waitFor(c: Client, runId: string, done: (r: Run) => boolean, timeoutMs: number): Promise<Run> {
  const until = Date.now() + timeoutMs;
  for (;;) {
    const run = await readRun(c, runId);
    if (done(run)) return run;
    if (Date.now() > until) throw new Error(`run ${runId}: ${run.state}, ${run.done}/${run.total} after ${timeoutMs} ms`);
    await new Promise((r) => setTimeout(r, 100));
  }
}

async function setUp(frameCount: number, seedBase: number) {
  const student = await makeUser(t.db, 'student');
  const owner = await makeUser(t.db, 'owner');
  const instrument = await makeInstrument(t.db, [
    [owner.id, 'owner'],
    [student.id, 'student'],
  ]);
  await insertApprovedVersion(t.db, instrument.id, owner.id, 1, new Date('2026-10-01T00:00:00Z'));
  const frameIds: string[] = [];
  for (let k = 0; k < frameCount; k++) {
    const f = await insertFrame(t.db, t.store, instrument.id, frameBytes(seedBase + k), { takenAt: new Date(Date.UTC(2026, 10, 20, 10, k)) });
    frameIds.push(f.id);
  }
  const c = await signIn(t.app, student.email);
  return { instrument, frameIds, c };
}

async function spectraPerFrame(frameIds: string[]): Promise<number[]> {
  const rows = await t.db.select({ frameId: spectra.frameId }).from(spectra).where(inArray(spectra.frameId, frameIds));
  return frameIds.map((id) => rows.filter((r) => r.frameId === id).length);
}

describe('worker processes', () => {
  it('a worker killed mid-run: after a new worker starts, every frame has exactly one result', async () => {
    const { instrument, frameIds, c } = await setUp(16, 300);
    await startWorker('w-killed');
    const created = (await c.agent.post(paths.instrumentRuns(instrument.id)).set('X-CSRF-Token', c.csrf).send({ frameIds }).expect(201)).body;
    const partway = await waitFor(c, created.id, (r) => r.done >= 3, 60_000);
    children[0].kill('SIGKILL');
    await new Promise((r) => children[0].once('exit', r));
    const atKill = await readRun(c, created.id);
    expect(atKill.finishedAt).toBeNull();
    expect(atKill.done).toBeLessThan(frameIds.length);
    const inFlight = atKill.items.filter((i) => i.state === 'running').map((i) => i.frameId);

    await startWorker('w-restarted');
    const run = await waitFor(c, created.id, (r) => r.finishedAt !== null, 90_000);
    expect(run.state).toBe('done');
    expect(run.done).toBe(frameIds.length);
    expect(await spectraPerFrame(frameIds)).toEqual(frameIds.map(() => 1));
    const workersUsed = new Set(run.items.map((i) => i.workerId));
    expect(workersUsed).toEqual(new Set(['w-killed', 'w-restarted']));
    // A frame the killed worker had taken is finished by the new one, on a second attempt.
    for (const id of inFlight) {
      const item = run.items.find((i) => i.frameId === id)!;
      expect(item.workerId).toBe('w-restarted');
      expect(item.attempts).toBeGreaterThanOrEqual(2);
    }
    expect(partway.done).toBeGreaterThanOrEqual(3);
  });

  it('two workers on one run split the frames, with exactly one result each', async () => {
    const { instrument, frameIds, c } = await setUp(24, 400);
    await Promise.all([startWorker('w-a'), startWorker('w-b')]);
    const created = (await c.agent.post(paths.instrumentRuns(instrument.id)).set('X-CSRF-Token', c.csrf).send({ frameIds }).expect(201)).body;
    const run = await waitFor(c, created.id, (r) => r.finishedAt !== null, 90_000);
    expect(run.state).toBe('done');
    const byWorker = { 'w-a': 0, 'w-b': 0 } as Record<string, number>;
    for (const item of run.items) byWorker[item.workerId!] += 1;
    expect(byWorker['w-a'] + byWorker['w-b']).toBe(24);
    expect(byWorker['w-a']).toBeGreaterThan(0);
    expect(byWorker['w-b']).toBeGreaterThan(0);
    expect(await spectraPerFrame(frameIds)).toEqual(frameIds.map(() => 1));
    const items = await t.db.select().from(runItems).where(eq(runItems.runId, run.id));
    expect(items.every((i) => i.attempts === 1)).toBe(true);
  });
});
