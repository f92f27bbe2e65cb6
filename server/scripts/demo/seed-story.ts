/**
 * Puts the demo story (story.ts — INVENTED demo data) into the database through the same
 * services the routes use: frames are simulated, encoded as TIFF, decoded and stored as an
 * upload would be; versions come from real workbench runs of the engine, then go through
 * submit and approve by the demo scientist and owner. Idempotent: a story whose frames are
 * already stored is skipped whole.
 */
import { and, eq, inArray } from 'drizzle-orm';
import type { SessionUser } from '../../../shared/api/session.ts';
import { uploadFieldsSchema } from '../../../shared/api/frames.ts';
import { workbenchRunSchema } from '../../../shared/api/workbench.ts';
import { driverPriorOf, encodeTiff, simulateFrame } from '../../../shared/engine/simulate/index.ts';
import type { Db } from '../../db/client.ts';
import { frames, instruments, spectra, users } from '../../db/schema/index.ts';
import type { Mailer } from '../../mail/mailer.ts';
import type { ApplyQueue } from '../../modules/runs/queue.ts';
import { createRun } from '../../modules/runs/service.ts';
import { getSpectrum } from '../../modules/spectra/service.ts';
import { dbSources } from '../../modules/spectra/sources.ts';
import { createRunSchema } from '../../../shared/api/runs.ts';
import type { FrameStore } from '../../storage/frame-store.ts';
import { decodeUpload } from '../../modules/frames/decode.ts';
import { storeUploads } from '../../modules/frames/service.ts';
import { runWorkbench } from '../../modules/versions/workbench.ts';
import { approveVersion, createVersion, submitVersion } from '../../modules/versions/service.ts';
import { DELAY_SCAN_PERIOD_RAD, demoStories, type DemoFrame, type DemoInstrumentStory } from './story.ts';

export interface StorySeedResult {
  frames: number;
  versions: number;
  /** Frame ids by demo name, for the spectra step. */
  frameIds: Map<string, string>;
}

async function sessionUser(db: Db, email: string): Promise<SessionUser> {
  const [row] = await db.select({ id: users.id, email: users.email, name: users.name, isAdmin: users.isAdmin }).from(users).where(eq(users.email, email));
  if (!row) throw new Error(`demo user ${email} is missing; seed the accounts first`);
  return row;
}

function uploadFields(f: DemoFrame) {
  const m = f.meta;
  return uploadFieldsSchema.parse({
    takenAt: m.takenAt,
    kind: m.kind,
    exposureS: String(m.exposureS),
    accumulations: String(m.accumulations),
    target: m.target,
    pressureMbar: String(m.pressureMbar),
    driverNm: String(m.driverNm),
    parity: m.parity,
    filters: m.filters.join(','),
    scanVariable: m.scanVariable,
    scanValue: m.scanValue === undefined ? undefined : String(m.scanValue),
    tags: m.tags.join(','),
    notes: m.notes,
  });
}

async function seedOneStory(deps: { db: Db; store: FrameStore }, story: DemoInstrumentStory, scientist: SessionUser, owner: SessionUser): Promise<StorySeedResult> {
  const { db } = deps;
  const result: StorySeedResult = { frames: 0, versions: 0, frameIds: new Map() };
  const [instrument] = await db.select({ id: instruments.id }).from(instruments).where(eq(instruments.name, story.instrumentName));
  if (!instrument) throw new Error(`demo instrument "${story.instrumentName}" is missing`);
  const names = story.frames.map((f) => `${f.name}.tif`);
  const existing = await db
    .select({ id: frames.id, originalName: frames.originalName })
    .from(frames)
    .where(and(eq(frames.instrumentId, instrument.id), inArray(frames.originalName, names)));
  if (existing.length > 0) {
    for (const row of existing) result.frameIds.set(row.originalName.replace(/\.tif$/, ''), row.id);
    return result;
  }

  for (const f of story.frames) {
    const sim = simulateFrame(f.scenario, f.seed);
    const bytes = encodeTiff(sim.frame, { bitsPerSample: 16, sampleFormat: 'uint', littleEndian: true });
    const decoded = await decodeUpload(`${f.name}.tif`, bytes);
    const stored = await storeUploads(deps, scientist, instrument.id, [decoded], uploadFields(f));
    result.frameIds.set(f.name, stored.id);
    result.frames += 1;
  }

  for (const v of story.versions) {
    const frame = story.frames.find((f) => f.name === v.frameName)!;
    const run = await runWorkbench(
      deps,
      scientist,
      instrument.id,
      workbenchRunSchema.parse({
        frameIds: [result.frameIds.get(v.frameName)!],
        driverNm: frame.meta.driverNm,
        // The driver as the simulated lab would state it: 1σ and blue-shift allowance.
        ...driverPriorOf(frame.scenario.driver),
        parity: frame.meta.parity,
        filters: frame.meta.filters,
      }),
    );
    if (run.result.status !== 'unique') {
      console.warn(`demo: version ${v.number} of "${story.instrumentName}" not made; the engine answered ${run.result.status}: ${run.result.message}`);
      continue;
    }
    const version = await createVersion(db, scientist, instrument.id, { runId: run.id, validFrom: v.validFrom, note: v.note });
    await submitVersion(db, scientist, version.id, 'Ready for review (demo).');
    if (v.finalState === 'approved') await approveVersion(db, owner, version.id, 'Checked the residuals (demo).');
    result.versions += 1;
  }
  return result;
}

/** Seeds every demo story; returns the counts added and the frame ids per instrument name. */
export async function seedDemoStories(deps: { db: Db; store: FrameStore }): Promise<{ frames: number; versions: number; frameIds: Map<string, Map<string, string>> }> {
  const scientist = await sessionUser(deps.db, 'scientist@orderly.test');
  const owner = await sessionUser(deps.db, 'owner@orderly.test');
  const total = { frames: 0, versions: 0, frameIds: new Map<string, Map<string, string>>() };
  for (const story of demoStories()) {
    const r = await seedOneStory(deps, story, scientist, owner);
    total.frames += r.frames;
    total.versions += r.versions;
    total.frameIds.set(story.instrumentName, r.frameIds);
  }
  return total;
}

/** Who the demo's spectra are made by, and with which services (mail into the sink, the apply queue). */
export interface DemoSpectraDeps {
  db: Db;
  store: FrameStore;
  mailer: Mailer;
  appUrl: string;
  queue: ApplyQueue;
}

/**
 * The demo student's everyday work: spectra of the daily frames (the one after the camera move
 * raises the drift flag, and its notice goes to the owners) and a run over the 24-frame delay
 * scan, queued for the server's workers (it finishes within seconds of `npm start`). Skipped
 * when the XUV instrument already has spectra.
 */
export async function seedDemoSpectra(deps: DemoSpectraDeps, frameIds: Map<string, Map<string, string>>): Promise<{ spectra: number; runFrames: number }> {
  const xuv = demoStories()[0]!;
  const ids = frameIds.get(xuv.instrumentName);
  if (!ids) return { spectra: 0, runFrames: 0 };
  const [instrument] = await deps.db.select({ id: instruments.id }).from(instruments).where(eq(instruments.name, xuv.instrumentName));
  const already = await deps.db.select({ id: spectra.id }).from(spectra).innerJoin(frames, eq(frames.id, spectra.frameId)).where(eq(frames.instrumentId, instrument!.id)).limit(1);
  if (already.length > 0) return { spectra: 0, runFrames: 0 };
  const student = await sessionUser(deps.db, 'student@orderly.test');
  const spectraDeps = { db: deps.db, store: deps.store, sources: dbSources, mailer: deps.mailer, appUrl: deps.appUrl };
  let made = 0;
  for (const name of ['daily-2026-11-10', 'daily-2026-11-16', 'daily-2026-11-25']) {
    const frameId = ids.get(name);
    if (!frameId) continue;
    await getSpectrum(spectraDeps, student, frameId);
    made += 1;
  }
  const run = await createRun({ ...spectraDeps, queue: deps.queue }, student, instrument!.id, createRunSchema.parse({ scanVariable: 'phaseDelayRad', period: DELAY_SCAN_PERIOD_RAD }));
  return { spectra: made, runFrames: run.total };
}
