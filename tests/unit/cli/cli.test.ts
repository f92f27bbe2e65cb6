/**
 * The `orderly` command line as a script would run it: a real process, real files, the JSON
 * contract of the README ("Command line"). The frame comes from our simulator with known truth;
 * the wavelengths are checked against the grating equation the simulator used (λq = λ0/q).
 */
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { orderly } from '../../support/run-cli.ts';
import { driverPriorOf, encodeTiff, generateScenarios, simulateFrame } from '../../../shared/engine/simulate/index.ts';


describe('orderly command line', () => {
  let dir: string;
  let framePath: string;
  let profilePath: string;
  let driverNm: number;
  /** What the scenario's lab would say of its driver: 1σ and blue-shift allowance (simulate/driver-prior.ts). */
  let driverFlags: string[];
  let pixelCount: number;

  beforeAll(() => {
    dir = mkdtempSync(path.join(tmpdir(), 'orderly-cli-'));
    const [scenario] = generateScenarios(1, 2026, { classes: ['gi-odd-clean'], sizes: [[1024, 256]], spectralAxis: 'x', bitDepth: 16 });
    const { frame } = simulateFrame(scenario, 11);
    framePath = path.join(dir, 'frame.tif');
    writeFileSync(framePath, encodeTiff(frame, { bitsPerSample: 16, sampleFormat: 'uint' }));
    profilePath = path.join(dir, 'profile.json');
    writeFileSync(profilePath, JSON.stringify({ ...scenario.profile, detectorTiltDeg: 0, someVendorField: "ignored" }));
    driverNm = scenario.driver.nominalNm;
    const prior = driverPriorOf(scenario.driver);
    driverFlags = ['--driver-tolerance-pct', String(prior.driverTolerancePct), '--blue-shift-pct', String(prior.blueShiftPct)];
    pixelCount = 1024;
  });
  afterAll(() => rmSync(dir, { recursive: true, force: true }));

  it('calibrates a frame and prints the contract JSON, then applies it', async () => {
    const cal = await orderly(['calibrate', framePath, '--profile', profilePath, '--driver-nm', String(driverNm), ...driverFlags, '--json']);
    const result = JSON.parse(cal.stdout);
    expect(['unique', 'ambiguous', 'failed']).toContain(result.status);
    expect(typeof result.message).toBe('string');
    expect(Array.isArray(result.peaks)).toBe(true);
    expect(Array.isArray(result.hypotheses)).toBe(true);
    expect(result.status).toBe('unique');
    expect(cal.code).toBe(0);
    for (const peak of result.peaks) {
      expect(Object.keys(peak)).toEqual(expect.arrayContaining(['pixel', 'pixelSigma', 'harmonic', 'diffractionOrder', 'wavelengthNm', 'energyEv']));
      if (peak.harmonic !== null) {
        // λq = λ0/q within the driver tolerance (1 %): PRODUCT.md domain notes.
        expect(Math.abs((peak.wavelengthNm * peak.harmonic * peak.diffractionOrder) / driverNm - 1)).toBeLessThan(0.012);
        // E = hc/λ with hc = 1239.841984 eV nm (CODATA 2018).
        expect(peak.energyEv * peak.wavelengthNm).toBeCloseTo(1239.841984, 4);
      }
    }
    const calPath = path.join(dir, 'cal.json');
    writeFileSync(calPath, cal.stdout);
    const applied = await orderly(['apply', framePath, framePath, '--calibration', calPath, '--json']);
    expect(applied.code).toBe(0);
    const lines = applied.stdout.trim().split('\n').map((l) => JSON.parse(l));
    expect(lines).toHaveLength(2);
    for (const key of ['pixel', 'wavelengthNm', 'wavelengthSigmaNm', 'energyEv', 'intensity']) expect(lines[0][key]).toHaveLength(pixelCount);
    expect(lines[0].orders.length).toBeGreaterThan(2);
    expect(Object.keys(lines[0].orders[0])).toEqual(expect.arrayContaining(['harmonic', 'diffractionOrder', 'pixel', 'energyEv', 'yield']));
  }, 120_000);

  it('reports a failing frame in a batch and goes on with the rest', async () => {
    const bad = path.join(dir, 'bad.tif');
    writeFileSync(bad, 'this is not a frame');
    const cal = await orderly(['calibrate', framePath, '--profile', profilePath, '--driver-nm', String(driverNm), ...driverFlags, '--json']);
    const calPath = path.join(dir, 'cal2.json');
    writeFileSync(calPath, cal.stdout);
    const applied = await orderly(['apply', bad, framePath, '--calibration', calPath, '--json']);
    expect(applied.code).not.toBe(0);
    const lines = applied.stdout.trim().split('\n').map((l) => JSON.parse(l));
    expect(lines[0]).toMatchObject({ status: 'failed', frame: bad });
    expect(lines[0].message).toMatch(/not|unsupported|recognised|format/i);
    expect(lines[1].wavelengthNm).toHaveLength(pixelCount);
  }, 120_000);

  it('refuses bad input with a message and a non-zero exit', async () => {
    const missing = await orderly(['calibrate', path.join(dir, 'nope.tif'), '--profile', profilePath, '--driver-nm', '800', '--json']);
    expect(missing.code).not.toBe(0);
    expect(JSON.parse(missing.stdout)).toMatchObject({ status: 'failed' });
    expect(missing.stderr).toMatch(/cannot read frame/);

    const badProfile = path.join(dir, 'bad-profile.json');
    writeFileSync(badProfile, JSON.stringify({ name: 'x', spectralAxis: 'x', grooveDensityPerMm: -5, incidenceAngleDeg: 87, detectorDistanceMm: 235, pixelPitchUm: 13.5, wavelengthIncreasesWithPixel: false }));
    const profileRun = await orderly(['calibrate', framePath, '--profile', badProfile, '--driver-nm', '800', '--json']);
    expect(profileRun.code).not.toBe(0);
    expect(JSON.parse(profileRun.stdout).message).toMatch(/grooveDensityPerMm/);

    const usage = await orderly(['calibrate', framePath, '--driver-nm', '800']);
    expect(usage.code).toBe(2);
    expect(usage.stderr).toMatch(/--profile PROFILE.json is required/);
  }, 120_000);
});
