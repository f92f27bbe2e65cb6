/**
 * The real server for browser tests: the built client (dist/client), a migrated test database,
 * the in-process mail sink on a free port, and fresh temporary folders for stored files and
 * frames. `close()` stops it and removes the folders.
 */
import { existsSync } from 'node:fs';
import { mkdtemp, rm } from 'node:fs/promises';
import { createServer } from 'node:net';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { Page } from 'playwright-core';
import type { Config } from '../../server/config.ts';
import { startServer } from '../../server/runtime.ts';

export interface E2eServer {
  url: string;
  /** Where uploaded frames are stored (content-addressed). */
  frameDir: string;
  /** Other server files; also a scratch folder for files the test writes. */
  fileDir: string;
  close(): Promise<void>;
}

/** A TCP port nobody listens on right now. */
export async function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const probe = createServer();
    probe.once('error', reject);
    probe.listen(0, '127.0.0.1', () => {
      const address = probe.address();
      const port = typeof address === 'object' && address ? address.port : 0;
      probe.close(() => resolve(port));
    });
  });
}

/** Starts the app on `databaseUrl`; `overrides` adjust the config (workers, concurrency…). */
export async function startE2eServer(databaseUrl: string, name: string, overrides: Partial<Config> = {}): Promise<E2eServer> {
  if (!existsSync('dist/client/index.html')) throw new Error('dist/client is missing: run `npx vite build` first');
  const frameDir = await mkdtemp(join(tmpdir(), `orderly-e2e-${name}-frames-`));
  const fileDir = await mkdtemp(join(tmpdir(), `orderly-e2e-${name}-files-`));
  const [appPort, smtpPort] = [await freePort(), await freePort()];
  const server = await startServer({
    port: appPort,
    host: '127.0.0.1',
    databaseUrl,
    appUrl: `http://127.0.0.1:${appPort}`,
    smtpUrl: `smtp://127.0.0.1:${smtpPort}`,
    mailSink: true,
    staticDir: 'dist/client',
    storageDir: fileDir,
    frameStorageDir: frameDir,
    frameStorage: 'local',
    sessionSecret: 'e2e-session-secret-not-for-production',
    ...overrides,
  });
  return {
    url: server.url,
    frameDir,
    fileDir,
    async close() {
      await server.close();
      for (const dir of [frameDir, fileDir]) await rm(dir, { recursive: true, force: true });
    },
  };
}

/** Signs in through the form and waits for the instruments page. */
export async function signIn(page: Page, baseUrl: string, who: { email: string; password: string }): Promise<void> {
  await page.goto(`${baseUrl}/sign-in`);
  await page.getByLabel('E-mail').fill(who.email);
  await page.getByLabel('Password').fill(who.password);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.getByRole('heading', { name: 'Instruments', exact: true }).waitFor();
}

/** Signs out from the header and waits for the sign-in page. */
export async function signOut(page: Page): Promise<void> {
  await page.getByRole('button', { name: 'Sign out' }).first().click();
  await page.waitForURL(/\/sign-in/);
}
