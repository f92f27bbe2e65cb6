/**
 * Known lines in the workbench, in a real browser: the built client (dist/client) on the real
 * server, a fresh database. Build first: `npx vite build`.
 *
 * Story (lab, people and frame invented; the frame from our simulator): the laser's nameplate
 * says 800 nm but it really runs 0.8 % red of that, so the comb alone leaves the scale known only
 * to the driver tolerance. The scientist states the photon energy of one harmonic measured on
 * another spectrometer (E = q·hc/λ0_true, hc = 1239.841984 eV·nm, CODATA 2018) by clicking its
 * peak, and the page says exactly what anchored the scale; removing the line takes it back. A bad
 * energy typed into the form is refused beside the field.
 */
import { writeFile } from 'node:fs/promises';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import type { Page } from 'playwright-core';
import { signIn, startE2eServer, type E2eServer } from '../support/e2e-server.ts';
import { launchBrowser, screenshot, type LaunchedBrowser } from '../support/browser.ts';
import { createDb, createPool } from '../../server/db/client.ts';
import { createUser } from '../../server/modules/users/service.ts';
import { insertMembership } from '../../server/modules/members/queries.ts';
import { insertInstrument } from '../../server/modules/instruments/queries.ts';
import { HC_EV_NM } from '../../shared/engine/constants.ts';
import { calibrateFrame } from '../../shared/engine/calibrate.ts';
import { encodeTiff, generateScenarios, simulateFrame, type SimLine } from '../../shared/engine/simulate/index.ts';

const SCIENTIST = { email: 'e2e-lines-scientist@example.test', password: 'e2e-known-lines-password', name: 'Kim Linewidth (invented)' };
const INSTRUMENT = 'E2E flat-field XUV with a nameplate driver (invented)';

/** Row index of the peak nearest `pixel` in the peaks table. */
async function peakRowNear(page: Page, pixel: number): Promise<number> {
  const rows = page.getByTestId('peak-row');
  let nearest = -1;
  let best = Infinity;
  for (let i = 0; i < (await rows.count()); i++) {
    const p = Number.parseFloat((await rows.nth(i).locator('td').first().textContent()) ?? 'NaN');
    if (Math.abs(p - pixel) < best) {
      best = Math.abs(p - pixel);
      nearest = i;
    }
  }
  expect(best).toBeLessThan(1.5);
  return nearest;
}

describe('known lines in the workbench', () => {
  let server: E2eServer;
  let browser: LaunchedBrowser;
  let pool: ReturnType<typeof createPool>;
  let instrumentId = '';
  let framePath = '';
  let line: SimLine;
  let energyEv = 0;

  beforeAll(async () => {
    const databaseUrl = inject('databaseUrl');
    server = await startE2eServer(databaseUrl, 'known-lines');
    pool = createPool(databaseUrl, 2);
    const db = createDb(pool);
    const [base] = generateScenarios(1, 8, { classes: ['gi-odd-clean'], sizes: [[1024, 256]], spectralAxis: 'x', bitDepth: 16 });
    const scenario = { ...base!, driver: { ...base!.driver, effectiveNm: base!.driver.nominalNm * 1.008 } };
    const { frame, truth } = simulateFrame(scenario, 11);
    const comb = truth.lines.filter((l) => l.diffractionOrder === 1 && l.visible);
    line = comb[comb.length >> 1]!;
    energyEv = Number(((line.harmonic * HC_EV_NM) / truth.effectiveDriverNm).toFixed(4));
    // The engine, asked with the inputs the browser sends, must anchor on this line (the test follows the engine).
    const options = { profile: scenario.profile, driverNm: 800, driverTolerancePct: 1 };
    const anchored = calibrateFrame(frame, { ...options, knownLines: [{ pixel: Math.round(line.pixel), energyEv }] });
    if (anchored.calibration?.absoluteScale !== 'anchored') throw new Error(`the engine did not anchor on the true line: ${anchored.message}`);
    framePath = join(server.fileDir, 'nameplate-800nm.tif');
    await writeFile(framePath, encodeTiff(frame, { bitsPerSample: 16 }));

    const scientist = await createUser(db, SCIENTIST);
    const p = scenario.profile;
    const row = await insertInstrument(db, {
      name: INSTRUMENT,
      profile: {
        spectralAxis: p.spectralAxis,
        grooveDensityPerMm: p.grooveDensityPerMm,
        incidenceAngleDeg: p.incidenceAngleDeg,
        detectorDistanceMm: p.detectorDistanceMm,
        pixelPitchUm: p.pixelPitchUm,
        wavelengthIncreasesWithPixel: p.wavelengthIncreasesWithPixel,
        detectorCenterPixel: p.detectorCenterPixel,
        detectorAngleDeg: p.detectorAngleDeg,
        pixelCount: 1024,
      },
      pixelCount: 1024,
    });
    instrumentId = row.id;
    await insertMembership(db, { userId: scientist.id, instrumentId, role: 'scientist' });
    browser = await launchBrowser();
  });

  afterAll(async () => {
    await browser?.close();
    await pool?.end();
    await server?.close();
  });

  it('a scientist states the energy of one peak, sees what anchored the scale, and removes it again', async () => {
    const { page } = browser;
    await signIn(page, server.url, SCIENTIST);
    await page.goto(`${server.url}/frames?instrumentId=${instrumentId}`);
    const upload = page.getByRole('form', { name: 'Upload frames' });
    await upload.getByLabel('Frame files').setInputFiles([framePath]);
    await upload.getByLabel('Taken at').fill('2026-11-30T10:00');
    await upload.getByLabel('Driver wavelength (nm)').fill('800');
    await upload.getByRole('button', { name: /^Upload/ }).click();
    await page.getByText('1 frame stored.').waitFor();
    await page.getByRole('link', { name: 'nameplate-800nm.tif' }).click();
    await page.getByRole('link', { name: 'Open in workbench' }).click();
    await page.getByRole('heading', { name: 'Recalibration workbench' }).waitFor();

    await page.getByLabel('Driver σ (%)').fill('1');
    await page.getByRole('button', { name: 'Run the engine' }).click();
    const statement = page.getByTestId('scale-statement');
    await statement.waitFor({ timeout: 30_000 });
    expect(await statement.textContent()).toMatch(/^Scale not anchored: known only to the driver tolerance \(±[\d.]+ %, 1σ\)\. A known line, or a filter edge on a continuum, would pin it\.$/);

    // Click the peak: "Known energy…" on its row, type the energy measured elsewhere.
    const row = page.getByTestId('peak-row').nth(await peakRowNear(page, line.pixel));
    await row.getByRole('button', { name: 'Known energy…' }).click();
    await row.getByLabel(/^Photon energy \(eV\)/).fill(String(energyEv));
    await row.getByLabel(/^Label of the peak/).fill(`H${line.harmonic} measured`);
    await row.getByRole('button', { name: 'Use as known line' }).click();
    await expect
      .poll(() => statement.textContent(), { timeout: 30_000 })
      .toMatch(new RegExp(`^Scale anchored by 1 known line \\(H${line.harmonic} measured at px [\\d.]+\\): ±[\\d.e-]+ eV at the line, ±[\\d.e-]+ % of the scale \\(1σ\\); the driver tolerance alone would leave ±[\\d.]+ %\\.$`));
    await expect.poll(() => row.textContent()).toContain(`known ${energyEv} eV`);
    const list = page.getByRole('list', { name: 'Known lines' });
    expect(await list.textContent()).toContain(`H${line.harmonic} measured: px `);
    await screenshot(page, 'workbench-known-line');

    // A bad energy typed into the form stays out, with the reason beside the field.
    await page.getByLabel('Line pixel').fill('300');
    await page.getByLabel('Line energy (eV)').fill('-5');
    await page.getByRole('button', { name: 'Add known line' }).click();
    await page.getByText('known line energyEv must be positive').waitFor();
    expect(await list.getByRole('listitem').count()).toBe(1);

    // Remove it and run again: back to the driver tolerance.
    await list.getByRole('button', { name: /^Remove the known line at pixel/ }).click();
    expect(await list.textContent()).toContain('none');
    await page.getByRole('button', { name: 'Run the engine' }).click();
    await expect.poll(() => statement.textContent(), { timeout: 30_000 }).toMatch(/^Scale not anchored/);
  });
});
