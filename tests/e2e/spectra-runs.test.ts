/**
 * Spectra, runs, stale spectra, drift and notices in a real browser (issue 5): the built client
 * (dist/client) on the real server with its in-process apply workers (pg-boss), a fresh database,
 * a temporary frame folder and the mail sink. Build first: `npx vite build`.
 *
 * Story (lab, people and frames invented; frames from the project's simulator with the demo
 * lab's XUV flat-field spectrometer of server/scripts/demo/story.ts, cut to 2048 × 256 px):
 * a scientist calibrates version 1 from a neon frame and the owner approves it (through the
 * routes). A student uploads a daily frame in the browser, gets its labelled spectrum from
 * version 1, switches to photon energy and exports CSV and JSON (numbers equal the API's). A
 * frame older than every version gets the no_calibration message (and fails in a run, with its
 * reason, until retried). The student runs the 24-frame
 * two-colour delay scan from the frames table and sees the progress bar, the scan map, the yield
 * curves and the modulation fit. After the camera mount moves, version 2 is approved: version
 * 1's spectra are marked stale and one action re-applies them; a frame taken after version 2's
 * start uses version 2, the older one keeps version 1. Frames with the camera moved two more
 * pixels raise the drift flag and one notice; the notices arrive in the Outbox.
 */
import { readFile, rm, writeFile } from 'node:fs/promises';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import type { Page } from 'playwright-core';
import { signIn, signOut, startE2eServer, type E2eServer } from '../support/e2e-server.ts';
import { createDb, createPool } from '../../server/db/client.ts';
import { createUser } from '../../server/modules/users/service.ts';
import { insertMembership } from '../../server/modules/members/queries.ts';
import { insertInstrument } from '../../server/modules/instruments/queries.ts';
import { createToken } from '../../server/modules/tokens/service.ts';
import { demoStories, type DemoFrame } from '../../server/scripts/demo/story.ts';
import { encodeTiff, simulateFrame } from '../../shared/engine/simulate/index.ts';
import { paths } from '../../shared/api/paths.ts';
import { SPECTRUM_CSV_COLUMNS } from '../../shared/api/spectrum-csv.ts';
import type { SpectrumResponse } from '../../shared/api/spectra.ts';
import type { Run, ScanResponse } from '../../shared/api/runs.ts';
import { launchBrowser, screenshot, type LaunchedBrowser } from '../support/browser.ts';

const pw = 'e2e-spectra-password';
const ADMIN = { email: 'e2e-spec-admin@example.test', password: pw, name: 'Ada Admin (invented)', isAdmin: true };
const OWNER = { email: 'e2e-spec-owner@example.test', password: pw, name: 'Oskar Owner (invented)' };
const SCIENTIST = { email: 'e2e-spec-scientist@example.test', password: pw, name: 'Signe Scientist (invented)' };
const STUDENT = { email: 'e2e-spec-student@example.test', password: pw, name: 'Stina Student (invented)' };

/** Rows kept of the demo camera's 512: 256, with the beam centred in them (speed; the spectrum axis is untouched). */
const HEIGHT_PX = 256;
const BEAM_ROW = 124;

const story = demoStories()[0]!;
const INSTRUMENT = `${story.instrumentName}, Lindqvist Attosecond Lab (invented)`;
const byName = (name: string): DemoFrame => {
  const f = story.frames.find((x) => x.name === name);
  if (!f) throw new Error(`no demo frame ${name}`);
  return f;
};

/** TIFF bytes of a demo frame at 256 rows; `shiftPx` moves the detector further; `noJitter` removes shot-to-shot order jitter. */
function tiffOf(frame: DemoFrame, options: { shiftPx?: number; noJitter?: boolean } = {}): Uint8Array {
  const s = frame.scenario;
  const scenario = {
    ...s,
    height: HEIGHT_PX,
    spatialCentrePx: BEAM_ROW,
    geometry: { ...s.geometry, detectorCenterPixel: s.geometry.detectorCenterPixel + (options.shiftPx ?? 0) },
    envelope: options.noJitter ? { ...s.envelope, jitterRelative: 0 } : s.envelope,
  };
  return encodeTiff(simulateFrame(scenario, frame.seed).frame, { bitsPerSample: 16 });
}


/** The signed-in page's own GET (same cookie the client uses). */
async function pageGet<T>(page: Page, url: string): Promise<T> {
  return page.evaluate(async (u) => {
    const res = await fetch(u, { headers: { Accept: 'application/json' } });
    if (!res.ok) throw new Error(`${u}: ${res.status} ${await res.text()}`);
    return res.json();
  }, url) as Promise<T>;
}

/** Parses the spectrum CSV (header + one row per pixel, empty cell = not finite). */
function parseCsv(text: string): { header: string[]; rows: number[][] } {
  const lines = text.split('\r\n').filter((l) => l.length > 0);
  return { header: lines[0]!.split(','), rows: lines.slice(1).map((l) => l.split(',').map((c) => (c === '' ? Number.NaN : Number(c)))) };
}

describe('spectra, runs, drift and notices in the browser', () => {
  let server: E2eServer;
  let browser: LaunchedBrowser;
  let frameDir: string;
  let fileDir: string;
  let pool: ReturnType<typeof createPool>;
  let base = '';
  let instrumentId = '';
  const tokens: Record<'admin' | 'owner' | 'scientist' | 'student', string> = { admin: '', owner: '', scientist: '', student: '' };
  let dailyFrameId = '';
  let version1Id = '';
  const scanFrameIds: string[] = [];

  /** A JSON call with a bearer token (no CSRF needed for tokens). */
  async function api<T>(who: keyof typeof tokens, method: string, url: string, body?: unknown): Promise<{ status: number; body: T }> {
    const res = await fetch(`${base}${url}`, {
      method,
      headers: { Authorization: `Bearer ${tokens[who]}`, Accept: 'application/json', ...(body === undefined ? {} : { 'Content-Type': 'application/json' }) },
      body: body === undefined ? undefined : JSON.stringify(body),
    });
    const text = await res.text();
    return { status: res.status, body: (text ? JSON.parse(text) : undefined) as T };
  }

  /** Uploads one frame through the route with its demo metadata (taken-at from the story unless given). */
  async function upload(who: keyof typeof tokens, frame: DemoFrame, bytes: Uint8Array, extra: { takenAt?: string; name?: string } = {}): Promise<string> {
    const form = new FormData();
    form.append('file', new Blob([bytes as BlobPart]), `${extra.name ?? frame.name}.tif`);
    const m = frame.meta;
    form.append('takenAt', extra.takenAt ?? m.takenAt);
    form.append('kind', m.kind);
    form.append('driverNm', String(m.driverNm));
    form.append('parity', m.parity);
    form.append('filters', m.filters.join(','));
    form.append('target', m.target);
    form.append('tags', m.tags.join(','));
    if (m.scanVariable) form.append('scanVariable', m.scanVariable);
    if (m.scanValue !== undefined) form.append('scanValue', String(m.scanValue));
    const res = await fetch(`${base}${paths.instrumentFrames(instrumentId)}`, { method: 'POST', headers: { Authorization: `Bearer ${tokens[who]}` }, body: form });
    const body = (await res.json()) as { id: string; error?: { message: string } };
    if (res.status !== 201) throw new Error(`upload of ${frame.name}: ${res.status} ${body.error?.message}`);
    return body.id;
  }

  /** Scientist: workbench run on the frame (must be unique), draft, submit; owner: approve. Returns the version id. */
  async function approveVersion(frameId: string, frame: DemoFrame, validFrom: string, note: string): Promise<string> {
    const run = await api<{ id: string; result: { status: string; message: string } }>('scientist', 'POST', paths.workbenchRuns(instrumentId), {
      frameIds: [frameId],
      driverNm: frame.meta.driverNm,
      driverTolerancePct: 0.5,
      parity: frame.meta.parity,
      filters: frame.meta.filters,
      pins: [],
      model: 'auto',
    });
    expect(run.status, JSON.stringify(run.body)).toBe(201);
    expect(run.body.result.status, run.body.result.message).toBe('unique');
    const draft = await api<{ id: string }>('scientist', 'POST', paths.instrumentVersions(instrumentId), { runId: run.body.id, validFrom, note });
    expect(draft.status, JSON.stringify(draft.body)).toBe(201);
    expect((await api('scientist', 'POST', paths.versionSubmit(draft.body.id))).status).toBe(200);
    const approved = await api<{ state: string }>('owner', 'POST', paths.versionApprove(draft.body.id));
    expect(approved.status, JSON.stringify(approved.body)).toBe(200);
    expect(approved.body.state).toBe('approved');
    return draft.body.id;
  }

  /** Waits for a run to leave queued/running (the server's workers do the work). */
  async function waitForRun(runId: string, timeoutMs = 90_000): Promise<Run> {
    const end = Date.now() + timeoutMs;
    for (;;) {
      const { body } = await api<Run>('student', 'GET', paths.run(runId));
      if (body.state !== 'queued' && body.state !== 'running') return body;
      if (Date.now() > end) throw new Error(`run ${runId} still ${body.state} after ${timeoutMs} ms (${body.done}/${body.total})`);
      await new Promise((r) => setTimeout(r, 300));
    }
  }

  beforeAll(async () => {
    const databaseUrl = inject('databaseUrl');
    server = await startE2eServer(databaseUrl, 'spectra', { workersInProcess: true, workerConcurrency: 2 });
    ({ frameDir, fileDir } = server);
    base = server.url;
    pool = createPool(databaseUrl, 2);
    const db = createDb(pool);
    const admin = await createUser(db, ADMIN);
    const owner = await createUser(db, OWNER);
    const scientist = await createUser(db, SCIENTIST);
    const student = await createUser(db, STUDENT);
    const first = story.frames[0]!.scenario.profile;
    const profile = {
      spectralAxis: first.spectralAxis,
      grooveDensityPerMm: first.grooveDensityPerMm,
      incidenceAngleDeg: first.incidenceAngleDeg,
      detectorDistanceMm: first.detectorDistanceMm,
      pixelPitchUm: first.pixelPitchUm,
      wavelengthIncreasesWithPixel: first.wavelengthIncreasesWithPixel,
      detectorCenterPixel: first.detectorCenterPixel,
      detectorAngleDeg: first.detectorAngleDeg,
      pixelCount: 2048,
    };
    const row = await insertInstrument(db, { name: INSTRUMENT, profile, pixelCount: 2048 });
    instrumentId = row.id;
    await insertMembership(db, { userId: owner.id, instrumentId, role: 'owner' });
    await insertMembership(db, { userId: scientist.id, instrumentId, role: 'scientist' });
    await insertMembership(db, { userId: student.id, instrumentId, role: 'student' });
    tokens.admin = (await createToken(db, admin.id, 'e2e')).token;
    tokens.owner = (await createToken(db, owner.id, 'e2e')).token;
    tokens.scientist = (await createToken(db, scientist.id, 'e2e')).token;
    tokens.student = (await createToken(db, student.id, 'e2e')).token;

    // Version 1 from the calibration frame after the vent (the demo's "v3" geometry).
    const cal = byName('cal-2026-11-02');
    const calId = await upload('scientist', cal, tiffOf(cal));
    version1Id = await approveVersion(calId, cal, '2026-11-02T08:00:00.000Z', 'Realigned after the vent (invented e2e).');
    browser = await launchBrowser();
    browser.page.on('pageerror', (e) => console.error('page error:', e.message));
  });

  afterAll(async () => {
    await browser?.close();
    await pool?.end();
    await server?.close();
    for (const dir of [frameDir, fileDir]) if (dir) await rm(dir, { recursive: true, force: true });
  });

  it('a student uploads a frame and gets a labelled spectrum from the approved version, on wavelength and photon energy, and exports CSV and JSON', async () => {
    const { page } = browser;
    const daily = byName('daily-2026-11-10');
    const file = join(fileDir, 'daily-2026-11-10.tif');
    await writeFile(file, tiffOf(daily));
    await signIn(page, base, STUDENT);
    await page.goto(`${base}/frames?instrumentId=${instrumentId}`);
    const form = page.getByRole('form', { name: 'Upload frames' });
    await form.getByLabel('Frame files').setInputFiles([file]);
    await form.getByLabel('Taken at').fill('2026-11-10T15:20');
    await form.getByLabel('Driver wavelength (nm)').fill('800');
    await form.getByLabel('Filters').fill('Al');
    await form.getByRole('button', { name: /^Upload/ }).click();
    await page.getByText('1 frame stored.').waitFor();
    await page.getByRole('link', { name: 'daily-2026-11-10.tif' }).click();
    await page.getByRole('link', { name: 'Spectrum', exact: true }).click();
    await page.waitForURL(/\/spectrum/);
    dailyFrameId = new URL(page.url()).pathname.split('/')[2]!;

    const chart = page.getByTestId('spectrum-chart');
    await chart.waitFor({ timeout: 60_000 });
    const used = page.getByTestId('calibration-used');
    expect(await used.getAttribute('data-version')).toBe('1');
    expect(await used.getAttribute('data-stale')).toBe('false');
    // The labels drawn are the API's detected orders, by name (H25, H27, … for this odd-harmonic frame).
    const apiSpectrum = await pageGet<SpectrumResponse>(page, paths.frameSpectrum(dailyFrameId));
    const detected = apiSpectrum.orders.filter((o) => o.detected).map((o) => (o.diffractionOrder === 1 ? `H${o.harmonic}` : `H${o.harmonic} (m=${o.diffractionOrder})`));
    expect(detected.length).toBeGreaterThanOrEqual(10);
    expect(await chart.getAttribute('data-labels')).toBe(detected.join(' '));
    expect(await page.getByTestId('order-row').count()).toBe(apiSpectrum.orders.length);
    // The simulated neon frame has odd harmonics only: every first-order label is odd (the demo's parity).
    expect(apiSpectrum.orders.filter((o) => o.detected && o.diffractionOrder === 1).every((o) => o.harmonic % 2 === 1)).toBe(true);
    await page.waitForTimeout(300);
    await screenshot(page, 'spectra-spectrum-wavelength');
    await page.getByTestId('orders-table').screenshot({ path: join('test-results', 'screenshots', 'spectra-orders-table.png') });

    // The URL is the stable link: "Copy link" puts exactly this page's address on the clipboard.
    await browser.context.grantPermissions(['clipboard-read', 'clipboard-write'], { origin: base });
    await page.getByRole('button', { name: 'Copy link' }).click();
    await page.getByText('Link copied.').waitFor();
    expect(await page.evaluate(() => navigator.clipboard.readText())).toBe(page.url());

    await page.getByRole('radio', { name: 'Photon energy (eV)' }).click();
    await expect.poll(() => chart.getAttribute('data-axis')).toBe('energy');
    expect(page.url()).toContain('axis=energy');
    expect(await chart.getByRole('img').getAttribute('aria-label')).toContain('photon energy (eV');
    await page.waitForTimeout(300);
    await screenshot(page, 'spectra-spectrum-energy');
    // A click, not check(): the box follows the URL, which the router updates in a transition.
    await page.getByLabel('Log intensity').click();
    await expect.poll(() => chart.getAttribute('data-log')).toBe('true');
    expect(page.url()).toContain('scale=log');
    await page.waitForTimeout(300);
    await screenshot(page, 'spectra-spectrum-energy-log');
    await page.getByLabel('Log intensity').click();
    await expect.poll(() => chart.getAttribute('data-log')).toBe('false');

    // CSV export: the file's numbers are the API's numbers, exactly (shortest round-trip form).
    const [csvDownload] = await Promise.all([page.waitForEvent('download'), page.getByRole('link', { name: 'Export CSV' }).click()]);
    const csv = parseCsv(await readFile((await csvDownload.path())!, 'utf8'));
    expect(csv.header).toEqual([...SPECTRUM_CSV_COLUMNS]);
    expect(csv.rows).toHaveLength(apiSpectrum.pixel.length);
    const columns: Array<keyof SpectrumResponse> = ['pixel', 'wavelengthNm', 'wavelengthSigmaNm', 'energyEv', 'intensity', 'intensitySigma', 'intensityPerEv', 'intensityPerEvSigma'];
    for (const [c, key] of columns.entries()) {
      const fromApi = apiSpectrum[key] as number[];
      for (let i = 0; i < fromApi.length; i++) {
        if (Number.isFinite(fromApi[i])) expect(csv.rows[i]![c]).toBe(fromApi[i]);
        else expect(csv.rows[i]![c]).toBeNaN();
      }
    }
    const [jsonDownload] = await Promise.all([page.waitForEvent('download'), page.getByRole('link', { name: 'Export JSON' }).click()]);
    const exported = JSON.parse(await readFile((await jsonDownload.path())!, 'utf8')) as SpectrumResponse;
    expect(exported.intensityPerEv).toEqual(apiSpectrum.intensityPerEv);
    expect(exported.orders).toEqual(apiSpectrum.orders);
    expect(exported.calibration).toEqual(apiSpectrum.calibration);

    // The filter-transmission correction: the exported JSON is the corrected one, and every order
    // carries the transmission it was divided by (Henke-based tables; a foil passes ≤ 1).
    await page.getByLabel('Correct for filter transmission').click();
    expect(page.url()).toContain('filters=corrected');
    const [correctedDownload] = await Promise.all([page.waitForEvent('download'), page.getByRole('link', { name: 'Export JSON' }).click()]);
    const corrected = JSON.parse(await readFile((await correctedDownload.path())!, 'utf8')) as SpectrumResponse;
    expect(corrected.orders.length).toBe(apiSpectrum.orders.length);
    let correctedOrders = 0;
    for (const [k, o] of corrected.orders.entries()) {
      const t = (o as { filterTransmission?: number }).filterTransmission;
      if (t === undefined || !Number.isFinite(t)) continue;
      correctedOrders++;
      expect(t).toBeLessThanOrEqual(1);
      expect(o.yield).toBeCloseTo(apiSpectrum.orders[k]!.yield / Math.max(t, 1e-3), 6);
    }
    expect(correctedOrders).toBeGreaterThanOrEqual(10);
    await page.getByLabel('Correct for filter transmission').click();

    // The printable report for the logbook, with this frame's spectrum and the version's numbers.
    await page.getByRole('link', { name: 'Calibration report' }).click();
    await page.getByTestId('calibration-report').waitFor();
    await page.getByRole('heading', { name: /version 1 \(approved\)/ }).waitFor();
    await page.getByTestId('orders-table').waitFor({ timeout: 30_000 });
    await page.emulateMedia({ media: 'print' });
    expect(await page.getByRole('button', { name: 'Print' }).isVisible()).toBe(false);
    await screenshot(page, 'spectra-report-print');
    await page.emulateMedia({ media: 'screen' });
  });

  it('a frame older than every approved version gets the no_calibration message, fails in a run with the reason, and is retried from the run page', async () => {
    const { page } = browser;
    const old = byName('cal-2026-10-05');
    const id = await upload('student', old, tiffOf(old));
    await page.goto(`${base}/frames/${id}/spectrum`);
    await page.getByText('No approved calibration covers this frame').waitFor({ timeout: 30_000 });
    expect(await page.getByTestId('spectrum-chart').count()).toBe(0);

    // In a run the same frame fails with the reason; the starter retries it from the run page (it fails again: still no version).
    const run = await api<Run>('student', 'POST', paths.instrumentRuns(instrumentId), { frameIds: [id] });
    expect(run.status, JSON.stringify(run.body)).toBe(201);
    await page.goto(`${base}/runs/${run.body.id}`);
    const item = page.getByTestId('run-item');
    await expect.poll(() => item.getAttribute('data-state'), { timeout: 60_000, interval: 300 }).toBe('failed');
    expect(await item.textContent()).toMatch(/calibration/i);
    await page.getByRole('button', { name: 'Retry 1 failed' }).click();
    await expect.poll(async () => (await waitForRun(run.body.id)).items[0]!.attempts, { timeout: 60_000 }).toBe(2);
    await expect.poll(() => item.locator('td').nth(3).textContent(), { timeout: 30_000 }).toBe('2');
    expect(await item.getAttribute('data-state')).toBe('failed');
  });

  it('a run of 24 frames finishes with a progress bar and shows the scan map, yield curves and modulation fit', async () => {
    const { page } = browser;
    // The delay scan without the simulator's shot-to-shot order jitter, so the fit's σ (from the yields' σ) is the whole scatter.
    for (const frame of story.frames.filter((f) => f.name.startsWith('delay-scan-'))) scanFrameIds.push(await upload('scientist', frame, tiffOf(frame, { noJitter: true })));
    expect(scanFrameIds).toHaveLength(24);
    await page.goto(`${base}/frames?instrumentId=${instrumentId}&tag=delay-scan`);
    await expect.poll(() => page.getByTestId('frame-row').count()).toBe(24);
    await page.getByRole('checkbox', { name: 'Select every frame on this page' }).check();
    await page.getByRole('button', { name: 'Make spectra of the 24 selected' }).click();
    await page.waitForURL(/\/runs\//);
    const runId = new URL(page.url()).pathname.split('/')[2]!;
    const progress = page.getByTestId('run-progress');
    await progress.waitFor();
    // Catch the bar part-way (the page polls the run every second while it is queued or running).
    await expect.poll(async () => Number(await progress.getAttribute('aria-valuenow')), { timeout: 60_000, interval: 100 }).toBeGreaterThan(0);
    const stateAtShot = await page.getByTestId('run-state').textContent();
    await screenshot(page, 'spectra-run-in-progress');
    expect(['running', 'done']).toContain(stateAtShot);

    await expect.poll(() => page.getByTestId('run-state').textContent(), { timeout: 100_000, interval: 500 }).toBe('done');
    expect(await page.getByTestId('run-progress').getAttribute('aria-valuenow')).toBe('24');
    expect(await page.getByTestId('run-counts').textContent()).toContain('24 of 24 done');
    await page.getByTestId('scan-map').waitFor({ timeout: 30_000 });
    await page.getByTestId('yield-curves').waitFor();
    await page.getByTestId('modulation-table').waitFor();
    // The scan's phase φ enters as cos(2φ): period π. The student types it; the fit is redone.
    await page.getByLabel('Modulation period').fill(String(Math.PI));
    const scan = await pageGet<ScanResponse>(page, paths.runScan(runId, Math.PI));
    expect(scan.values).toHaveLength(24);
    expect(scan.framesUsed).toBe(24);
    await expect.poll(() => page.getByText(`P = ${Math.PI.toPrecision(4)} (given)`).count()).toBe(1);
    expect(await page.getByTestId('modulation-row').count()).toBe(scan.modulation.length);
    // Against the simulator's truth (story.ts): odd order q carries weight 1 − 0.15·cos(2φ − 0.12(q − 30)), i.e.
    // b/a = 0.15 and phase π − 0.12(q − 30) in the fit's a + b·cos(2φ + phase) convention.
    const wrap = (a: number) => Math.atan2(Math.sin(a), Math.cos(a));
    const best = scan.modulation.filter((m) => m.fit && m.harmonic % 2 === 1).sort((a, b) => b.fit!.amplitude / b.fit!.amplitudeSigma - a.fit!.amplitude / a.fit!.amplitudeSigma)[0]!;
    const truthPhase = wrap(Math.PI - 0.12 * (best.harmonic - 30));
    expect(Math.abs(wrap(best.fit!.phaseRad - truthPhase))).toBeLessThan(4 * best.fit!.phaseSigmaRad + 0.05);
    expect(best.fit!.modulationDepth!).toBeGreaterThan(0.1);
    expect(best.fit!.modulationDepth!).toBeLessThan(0.2);
    await page.getByTestId('modulation-plot').waitFor();
    await page.waitForTimeout(400);
    await screenshot(page, 'spectra-scan-plots');
  });

  it('superseding a version marks its spectra stale, one action re-applies them, and each frame keeps the version valid at its time', async () => {
    const { page } = browser;
    // The camera mount is replaced (14 px along the dispersion): version 2 from the new calibration frame.
    const cal = byName('cal-2026-11-24');
    const calId = await upload('scientist', cal, tiffOf(cal));
    await approveVersion(calId, cal, '2026-11-24T09:00:00.000Z', 'Camera mount replaced (invented e2e).');
    await page.goto(`${base}/instruments/${instrumentId}`);
    await page.getByRole('link', { name: 'Spectra and drift' }).click();
    const stale = page.getByTestId('stale-spectra');
    await stale.waitFor({ timeout: 30_000 });
    // The daily frame and the 24 scan frames were made by version 1 before it was superseded.
    expect(await stale.getAttribute('data-count')).toBe('25');
    await screenshot(page, 'spectra-stale');
    await page.getByRole('button', { name: 'Re-apply 25 stale spectra' }).click();
    await page.waitForURL(/\/runs\//);
    await expect.poll(() => page.getByTestId('run-state').textContent(), { timeout: 100_000, interval: 500 }).toBe('done');
    expect(await page.getByTestId('run-counts').textContent()).toContain('25 of 25 done');
    await page.goto(`${base}/instruments/${instrumentId}/spectra`);
    await page.getByText('No stale spectra').waitFor({ timeout: 30_000 });

    // Older frame: still version 1 (valid at its time, now superseded), no longer stale.
    await page.goto(`${base}/frames/${dailyFrameId}/spectrum`);
    const used = page.getByTestId('calibration-used');
    await used.waitFor({ timeout: 30_000 });
    expect(await used.getAttribute('data-version')).toBe('1');
    expect(await used.textContent()).toContain('superseded');
    expect(await used.getAttribute('data-stale')).toBe('false');
    // A frame taken after version 2's start: version 2.
    const after = byName('daily-2026-11-25');
    const afterId = await upload('student', after, tiffOf(after));
    await page.goto(`${base}/frames/${afterId}/spectrum`);
    await page.getByTestId('spectrum-chart').waitFor({ timeout: 60_000 });
    expect(await page.getByTestId('calibration-used').getAttribute('data-version')).toBe('2');
    expect(await page.getByTestId('drift-summary').getAttribute('data-flagged')).toBe('false');
    // The version chooser: the older frame asked for version 1 by number (?version=1) gets the same version.
    // (Applying version 1 to the moved camera would be a 14 px drift, flagged: not done here.)
    await page.goto(`${base}/frames/${dailyFrameId}/spectrum`);
    await page.getByTestId('spectrum-chart').waitFor({ timeout: 30_000 });
    await page.getByLabel('Calibration').selectOption('1');
    await expect.poll(() => page.url()).toContain('version=1');
    expect(await page.getByTestId('calibration-used').getAttribute('data-version')).toBe('1');
    const v1 = await pageGet<{ state: string }>(page, paths.version(version1Id));
    expect(v1.state).toBe('superseded');
  });

  it('a scan of peak intensity, started from the instrument page, shows the cutoff against field strength with its power-law fit', async () => {
    const { page } = browser;
    // Six invented frames (no filter) whose cutoff follows the cutoff law E = Ip + 3.17·Up (Corkum, PRL 71, 1994
    // (1993)), with Up[eV] = 9.33·10⁻¹⁴·I[W/cm²]·λ²[µm²] (the usual ponderomotive energy; constant from memory) and Ip(Ne) = 21.56 eV
    // (NIST Atomic Spectra Database ionization energies), at the demo's effective driver 798.6 nm.
    const template = byName('daily-2026-11-16');
    const photonEv = 1239.84198 / 798.6;
    const intensities = [1.6e14, 2.0e14, 2.4e14, 2.8e14, 3.2e14, 3.6e14];
    for (const [k, intensity] of intensities.entries()) {
      const cutoffEv = 21.56 + 3.17 * 9.33e-14 * intensity * 0.7986 ** 2;
      const frame: DemoFrame = {
        ...template,
        name: `intensity-scan-${k + 1}`,
        seed: 7000 + k,
        scenario: { ...template.scenario, filters: [], envelope: { ...template.scenario.envelope, cutoffHarmonic: cutoffEv / photonEv, rollOffOrders: 1.5 } },
        meta: { ...template.meta, filters: [], scanVariable: 'peakIntensityWcm2', scanValue: intensity, tags: ['intensity-scan'] },
      };
      await upload('scientist', frame, tiffOf(frame, { noJitter: true }), { takenAt: `2026-11-20T10:0${k}:00.000Z` });
    }
    await page.goto(`${base}/instruments/${instrumentId}/spectra`);
    const form = page.getByRole('form', { name: 'Run a scan' });
    await form.getByLabel('Scan variable').fill('peakIntensityWcm2');
    await form.getByRole('button', { name: 'Run the scan' }).click();
    await page.waitForURL(/\/runs\//);
    const runId = new URL(page.url()).pathname.split('/')[2]!;
    await expect.poll(() => page.getByTestId('run-state').textContent(), { timeout: 100_000, interval: 500 }).toBe('done');
    expect(await page.getByTestId('run-counts').textContent()).toContain('6 of 6 done');
    const fitText = page.getByTestId('cutoff-fit');
    await fitText.waitFor({ timeout: 30_000 });
    // Intensity is not periodic: no sinusoidal modulation fit is offered for it.
    expect(await page.getByTestId('modulation-table').count()).toBe(0);
    const scan = await pageGet<ScanResponse>(page, paths.runScan(runId));
    expect(scan.cutoff.points.map((p) => p.x)).toEqual(intensities);
    // The detected cutoff rises with intensity; between the Ip-dominated (k → 0) and Up-dominated (k → 1) limits.
    const cutoffs = scan.cutoff.points.map((p) => p.cutoffEv);
    for (let i = 1; i < cutoffs.length; i++) expect(cutoffs[i]!).toBeGreaterThanOrEqual(cutoffs[i - 1]!);
    expect(scan.cutoff.fit!.exponent).toBeGreaterThan(0.4);
    expect(scan.cutoff.fit!.exponent).toBeLessThan(1);
    expect(await fitText.textContent()).toContain(`k = ${scan.cutoff.fit!.exponent.toFixed(3)}`);
    await page.waitForTimeout(400);
    await screenshot(page, 'spectra-cutoff-scan');
  });

  it('frames with the camera shifted by two pixels raise the drift flag and one notice, and the notices arrive in the Outbox', async () => {
    const { page } = browser;
    const after = byName('daily-2026-11-25');
    const ids: string[] = [];
    for (const [k, minute] of [0, 5, 10].entries()) {
      ids.push(await upload('student', { ...after, seed: after.seed + 10 + k }, tiffOf({ ...after, seed: after.seed + 10 + k }, { shiftPx: 2 }), { takenAt: `2026-11-26T10:${String(minute).padStart(2, '0')}:00.000Z`, name: `shifted-2px-${k + 1}` }));
    }
    const run = await api<Run>('student', 'POST', paths.instrumentRuns(instrumentId), { frameIds: ids });
    expect(run.status, JSON.stringify(run.body)).toBe(201);
    expect((await waitForRun(run.body.id)).done).toBe(3);

    await page.goto(`${base}/frames/${ids[0]}/spectrum`);
    const drift = page.getByTestId('drift-summary');
    await drift.waitFor({ timeout: 30_000 });
    expect(await drift.getAttribute('data-flagged')).toBe('true');
    expect(await drift.textContent()).toContain('drift flagged');
    const spectrum = await pageGet<SpectrumResponse>(page, paths.frameSpectrum(ids[0]!));
    // The simulated move is +2 px of detector centre; the measured shift is 2 px in size (sign by the axis direction).
    expect(Math.abs(Math.abs(spectrum.drift.shiftPx!) - 2)).toBeLessThan(0.3);

    await page.goto(`${base}/instruments/${instrumentId}/spectra`);
    const chart = page.getByTestId('drift-chart');
    await chart.waitFor({ timeout: 30_000 });
    expect(await chart.getAttribute('data-flagged')).toBe('3');
    await page.waitForTimeout(300);
    await screenshot(page, 'spectra-drift');
    // Students see the threshold but may not set it; the owner sets it on the same page.
    expect(await page.getByRole('form', { name: 'Drift threshold' }).count()).toBe(0);
    await signOut(page);
    await signIn(page, base, OWNER);
    await page.goto(`${base}/instruments/${instrumentId}/spectra`);
    const thresholdForm = page.getByRole('form', { name: 'Drift threshold' });
    await thresholdForm.getByLabel('Threshold (px)').fill('-1');
    await thresholdForm.getByRole('button', { name: 'Save threshold' }).click();
    await thresholdForm.getByText('driftThreshold.px must be ≥ 0').waitFor();
    await thresholdForm.getByLabel('Threshold (px)').fill('2.5');
    await thresholdForm.getByRole('button', { name: 'Save threshold' }).click();
    await page.getByText('Saved; new spectra are flagged with it.').waitFor();
    const instrument = await api<{ settings: { driftThreshold?: { sigma: number; px: number } } }>('owner', 'GET', paths.instrument(instrumentId));
    expect(instrument.body.settings.driftThreshold).toEqual({ sigma: 3, px: 2.5 });
    await signOut(page);

    // Outbox (site admins): one drift notice for the episode, and the other notices of the story.
    await signIn(page, base, ADMIN);
    await page.goto(`${base}/outbox`);
    await page.getByText(/^Drift on /).first().waitFor({ timeout: 30_000 });
    expect(await page.getByText(/^Drift on /).count()).toBe(1);
    await page.getByText(/^Review requested: calibration/).first().waitFor();
    await page.getByText(/superseded: your spectra are marked stale/).first().waitFor();
    await page.getByText(/^Run on .* done: 24 of 24 frames done/).first().waitFor();
    await screenshot(page, 'spectra-outbox');
  });
});
