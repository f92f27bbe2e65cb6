/**
 * The recalibration workflow in a real browser (issue 4): the built client (dist/client) on the
 * real server, a fresh database and a temporary frame folder. Build first: `npx vite build`.
 *
 * Story (people, lab and frames invented; frames from the project's simulator): a scientist
 * uploads two frames of a flat-field XUV spectrometer — a few high odd harmonics with a driver
 * tolerance wider than two orders, so the engine cannot decide the orders — draws the signal and
 * background bands on the first, runs the workbench, gets `ambiguous`, pins one peak to its true
 * order, saves a draft valid from the realignment time and submits it; the owner approves. After
 * the camera moved, a second version from the second frame with a later validity start is
 * approved and the first shows as superseded from that time. A student cannot submit or approve,
 * a viewer cannot change anything, and a bad upload shows the engine's message and stores nothing.
 */
import { readFile, readdir, writeFile } from 'node:fs/promises';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import type { Page } from 'playwright-core';
import { signIn, signOut, startE2eServer, type E2eServer } from '../support/e2e-server.ts';
import { createDb, createPool } from '../../server/db/client.ts';
import { createUser } from '../../server/modules/users/service.ts';
import { insertMembership } from '../../server/modules/members/queries.ts';
import { insertInstrument } from '../../server/modules/instruments/queries.ts';
import { decodeFrame } from '../../shared/engine/frames/index.ts';
import { driverPriorOf, encodeTiff, generateScenario, simulateFrame } from '../../shared/engine/simulate/index.ts';
import type { SimScenario, SimTruth } from '../../shared/engine/simulate/index.ts';
import { calibrateFrame } from '../../shared/engine/calibrate.ts';
import type { Frame } from '../../shared/engine/types.ts';
import { launchBrowser, screenshot, type LaunchedBrowser } from '../support/browser.ts';

const pw = 'e2e-calibration-password';
const OWNER = { email: 'e2e-cal-owner@example.test', password: pw, name: 'Olga Owner (invented)' };
const SCIENTIST = { email: 'e2e-cal-scientist@example.test', password: pw, name: 'Sami Scientist (invented)' };
const STUDENT = { email: 'e2e-cal-student@example.test', password: pw, name: 'Stu Student (invented)' };
const VIEWER = { email: 'e2e-cal-viewer@example.test', password: pw, name: 'Vera Viewer (invented)' };
const INSTRUMENT = 'E2E flat-field XUV, Lindqvist Attosecond Lab (invented)';

// Realignment story (local times, as typed into datetime-local fields).
const TAKEN_1 = '2026-11-30T10:00';
const VALID_1 = '2026-11-30T08:00';
const TAKEN_2 = '2026-12-01T10:00';
const VALID_2 = '2026-12-01T08:00';

/** Rows (spatial axis) of the bands the scientist draws; the beam sits in 57..143 (the simulator's truth). */
const SIGNAL = { start: 57, end: 143 };
const BACKGROUND = [
  { start: 5, end: 40 },
  { start: 200, end: 250 },
];


async function listFiles(dir: string): Promise<string[]> {
  const out: string[] = [];
  for (const entry of await readdir(dir, { withFileTypes: true, recursive: true })) if (entry.isFile()) out.push(join(entry.parentPath, entry.name));
  return out.sort();
}

const TOLERANCE_DIGITS = 2;

/** The driver as the scenario's lab would state it (simulate/driver-prior.ts), as typed in the form. */
function browserDriverPrior(s: SimScenario) {
  const prior = driverPriorOf(s.driver);
  return { driverTolerancePct: Number(prior.driverTolerancePct.toFixed(TOLERANCE_DIGITS)), blueShiftPct: Number(prior.blueShiftPct.toFixed(TOLERANCE_DIGITS)) };
}

/**
 * The true line the scientist pins: the first visible simulated line (by pixel) whose true order,
 * pinned on the engine's nearest peak, makes the engine's answer unique — asked of the engine
 * itself with the inputs the browser will send, so the test follows the engine rather than
 * guessing it. Also checks that without a pin the same inputs are ambiguous.
 */
function pinnableLine(frame: Frame, truth: SimTruth, s: SimScenario) {
  const options = {
    profile: s.profile,
    driverNm: 800,
    ...browserDriverPrior(s),
    parity: s.parity,
    signal: SIGNAL,
    background: BACKGROUND,
  };
  const free = calibrateFrame(frame, options);
  if (free.status !== 'ambiguous') throw new Error(`the simulated frame should be ambiguous, the engine says ${free.status}: ${free.message}`);
  for (const line of truth.lines.filter((l) => l.visible).sort((a, b) => a.pixel - b.pixel)) {
    const peak = free.peaks.reduce((a, b) => (Math.abs(a.pixel - line.pixel) < Math.abs(b.pixel - line.pixel) ? a : b));
    const pinned = calibrateFrame(frame, { ...options, pins: [{ pixel: Number(peak.pixel.toFixed(2)), harmonic: line.harmonic }] });
    if (pinned.status === 'unique') return line;
  }
  throw new Error('no single true pin makes the engine decide this frame');
}

/** A JSON call from the signed-in page (cookie + CSRF), for checking that the server refuses. */
async function callApi(page: Page, method: string, url: string, body?: unknown): Promise<{ status: number; body: { error?: { code: string; message: string } } & Record<string, unknown> }> {
  return page.evaluate(
    async ({ method, url, body }) => {
      const session = await (await fetch('/api/session')).json();
      const res = await fetch(url, {
        method,
        headers: { 'Content-Type': 'application/json', 'X-CSRF-Token': session.csrfToken },
        body: body === undefined ? undefined : JSON.stringify(body),
      });
      const text = await res.text();
      return { status: res.status, body: text ? JSON.parse(text) : {} };
    },
    { method, url, body },
  );
}

/** Drags across the spatial axis from row `fromRow` to row `toRow` (inclusive) at column `col`, using the stage's view transform. */
async function dragRows(page: Page, col: number, fromRow: number, toRow: number) {
  const stage = page.getByTestId('frame-stage');
  // Konva's canvas, not the framed holder: its top-left is the stage origin.
  const box = await stage.locator('canvas').first().boundingBox();
  if (!box) throw new Error('the frame stage is not visible');
  const scale = Number(await stage.getAttribute('data-scale'));
  const ox = Number(await stage.getAttribute('data-offset-x'));
  const oy = Number(await stage.getAttribute('data-offset-y'));
  const at = (row: number) => ({ x: box.x + ox + col * scale, y: box.y + oy + row * scale });
  const a = at(fromRow);
  const b = at(toRow);
  await page.mouse.move(a.x, a.y);
  await page.mouse.down();
  await page.mouse.move((a.x + b.x) / 2, (a.y + b.y) / 2, { steps: 4 });
  await page.mouse.move(b.x, b.y, { steps: 4 });
  await page.mouse.up();
}

/** Uploads files with the form on the instrument's frames page, the time typed in. */
async function uploadFrames(page: Page, files: string[], takenAt: string) {
  const form = page.getByRole('form', { name: 'Upload frames' });
  await form.getByLabel('Frame files').setInputFiles(files);
  await form.getByLabel('Taken at').fill(takenAt);
  await form.getByLabel('Driver wavelength (nm)').fill('800');
  await form.getByLabel('Tags').fill('realignment, e2e');
  await form.getByRole('button', { name: /^Upload/ }).click();
}

/** On the workbench page: run, expect `ambiguous`, pin the peak nearest `pixel` to `harmonic`, expect `unique`. */
async function runAndPin(page: Page, prior: { driverTolerancePct: number; blueShiftPct: number }, pixel: number, harmonic: number, shotName?: string) {
  await page.getByLabel('Driver wavelength (nm)').fill('800');
  await page.getByLabel('Driver σ (%)').fill(String(prior.driverTolerancePct));
  await page.getByLabel('Blue shift allowed (%)').fill(String(prior.blueShiftPct));
  await page.getByRole('button', { name: 'Run the engine' }).click();
  const banner = page.getByTestId('ambiguous-banner');
  await banner.waitFor({ timeout: 30_000 });
  expect(await banner.textContent()).toContain('A pin on one peak');
  expect(await banner.textContent()).toContain('What would decide it');
  expect(await page.getByRole('button', { name: 'Save as draft' }).isDisabled()).toBe(true);
  expect(await page.getByTestId('hypothesis-row').count()).toBeGreaterThan(1);
  if (shotName) await screenshot(page, `${shotName}-ambiguous`);

  const rows = page.getByTestId('peak-row');
  const count = await rows.count();
  let nearest = 0;
  let best = Infinity;
  for (let i = 0; i < count; i++) {
    const p = Number.parseFloat((await rows.nth(i).locator('td').first().textContent()) ?? 'NaN');
    if (Math.abs(p - pixel) < best) {
      best = Math.abs(p - pixel);
      nearest = i;
    }
  }
  expect(best).toBeLessThan(1.5);
  const row = rows.nth(nearest);
  await row.getByRole('button', { name: 'Pin order…' }).click();
  await row.getByRole('spinbutton').fill(String(harmonic));
  await row.getByRole('button', { name: 'Pin', exact: true }).click();
  await page.getByText('The orders are decided (unique)').waitFor({ timeout: 30_000 });
  expect(await page.getByTestId('ambiguous-banner').count()).toBe(0);
  await expect.poll(() => row.textContent()).toContain(`pinned q=${harmonic}`);
}

/** Saves the unique run as a draft valid from `validFrom` and submits it; returns the version page's URL. */
async function saveAndSubmit(page: Page, validFrom: string, note: string): Promise<string> {
  const form = page.getByRole('form', { name: 'Save as draft' });
  await form.getByLabel('Valid from (realignment time)').fill(validFrom);
  await form.getByLabel('Note').fill(note);
  await form.getByRole('button', { name: 'Save as draft' }).click();
  const saved = page.getByTestId('saved-draft');
  await saved.waitFor();
  const href = (await saved.getByRole('link').getAttribute('href')) ?? '';
  await saved.getByRole('button', { name: 'Submit for review' }).click();
  await expect.poll(() => saved.textContent()).toContain('submitted for review');
  return href;
}

describe('recalibration workflow in the browser', () => {
  let server: E2eServer;
  let browser: LaunchedBrowser;
  let frameDir: string;
  let fileDir: string;
  let pool: ReturnType<typeof createPool>;
  let instrumentId = '';
  let scenario: SimScenario;
  const pinLines: ReturnType<typeof pinnableLine>[] = [];
  const truths: SimTruth[] = [];
  const files: string[] = [];
  let badFile = '';
  let frameIds: string[] = [];
  let version1Url = '';
  let version2Url = '';

  beforeAll(async () => {
    const databaseUrl = inject('databaseUrl');
    server = await startE2eServer(databaseUrl, 'workflow');
    ({ frameDir, fileDir } = server);
    pool = createPool(databaseUrl, 2);
    const db = createDb(pool);

    // A few high odd orders, driver tolerance wider than two orders: undecidable without an anchor
    // (the simulator's class for that case). Frame 2: the camera moved 6 px after a realignment.
    const generated = generateScenario('undecidable-wide-tolerance', 6, 0, { sizes: [[1024, 256]], spectralAxis: 'x', bitDepth: 16 });
    if (!generated) throw new Error('the simulator gave no scenario for seed 6');
    scenario = generated;
    const moved = { ...scenario, geometry: { ...scenario.geometry, detectorCenterPixel: scenario.geometry.detectorCenterPixel + 6 } };
    for (const [i, s] of [scenario, moved].entries()) {
      const { frame, truth } = simulateFrame(s, 2);
      truths.push(truth);
      pinLines.push(pinnableLine(frame, truth, scenario));
      const path = join(fileDir, `e2e-frame-${i + 1}.tif`);
      await writeFile(path, encodeTiff(frame, { bitsPerSample: 16 }));
      files.push(path);
    }
    // A JPEG saved with a .tif name: the engine sniffs the bytes, not the name.
    badFile = join(fileDir, 'not-really-a-frame.tif');
    await writeFile(badFile, Uint8Array.from([0xff, 0xd8, 0xff, 0xe0, 0x00, 0x10, 0x4a, 0x46, 0x49, 0x46, 0x00, 0x01, ...new Array(200).fill(0x20)]));

    const [owner, scientist, student, viewer] = [
      await createUser(db, OWNER),
      await createUser(db, SCIENTIST),
      await createUser(db, STUDENT),
      await createUser(db, VIEWER),
    ];
    const p = scenario.profile;
    const profile = {
      spectralAxis: p.spectralAxis,
      grooveDensityPerMm: p.grooveDensityPerMm,
      incidenceAngleDeg: p.incidenceAngleDeg,
      detectorDistanceMm: p.detectorDistanceMm,
      pixelPitchUm: p.pixelPitchUm,
      wavelengthIncreasesWithPixel: p.wavelengthIncreasesWithPixel,
      detectorCenterPixel: p.detectorCenterPixel,
      detectorAngleDeg: p.detectorAngleDeg,
      pixelCount: 1024,
    };
    const row = await insertInstrument(db, { name: INSTRUMENT, profile, pixelCount: 1024 });
    instrumentId = row.id;
    await insertMembership(db, { userId: owner.id, instrumentId, role: 'owner' });
    await insertMembership(db, { userId: scientist.id, instrumentId, role: 'scientist' });
    await insertMembership(db, { userId: student.id, instrumentId, role: 'student' });
    await insertMembership(db, { userId: viewer.id, instrumentId, role: 'viewer' });
    browser = await launchBrowser();
  });

  afterAll(async () => {
    await browser?.close();
    await pool?.end();
    await server?.close();
  });

  it('a scientist uploads frames, draws the regions, pins an order on an ambiguous run, saves and submits', async () => {
    const { page } = browser;
    const base = server.url;
    await signIn(page, base, SCIENTIST);
    await page.getByRole('link', { name: INSTRUMENT }).click();
    await page.getByRole('heading', { name: INSTRUMENT }).waitFor();
    await page.getByRole('link', { name: 'Frames', exact: true }).last().click();
    await page.getByRole('form', { name: 'Upload frames' }).waitFor();

    await uploadFrames(page, [files[0]], TAKEN_1);
    await page.getByText('1 frame stored.').waitFor();
    await uploadFrames(page, [files[1]], TAKEN_2);
    await expect.poll(() => page.getByTestId('frame-row').count()).toBe(2);
    expect(await page.getByTestId('frames-total').textContent()).toContain('2 frames');

    // Server-side sort: oldest first puts frame 1 on top.
    await page.getByRole('button', { name: /Taken/ }).click();
    await expect.poll(() => page.getByTestId('frame-row').first().textContent()).toContain('e2e-frame-1.tif');
    const listed = await callApi(page, 'GET', `/api/frames?instrumentId=${instrumentId}&sort=takenAt&order=asc`);
    frameIds = (listed.body.items as { id: string }[]).map((f) => f.id);
    expect(frameIds).toHaveLength(2);

    // Bulk edit: tag both frames at once, then filter by that tag and by date (server-side).
    await page.getByRole('checkbox', { name: 'Select every frame on this page' }).check();
    const bulk = page.getByRole('form', { name: 'Bulk edit' });
    await bulk.getByLabel('Field').selectOption('tags');
    await bulk.getByLabel('New value').fill('beamtime-42, realignment');
    await bulk.getByRole('button', { name: 'Apply to 2' }).click();
    await page.getByText('2 frames updated.').waitFor();
    await expect.poll(() => page.getByTestId('frame-row').first().textContent()).toContain('beamtime-42');
    await bulk.getByRole('button', { name: 'Clear selection' }).click();
    const filters = page.getByRole('search', { name: 'Frame filters' });
    await filters.getByLabel('Tag').fill('beamtime-42');
    await expect.poll(() => page.getByTestId('frames-total').textContent()).toContain('2 frames');
    await filters.getByLabel('Taken from').fill(TAKEN_2.slice(0, 10));
    await expect.poll(() => page.getByTestId('frames-total').textContent()).toContain('1 frame ');
    expect(await page.getByTestId('frame-row').first().textContent()).toContain('e2e-frame-2.tif');
    await filters.getByLabel('Taken from').fill('');
    await filters.getByLabel('Tag').fill('');
    await expect.poll(() => page.getByTestId('frame-row').count()).toBe(2);

    // The viewer: draw the signal band and two background bands across the spatial axis.
    await page.getByRole('link', { name: 'e2e-frame-1.tif' }).click();
    await page.getByTestId('frame-stage').waitFor();
    // Wheel zoom about the pointer, then "Fit" restores the whole frame.
    const fitScale = Number(await page.getByTestId('frame-stage').getAttribute('data-scale'));
    const stageBox = await page.getByTestId('frame-stage').boundingBox();
    if (!stageBox) throw new Error('no stage');
    await page.mouse.move(stageBox.x + stageBox.width / 2, stageBox.y + stageBox.height / 2);
    await page.mouse.wheel(0, -400);
    await expect.poll(async () => Number(await page.getByTestId('frame-stage').getAttribute('data-scale'))).toBeGreaterThan(fitScale * 1.5);
    await page.getByRole('button', { name: 'Fit' }).click();
    await expect.poll(async () => Number(await page.getByTestId('frame-stage').getAttribute('data-scale'))).toBeCloseTo(fitScale, 6);
    await page.getByTestId('lineout-plot').locator('canvas').first().waitFor();
    await page.getByRole('button', { name: 'Draw signal band' }).click();
    await dragRows(page, 400, SIGNAL.start, SIGNAL.end - 1);
    await expect.poll(() => page.getByTestId('signal-band').textContent()).toContain(`${SIGNAL.start}–${SIGNAL.end}`);
    // Replace the automatic background bands with the drawn ones.
    while ((await page.getByTestId('background-band').count()) > 0) await page.getByTestId('background-band').first().getByRole('button', { name: 'Remove' }).click();
    for (const band of BACKGROUND) {
      await page.getByRole('button', { name: 'Add background band' }).click();
      await dragRows(page, 700, band.start, band.end - 1);
    }
    await expect.poll(() => page.getByTestId('background-band').allTextContents()).toEqual(BACKGROUND.map((b, i) => `background ${i + 1}${b.start}–${b.end}Remove`));

    // Line shape: drag the guide's lower end 10 px along the spectral axis (upper end fixed).
    // Handles sit at ±h = ±(86 − 1)/2 rows from the band centre, so tilt = 10/(2h) and
    // curvature = 10/(2h²) (regions.ts lineShapeFromHandles); then set both back to 0 by typing.
    {
      const canvasBox = await page.getByTestId('frame-stage').locator('canvas').first().boundingBox();
      if (!canvasBox) throw new Error('no stage');
      const stageEl = page.getByTestId('frame-stage');
      const scale = Number(await stageEl.getAttribute('data-scale'));
      const ox = Number(await stageEl.getAttribute('data-offset-x'));
      const oy = Number(await stageEl.getAttribute('data-offset-y'));
      const h = (SIGNAL.end - SIGNAL.start - 1) / 2;
      const centre = (SIGNAL.start + SIGNAL.end - 1) / 2;
      const at = (col: number, row: number) => ({ x: canvasBox.x + ox + col * scale, y: canvasBox.y + oy + row * scale });
      const from = at(512, centre + h);
      const to = at(522, centre + h);
      await page.mouse.move(from.x, from.y);
      await page.mouse.down();
      await page.mouse.move(to.x, to.y, { steps: 5 });
      await page.mouse.up();
      // The browser rounds the pointer to whole screen pixels (~1.2 image px here), so the shift
      // comes back within 1 px of 10; for a fixed upper end, curvature = tilt / h exactly.
      await expect.poll(async () => Number(await page.getByLabel('Tilt (px per px)').inputValue())).toBeGreaterThan(0);
      const tilt = Number(await page.getByLabel('Tilt (px per px)').inputValue());
      expect(Math.abs(tilt * 2 * h - 10)).toBeLessThan(1);
      expect(Number(await page.getByLabel('Curvature (px per px²)').inputValue())).toBeCloseTo(tilt / h, 5);
      await page.getByLabel('Tilt (px per px)').fill('0');
      await page.getByLabel('Tilt (px per px)').press('Enter');
      await page.getByLabel('Curvature (px per px²)').fill('0');
      await page.getByLabel('Curvature (px per px²)').press('Enter');
      await expect.poll(() => page.getByLabel('Tilt (px per px)').inputValue()).toBe('0');
      expect(await page.getByLabel('Curvature (px per px²)').inputValue()).toBe('0');
    }

    // Hover readout: pixel and counts (no approved calibration yet, so no wavelength).
    const stage = page.getByTestId('frame-stage');
    const box = await stage.boundingBox();
    if (!box) throw new Error('no stage');
    await page.mouse.move(box.x + box.width / 2, box.y + box.height / 2);
    await expect.poll(() => page.getByTestId('hover-readout').textContent()).toContain('counts');
    expect(await page.getByTestId('hover-readout').textContent()).toContain('no approved calibration');
    await screenshot(page, 'frame-viewer');

    await page.getByRole('button', { name: 'Save regions with this frame' }).click();
    await page.getByText('Regions saved with the frame.').waitFor();
    await page.getByRole('button', { name: 'Save as instrument default' }).click();
    await page.getByText("Saved as the instrument's default regions.").waitFor();
    const saved = await callApi(page, 'GET', `/api/frames/${frameIds[0]}`);
    expect(saved.body.regions).toMatchObject({ signal: SIGNAL, background: BACKGROUND });

    // Workbench from frame 1: ambiguous until the strongest line is pinned to its true order.
    await page.getByRole('link', { name: 'Open in workbench' }).click();
    await page.getByRole('heading', { name: 'Recalibration workbench' }).waitFor();
    expect(await page.getByRole('complementary', { name: 'Safety caution' }).textContent()).toContain('Class 4 lasers');
    const line1 = pinLines[0];
    await runAndPin(page, browserDriverPrior(scenario), line1.pixel, line1.harmonic, 'workbench');
    await page.getByTestId('residuals-plot').locator('canvas').first().waitFor();
    await screenshot(page, 'workbench');
    version1Url = await saveAndSubmit(page, VALID_1, 'After the grating realignment of 30 November (invented).');
    expect(version1Url).toMatch(/^\/versions\/[0-9a-f-]{36}$/);
  });

  it('the owner approves the first version', async () => {
    const { page } = browser;
    const base = server.url;
    await signOut(page);
    await signIn(page, base, OWNER);
    await page.goto(`${base}${version1Url}`);
    await page.getByRole('heading', { name: /Version 1/ }).waitFor();
    expect(await page.getByTestId('version-state').first().textContent()).toBe('in review');
    await page.getByRole('button', { name: 'Approve' }).click();
    await expect.poll(() => page.getByTestId('version-state').first().textContent()).toBe('approved');
  });

  it('a second version from the moved camera, valid later, is approved and the first is superseded from then; a student cannot submit or approve', async () => {
    const { page } = browser;
    const base = server.url;
    await signOut(page);
    await signIn(page, base, SCIENTIST);
    await page.goto(`${base}/instruments/${instrumentId}/workbench?frames=${frameIds[1]}`);
    await page.getByRole('heading', { name: 'Recalibration workbench' }).waitFor();
    const line2 = pinLines[1];
    await runAndPin(page, browserDriverPrior(scenario), line2.pixel, line2.harmonic);
    version2Url = await saveAndSubmit(page, VALID_2, 'Camera moved on 1 December (invented).');
    const version2Id = version2Url.split('/').pop() ?? '';

    // The student: no review buttons, and the server refuses both submit and approve.
    await signOut(page);
    await signIn(page, base, STUDENT);
    await page.goto(`${base}${version2Url}`);
    await page.getByRole('heading', { name: /Version 2/ }).waitFor();
    await page.getByTestId('no-version-actions').waitFor();
    for (const name of ['Approve', 'Submit for review', 'Send back to draft', 'Withdraw']) expect(await page.getByRole('button', { name }).count()).toBe(0);
    expect((await callApi(page, 'POST', `/api/versions/${version2Id}/approve`, { comment: '' })).status).toBe(403);
    expect((await callApi(page, 'POST', `/api/versions/${version2Id}/submit`, { comment: '' })).status).toBe(403);
    await page.goto(`${base}/instruments/${instrumentId}/workbench?frames=${frameIds[1]}`);
    await page.getByText('Your role may look at the workbench but not run it.').waitFor();
    expect(await page.getByRole('button', { name: 'Run the engine' }).count()).toBe(0);

    // The owner approves version 2: version 1 is superseded from version 2's start.
    await signOut(page);
    await signIn(page, base, OWNER);
    await page.goto(`${base}${version2Url}`);
    await page.getByRole('button', { name: 'Approve' }).click();
    await expect.poll(() => page.getByTestId('version-state').first().textContent()).toBe('approved');

    await page.goto(`${base}/instruments/${instrumentId}`);
    const rows = page.getByTestId('version-row');
    await expect.poll(() => rows.count()).toBe(2);
    const v1 = rows.filter({ hasText: 'Version 1' });
    await expect.poll(() => v1.getByTestId('version-state').textContent()).toBe('superseded');
    const supersededText = await page.evaluate((iso) => `superseded ${new Date(iso).toLocaleString()}`, new Date(VALID_2).toISOString());
    expect(await v1.getByTestId('valid-until').textContent()).toBe(supersededText);
    const versions = await callApi(page, 'GET', `/api/instruments/${instrumentId}/versions`);
    const list = versions.body as unknown as { number: number; state: string; supersededAt: string | null; validUntil: string | null }[];
    const first = list.find((v) => v.number === 1);
    expect(first?.state).toBe('superseded');
    expect(Date.parse(first?.supersededAt ?? '')).toBe(Date.parse(new Date(VALID_2).toISOString()));
    expect(list.find((v) => v.number === 2)?.state).toBe('approved');
    await page.getByTestId('version-diff-plot').locator('canvas').first().waitFor();
    await page.getByTestId('drift-chart').locator('canvas').first().waitFor();
    await screenshot(page, 'versions-timeline');

    // With version 2 approved, frame 2's viewer reads wavelength and energy under the pointer.
    await page.goto(`${base}/frames/${frameIds[1]}`);
    await page.getByTestId('frame-stage').waitFor();
    const box = await page.getByTestId('frame-stage').boundingBox();
    if (!box) throw new Error('no stage');
    await expect
      .poll(async () => {
        await page.mouse.move(box.x + box.width / 2 + 3, box.y + box.height / 2);
        await page.mouse.move(box.x + box.width / 2, box.y + box.height / 2);
        return page.getByTestId('hover-readout').textContent();
      })
      .toMatch(/wavelength [\d.]+ ± [\d.]+ nm.*photon energy [\d.]+ eV/);
    await screenshot(page, 'frame-viewer-calibrated');
  });

  it('after one true pin, every peak of both approved versions carries its simulated (true) order', async () => {
    // Checked against the simulator's truth, not against the engine: a pin must not turn an
    // ambiguous comb into a confidently wrong labelling.
    const { page } = browser;
    for (const [i, url] of [version1Url, version2Url].entries()) {
      const version = await callApi(page, 'GET', `/api/${url.replace(/^\//, '')}`);
      const peaks = (version.body.result as { peaks: { pixel: number; harmonic: number | null }[] }).peaks;
      const shown = peaks.map((p) => ({ pixel: Math.round(p.pixel), harmonic: p.harmonic }));
      const truth = truths[i].lines
        .filter((l) => l.visible)
        .map((l) => ({ pixel: Math.round(l.pixel), harmonic: l.harmonic }))
        .sort((a, b) => a.pixel - b.pixel);
      expect(shown).toEqual(truth);
    }
  });

  it('a viewer can look but not change anything', async () => {
    const { page } = browser;
    const base = server.url;
    await signOut(page);
    await signIn(page, base, VIEWER);
    await page.goto(`${base}/frames?instrumentId=${instrumentId}`);
    await expect.poll(() => page.getByTestId('frame-row').count()).toBe(2);
    expect(await page.getByRole('form', { name: 'Upload frames' }).count()).toBe(0);
    expect(await page.getByRole('checkbox').count()).toBe(0);
    await page.goto(`${base}/frames/${frameIds[0]}`);
    await page.getByTestId('frame-stage').waitFor();
    expect(await page.getByRole('toolbar', { name: 'Region tools' }).count()).toBe(0);
    expect(await page.getByRole('button', { name: /Save regions|instrument default/ }).count()).toBe(0);
    expect(await page.getByRole('link', { name: 'Open in workbench' }).count()).toBe(0);
    await page.goto(`${base}${version2Url}`);
    await page.getByTestId('no-version-actions').waitFor();

    // The server refuses the same changes.
    expect((await callApi(page, 'PATCH', `/api/frames/${frameIds[0]}`, { regions: { signal: { start: 1, end: 2 }, background: [] } })).status).toBe(403);
    expect((await callApi(page, 'POST', '/api/frames/bulk-update', { ids: frameIds, set: { tags: ['viewer-was-here'] } })).status).toBe(403);
    expect((await callApi(page, 'PUT', `/api/instruments/${instrumentId}/regions`, { signal: { start: 1, end: 2 }, background: [] })).status).toBe(403);
    const version2Id = version2Url.split('/').pop() ?? '';
    expect((await callApi(page, 'POST', `/api/versions/${version2Id}/withdraw`, { comment: 'no' })).status).toBe(403);
    expect(
      (await callApi(page, 'POST', `/api/instruments/${instrumentId}/workbench/runs`, { frameIds: [frameIds[0]], driverNm: 800 })).status,
    ).toBe(403);
  });

  it("a bad upload shows the engine's message and stores nothing", async () => {
    const { page } = browser;
    const base = server.url;
    await signOut(page);
    await signIn(page, base, SCIENTIST);
    await page.goto(`${base}/frames?instrumentId=${instrumentId}`);
    await expect.poll(() => page.getByTestId('frame-row').count()).toBe(2);
    const before = await listFiles(frameDir);
    expect(before.length).toBe(2);

    // What the engine itself says about these bytes (the same decoder the server runs).
    let engineMessage = '';
    try {
      await decodeFrame(new Uint8Array(await readFile(badFile)));
    } catch (error) {
      engineMessage = (error as Error).message;
    }
    expect(engineMessage).toContain('JPEG');

    // All or nothing: a good frame beside the bad one is not kept either.
    const extra = join(fileDir, 'e2e-frame-3.tif');
    const { frame } = simulateFrame(scenario, 99);
    await writeFile(extra, encodeTiff(frame, { bitsPerSample: 16 }));
    await uploadFrames(page, [extra, badFile], TAKEN_2);
    const alert = page.getByRole('alert').filter({ hasText: 'nothing was stored' });
    await alert.waitFor();
    expect(await alert.textContent()).toContain(engineMessage);
    await screenshot(page, 'bad-upload');

    await page.reload();
    await expect.poll(() => page.getByTestId('frame-row').count()).toBe(2);
    expect(await page.getByTestId('frames-total').textContent()).toContain('2 frames');
    expect(await listFiles(frameDir)).toEqual(before);
  });
});
