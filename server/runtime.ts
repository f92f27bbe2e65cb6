/** Start the whole server: migrate, start the mail sink (MAIL_SINK=on), listen. */
import type { AddressInfo } from 'node:net';
import type { Server } from 'node:http';
import { loadConfig, type Config } from './config.ts';
import { createApp } from './app.ts';
import { createDb, createPool } from './db/client.ts';
import { runMigrations } from './db/migrate.ts';
import { createMailer } from './mail/mailer.ts';
import { startMailSink, type MailSink } from './mail/sink.ts';
import { frameStoreFromConfig } from './storage/from-config.ts';
import { pgBossQueue, startBoss } from './modules/runs/queue.ts';
import { startApplyWorkers, type ApplyWorkers } from './modules/runs/worker.ts';
import { dbSources } from './modules/spectra/sources.ts';

export interface RunningServer {
  url: string;
  port: number;
  close(): Promise<void>;
}

/** The port in an smtp:// URL (25 when absent). */
function smtpPort(smtpUrl: string): number {
  return Number(new URL(smtpUrl).port || 25);
}

/**
 * @param overrides replace parsed environment values (tests pass `port: 0`, `databaseUrl`, and
 *   `smtpUrl: 'smtp://127.0.0.1:0'` for a sink on a free port).
 */
export async function startServer(overrides: Partial<Config> = {}): Promise<RunningServer> {
  const config: Config = { ...loadConfig(), ...overrides };
  await runMigrations(config.databaseUrl);
  const pool = createPool(config.databaseUrl);
  const db = createDb(pool);

  let sink: MailSink | undefined;
  let smtpUrl = config.smtpUrl;
  if (config.mailSink) {
    const url = new URL(config.smtpUrl);
    sink = await startMailSink(db, { host: url.hostname, port: smtpPort(config.smtpUrl) });
    url.port = String(sink.port);
    smtpUrl = url.toString();
  }
  const mailer = createMailer(smtpUrl, config.mailFrom, config.mailSink);
  // Frame files: the local folder or S3 (FRAME_STORAGE); the apply queue and, by default, its workers.
  const frameStore = frameStoreFromConfig({ frameStorage: config.frameStorage, s3: config.s3, localDir: config.frameStorageDir });
  const frames = { store: frameStore.store, maxBytes: config.frameMaxBytes };
  const boss = await startBoss({ databaseUrl: config.databaseUrl, expireInSeconds: config.applyJobExpireS, maintenanceIntervalSeconds: config.queueMaintenanceS });
  const applyQueue = pgBossQueue(boss, config.applyJobExpireS);
  let workers: ApplyWorkers | undefined;
  if (config.workersInProcess) {
    workers = await startApplyWorkers(
      { db, store: frameStore.store, sources: dbSources, mailer, appUrl: config.appUrl },
      boss,
      { concurrency: config.workerConcurrency },
    );
  }
  const app = createApp({ config, db, pool, mailer, frames, applyQueue });

  const server: Server = await new Promise((resolve, reject) => {
    const s = app.listen(config.port, config.host, (error?: Error) => (error ? reject(error) : resolve(s)));
  });
  const port = (server.address() as AddressInfo).port;
  const host = config.host.includes(':') ? `[${config.host}]` : config.host;

  let closed: Promise<void> | undefined;
  return {
    url: `http://${host}:${port}`,
    port,
    close() {
      closed ??= (async () => {
        server.closeAllConnections();
        await new Promise<void>((resolve) => server.close(() => resolve()));
        await workers?.stop();
        await boss.stop({ graceful: true, wait: true, timeout: 10_000 });
        frameStore.close();
        mailer.close();
        await sink?.close();
        await pool.end();
      })();
      return closed;
    },
  };
}
