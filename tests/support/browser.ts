/**
 * Debian's Chromium for the e2e tests, through playwright-core (never `npx playwright install`).
 * Each launch gets its own temporary profile folder, removed again on close.
 */
import { mkdir, mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { chromium, type BrowserContext, type Page } from 'playwright-core';

/** The browser binary; ORDERLY_CHROMIUM overrides it (e.g. /usr/lib/chromium/chromium). */
export const CHROMIUM_PATH = process.env.ORDERLY_CHROMIUM || '/usr/bin/chromium';

/** Flags that worked on this machine (/work/shared/STACK.md): headless, no sandbox as root, no
 * network chatter of the browser's own. */
export const CHROMIUM_ARGS: readonly string[] = [
  '--headless',
  '--no-sandbox',
  '--disable-gpu',
  '--disable-quic',
  '--no-first-run',
  '--disable-background-networking',
  '--disable-component-update',
  '--disable-sync',
];

/** Where screenshot() writes, relative to the repository root (ignored by git). */
export const SCREENSHOT_DIR = join('test-results', 'screenshots');

/** A running browser: its context, the first page, and close() which also removes the profile. */
export interface LaunchedBrowser {
  context: BrowserContext;
  page: Page;
  /** The temporary profile folder; gone after close(). */
  profileDir: string;
  close(): Promise<void>;
}

/**
 * Starts headless Chromium with a fresh profile.
 * A persistent context is used because Chromium refuses `--user-data-dir` through `launch()`.
 */
export async function launchBrowser(): Promise<LaunchedBrowser> {
  const profileDir = await mkdtemp(join(tmpdir(), 'orderly-chromium-'));
  let context: BrowserContext;
  try {
    context = await chromium.launchPersistentContext(profileDir, {
      executablePath: CHROMIUM_PATH,
      headless: true,
      args: [...CHROMIUM_ARGS],
      viewport: { width: 1280, height: 800 },
    });
  } catch (error) {
    await rm(profileDir, { recursive: true, force: true });
    throw error;
  }
  const page = context.pages()[0] ?? (await context.newPage());
  let closed = false;
  return {
    context,
    page,
    profileDir,
    async close() {
      if (closed) return;
      closed = true;
      try {
        await context.close();
      } finally {
        await rm(profileDir, { recursive: true, force: true });
      }
    },
  };
}

/**
 * Saves a full-page PNG of `page` as test-results/screenshots/<name>.png and returns its path.
 * @param name file name without extension; letters, digits, dot, dash and underscore only
 */
export async function screenshot(page: Page, name: string): Promise<string> {
  if (!/^[\w.-]+$/.test(name)) throw new Error(`screenshot name "${name}" may hold only letters, digits, ".", "-" and "_"`);
  await mkdir(SCREENSHOT_DIR, { recursive: true });
  const path = join(SCREENSHOT_DIR, `${name}.png`);
  await page.screenshot({ path, fullPage: true });
  return path;
}
