// The browser helper (tests/support/browser.ts) against Debian's Chromium itself: it starts,
// renders a page, takes a real PNG screenshot and leaves no profile folder behind.
import { existsSync } from 'node:fs';
import { readFile } from 'node:fs/promises';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { launchBrowser, screenshot, type LaunchedBrowser } from '../support/browser.ts';

// The eight signature bytes every PNG file starts with (PNG specification, section 5.2).
const PNG_SIGNATURE = [0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a];

describe('launchBrowser', () => {
  let browser: LaunchedBrowser;
  beforeAll(async () => {
    browser = await launchBrowser();
  });
  afterAll(async () => {
    await browser?.close();
  });

  it('runs JavaScript in a real page', async () => {
    await browser.page.setContent('<main><h1 id="t">Orderly</h1><canvas id="c" width="4" height="4"></canvas></main>');
    expect(await browser.page.textContent('#t')).toBe('Orderly');
    // Canvas works in the real browser (it does not in happy-dom), which is why e2e exists.
    const hasContext = await browser.page.evaluate(() => (document.getElementById('c') as HTMLCanvasElement).getContext('2d') !== null);
    expect(hasContext).toBe(true);
  });

  it('writes a PNG screenshot under test-results/screenshots', async () => {
    const path = await screenshot(browser.page, 'infra-browser');
    expect(path).toBe('test-results/screenshots/infra-browser.png');
    const bytes = await readFile(path);
    expect([...bytes.subarray(0, 8)]).toEqual(PNG_SIGNATURE);
  });

  it('refuses screenshot names that would leave the folder', async () => {
    await expect(screenshot(browser.page, '../escape')).rejects.toThrow('may hold only');
  });

  it('removes its profile folder on close, and a second close is harmless', async () => {
    const extra = await launchBrowser();
    expect(existsSync(extra.profileDir)).toBe(true);
    await extra.close();
    await extra.close();
    expect(existsSync(extra.profileDir)).toBe(false);
  });
});
