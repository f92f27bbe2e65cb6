/** Start the whole server: migrate, start the mail sink (MAIL_SINK=on), listen. */
import type { AddressInfo } from 'node:net';
import type { Server } from 'node:http';
import { loadConfig, type Config } from './config.ts';
import { createApp } from './app.ts';
import { createDb, createPool } from './db/client.ts';
import { runMigrations } from './db/migrate.ts';
import { createMailer } from './mail/mailer.ts';
import { startMailSink, type MailSink } from './mail/sink.ts';

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
  const app = createApp({ config, db, pool, mailer });

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
        mailer.close();
        await sink?.close();
        await pool.end();
      })();
      return closed;
    },
  };
}
