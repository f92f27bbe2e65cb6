/**
 * `npm run worker` (`node --import tsx server/worker.ts`): apply workers alone, for other machines
 * against the same PostgreSQL and frame store (FRAME_STORAGE=s3 when they do not share a disk).
 * Mail goes to SMTP_URL (the server's sink or a relay). Prints `worker <id> ready` once polling;
 * SIGINT/SIGTERM let the current job finish, then exit.
 */
import { loadConfig } from './config.ts';
import { createDb, createPool } from './db/client.ts';
import { createMailer } from './mail/mailer.ts';
import { startBoss } from './modules/runs/queue.ts';
import { startApplyWorkers } from './modules/runs/worker.ts';
import { dbSources } from './modules/spectra/sources.ts';
import { frameStoreFromConfig } from './storage/from-config.ts';

const config = loadConfig();
const pool = createPool(config.databaseUrl, 4);
const db = createDb(pool);
const mailer = createMailer(config.smtpUrl, config.mailFrom, config.mailSink);
const frameStore = frameStoreFromConfig({ frameStorage: config.frameStorage, s3: config.s3, localDir: config.frameStorageDir });
const boss = await startBoss({ databaseUrl: config.databaseUrl, expireInSeconds: config.applyJobExpireS, maintenanceIntervalSeconds: config.queueMaintenanceS });
const workers = await startApplyWorkers({ db, store: frameStore.store, sources: dbSources, mailer, appUrl: config.appUrl }, boss, {
  concurrency: config.workerConcurrency,
  workerId: process.env.WORKER_ID || undefined,
});
console.info(`worker ${workers.workerId} ready`);

let stopping = false;
for (const signal of ['SIGINT', 'SIGTERM'] as const) {
  process.on(signal, () => {
    if (stopping) return;
    stopping = true;
    (async () => {
      await workers.stop();
      await boss.stop({ graceful: true, wait: true, timeout: 10_000 });
      frameStore.close();
      mailer.close();
      await pool.end();
    })().then(
      () => process.exit(0),
      (error: unknown) => {
        console.error('worker shutdown failed:', error);
        process.exit(1);
      },
    );
  });
}
