/**
 * Fixtures for the spectra/runs API tests: a small simulated spectrometer (512 × 128 px frames from
 * shared/engine/simulate, invented values), a calibration from the simulator's true geometry
 * (tests/support/truth-calibration.ts), and direct inserts of frames and approved
 * versions, so these tests exercise issue 5's routes and not the upload/approval UI paths.
 */
import { createHash, randomUUID } from 'node:crypto';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { inject } from 'vitest';
import type { Express } from 'express';
import type pg from 'pg';
import { encodeTiff, generateScenarios, simulateFrame, type SimScenario } from '../../shared/engine/simulate/index.ts';
import type { Calibration } from '../../shared/engine/types.ts';
import { createApp } from '../../server/app.ts';
import { createDb, createPool, type Db } from '../../server/db/client.ts';
import { calibrationVersions, frames, workbenchRuns } from '../../server/db/schema/index.ts';
import { createMailer, type Mailer } from '../../server/mail/mailer.ts';
import { startMailSink, type MailSink } from '../../server/mail/sink.ts';
import type { ApplyQueue } from '../../server/modules/runs/queue.ts';
import { createLocalStore } from '../../server/storage/local-store.ts';
import type { FrameStore } from '../../server/storage/frame-store.ts';
import { truthCalibration } from '../support/truth-calibration.ts';

export interface Lab {
  scenario: SimScenario;
  calibration: Calibration;
  /** Harmonics whose lines the simulator puts on the detector. */
  harmonics: number[];
}

let cached: Lab | undefined;

/** The simulated instrument and its engine-made calibration (computed once per test file). */
export function lab(): Lab {
  if (cached) return cached;
  const [scenario] = generateScenarios(1, 7, { classes: ['gi-odd-clean'], sizes: [[512, 128]], spectralAxis: 'x', bitDepth: 16 });
  const { truth } = simulateFrame(scenario, 1);
  cached = { scenario, calibration: truthCalibration(scenario, truth), harmonics: [...new Set(truth.lines.map((l) => l.harmonic))] };
  return cached;
}

/**
 * A TIFF of the lab's spectrometer. `shiftPx` moves the camera (detector centre pixel) as a
 * realignment would; `harmonicWeights` scales lines (scan modulation); `noJitter` turns off the
 * simulator's per-frame order-amplitude jitter (15 % by default).
 */
export function frameBytes(seed: number, options: { shiftPx?: number; harmonicWeights?: Record<number, number>; noJitter?: boolean } = {}): Uint8Array {
  const { scenario } = lab();
  const s: SimScenario = {
    ...scenario,
    envelope: options.noJitter ? { ...scenario.envelope, jitterRelative: 0 } : scenario.envelope,
    geometry: { ...scenario.geometry, detectorCenterPixel: scenario.geometry.detectorCenterPixel + (options.shiftPx ?? 0) },
    harmonicWeights: options.harmonicWeights ?? scenario.harmonicWeights,
  };
  return encodeTiff(simulateFrame(s, seed).frame, { bitsPerSample: 16 });
}

export function sha256Hex(bytes: Uint8Array): string {
  return createHash('sha256').update(bytes).digest('hex');
}

export interface FrameMeta {
  takenAt: Date;
  scanVariable?: string;
  scanValue?: number;
  uploadedBy?: string;
}

/** Store the bytes and insert the frame row, as the upload route would. */
export async function insertFrame(db: Db, store: FrameStore, instrumentId: string, bytes: Uint8Array, meta: FrameMeta) {
  const sha256 = sha256Hex(bytes);
  await store.put(sha256, bytes);
  const [row] = await db
    .insert(frames)
    .values({
      instrumentId,
      sha256,
      sizeBytes: bytes.byteLength,
      originalName: `sim-${sha256.slice(0, 8)}.tif`,
      format: 'tiff',
      page: 0,
      pageCount: 1,
      width: 512,
      height: 128,
      sampleFormat: 'uint',
      bitsPerSample: 16,
      kind: 'signal',
      takenAt: meta.takenAt,
      takenAtSource: 'entered',
      scanVariable: meta.scanVariable ?? null,
      scanValue: meta.scanValue ?? null,
      uploadedBy: meta.uploadedBy ?? null,
    })
    .returning();
  return row;
}

/** An approved version (with the workbench run it cites), valid from `validFrom`. */
export async function insertApprovedVersion(db: Db, instrumentId: string, authorId: string, number: number, validFrom: Date, calibration = lab().calibration) {
  const [run] = await db
    .insert(workbenchRuns)
    .values({ instrumentId, createdBy: authorId, status: 'unique', inputs: {} as never, result: { status: 'unique', calibration } as never })
    .returning();
  const [row] = await db
    .insert(calibrationVersions)
    .values({
      instrumentId,
      number,
      state: 'approved',
      validFrom,
      authorId,
      reviewerId: authorId,
      approvedAt: new Date(),
      runId: run.id,
      frameIds: [],
      model: calibration.model,
      driverNm: calibration.driverNm,
      rmsResidualPx: 0.1,
      peakCount: calibration.points.length,
      calibration,
    })
    .returning();
  return row;
}

export interface SpectraTestApp {
  app: Express;
  db: Db;
  pool: pg.Pool;
  store: FrameStore;
  storeDir: string;
  mailer: Mailer;
  databaseUrl: string;
  smtpPort: number;
  close(): Promise<void>;
}

/** The real app over this run's database, a temp local frame store (or `storeOverride`), the SMTP sink, and `queue`. */
export async function startSpectraApp(queue?: ApplyQueue, storeOverride?: FrameStore): Promise<SpectraTestApp> {
  const databaseUrl = inject('databaseUrl');
  const pool = createPool(databaseUrl, 6);
  const db = createDb(pool);
  const sink: MailSink = await startMailSink(db, { port: 0 });
  const mailer = createMailer(`smtp://127.0.0.1:${sink.port}`, 'Orderly tests <orderly@localhost>', true);
  const storeDir = mkdtempSync(join(tmpdir(), 'orderly-spectra-test-'));
  const store = storeOverride ?? createLocalStore(storeDir);
  const app = createApp({
    config: { sessionSecret: 'api-test-session-secret-0123456789', appUrl: 'http://127.0.0.1:5480', staticDir: '/nonexistent-static-dir', signInLimitPerMinute: 1000 },
    db,
    pool,
    mailer,
    log: () => undefined,
    frames: { store, maxBytes: 64 * 1024 * 1024 },
    applyQueue: queue,
  });
  return {
    app,
    db,
    pool,
    store,
    storeDir,
    mailer,
    databaseUrl,
    smtpPort: sink.port,
    async close() {
      mailer.close();
      await sink.close();
      await pool.end();
      rmSync(storeDir, { recursive: true, force: true });
    },
  };
}

export function uniqueName(label: string): string {
  return `${label}-${randomUUID().slice(0, 8)}`;
}
