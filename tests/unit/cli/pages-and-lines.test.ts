/**
 * `--page` with a dark frame, and `--line PIXEL=ENERGY_EV`, as a script would run them: a real
 * process and real files. Frames come from our simulator (invented data, known truth); the TIFF
 * stacks from tests/support/tiff-stack.ts.
 *
 * The dark rule (README, "Command line"): a one-page dark is subtracted from every page; a dark
 * stack with as many pages as the frame is paired page by page; anything else is refused naming
 * the dark file and both page counts. Each dark page here holds a line-like stripe of its own
 * inside the signal band, so a dark page paired with the wrong frame page would leave a stripe
 * (a false peak) behind and change the output.
 */
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { orderly } from '../../support/run-cli.ts';
import { HC_EV_NM } from '../../../shared/engine/constants.ts';
import { encodeTiff, generateScenarios, simulateFrame, type SimTruth } from '../../../shared/engine/simulate/index.ts';
import type { Frame } from '../../../shared/engine/types.ts';
import { encodeTiffStack } from '../../support/tiff-stack.ts';


const PEDESTAL = 100;
const STRIPE_COUNTS = 3000;

function withData(frame: Frame, data: Float32Array): Frame {
  return { ...frame, data };
}

/** A Gaussian stripe (FWHM 4 px) at spectral column `column`, inside the signal rows only, on top of `base`. */
function addStripe(frame: Frame, base: number, column: number, signal: { start: number; end: number }): Float32Array {
  const out = new Float32Array(frame.data.length).fill(base);
  for (let row = signal.start; row < signal.end; row++) {
    for (let dx = -6; dx <= 6; dx++) {
      out[row * frame.width + column + dx] += Math.round(STRIPE_COUNTS * Math.exp(-4 * Math.LN2 * (dx / 4) ** 2));
    }
  }
  return out;
}

describe('orderly --page with a dark frame, and --line', () => {
  let dir: string;
  const file = (name: string) => path.join(dir, name);
  let profilePath: string;
  let driverNm: number;
  let truth: SimTruth;

  beforeAll(() => {
    dir = mkdtempSync(path.join(tmpdir(), 'orderly-cli-pages-'));
    const [scenario] = generateScenarios(1, 2026, { classes: ['gi-odd-clean'], sizes: [[1024, 256]], spectralAxis: 'x', bitDepth: 16 });
    const pages = [13, 12, 11].map((seed) => simulateFrame(scenario, seed));
    truth = pages[2].truth;
    driverNm = scenario.driver.nominalNm;
    profilePath = file('profile.json');
    writeFileSync(profilePath, JSON.stringify(scenario.profile));
    const first = truth.lines.filter((l) => l.diffractionOrder === 1).map((l) => l.pixel);
    // Stripes half-way between neighbouring harmonics, one per page.
    const gaps = [3, 6, 9].map((i) => Math.round((first[i] + first[i + 1]) / 2));
    const stripes = pages.map((p, k) => addStripe(p.frame, 0, gaps[k], truth.signal));
    const framePage = (k: number) => withData(pages[k].frame, pages[k].frame.data.map((v, i) => v + stripes[k][i]));
    const darkPage = (k: number) => withData(pages[k].frame, stripes[k].map((v) => v + PEDESTAL));
    const flat = withData(pages[0].frame, new Float32Array(pages[0].frame.data.length).fill(PEDESTAL));
    writeFileSync(file('plain-stack.tif'), encodeTiffStack(pages.map((p) => p.frame)));
    writeFileSync(file('plain-page2.tif'), encodeTiff(pages[2].frame, { bitsPerSample: 16, sampleFormat: 'uint' }));
    writeFileSync(file('striped-stack.tif'), encodeTiffStack([0, 1, 2].map(framePage)));
    writeFileSync(file('dark-stack.tif'), encodeTiffStack([0, 1, 2].map(darkPage)));
    writeFileSync(file('dark-two.tif'), encodeTiffStack([0, 1].map(darkPage)));
    writeFileSync(file('dark-one.tif'), encodeTiff(flat, { bitsPerSample: 16, sampleFormat: 'uint' }));
  });
  afterAll(() => rmSync(dir, { recursive: true, force: true }));

  const calibrate = (frame: string, ...extra: string[]) => orderly(['calibrate', file(frame), '--profile', profilePath, '--driver-nm', String(driverNm), '--json', ...extra]);

  it('a one-page dark applies to page 2 of a stack (it used to fail: "page 2 does not exist")', async () => {
    const stack = await calibrate('plain-stack.tif', '--page', '2', '--dark', file('dark-one.tif'));
    expect(stack.stderr).toBe('');
    expect(stack.code).toBe(0);
    const single = await calibrate('plain-page2.tif', '--dark', file('dark-one.tif'));
    expect(JSON.parse(stack.stdout).calibration.points.length).toBeGreaterThan(10);
    // The same page minus the same dark, whether read from the stack or from a file of its own.
    expect(JSON.parse(stack.stdout)).toEqual(JSON.parse(single.stdout));
  }, 120_000);

  it('a dark stack of the same length is paired page by page', async () => {
    const paired = await calibrate('striped-stack.tif', '--page', '2', '--dark', file('dark-stack.tif'));
    expect(paired.code).toBe(0);
    // Page 2 minus dark page 2 = the plain page minus the pedestal: exactly what the one-page dark gives.
    const reference = await calibrate('plain-page2.tif', '--dark', file('dark-one.tif'));
    expect(JSON.parse(paired.stdout)).toEqual(JSON.parse(reference.stdout));

    const cal = file('cal.json');
    writeFileSync(cal, reference.stdout);
    const applied = await orderly(['apply', file('striped-stack.tif'), '--page', '2', '--dark', file('dark-stack.tif'), '--calibration', cal, '--json']);
    const appliedReference = await orderly(['apply', file('plain-page2.tif'), '--dark', file('dark-one.tif'), '--calibration', cal, '--json']);
    expect(applied.code).toBe(0);
    expect(JSON.parse(applied.stdout)).toEqual(JSON.parse(appliedReference.stdout));
  }, 120_000);

  it('refuses a dark stack of another length, naming the dark file and both page counts', async () => {
    const refused = await calibrate('striped-stack.tif', '--page', '2', '--dark', file('dark-two.tif'));
    expect(refused.code).toBe(1);
    const message = `dark frame '${file('dark-two.tif')}' has 2 pages but frame '${file('striped-stack.tif')}' has 3: a dark is either one page (subtracted from every page) or a stack with one page per page of the frame`;
    expect(JSON.parse(refused.stdout)).toEqual({ status: 'failed', message });
    expect(refused.stderr).toContain(message);

    const cal = file('cal-two.json');
    writeFileSync(cal, (await calibrate('plain-page2.tif')).stdout);
    const applied = await orderly(['apply', file('striped-stack.tif'), '--page', '1', '--dark', file('dark-two.tif'), '--calibration', cal, '--json']);
    expect(applied.code).toBe(1);
    expect(JSON.parse(applied.stdout)).toMatchObject({ status: 'failed', frame: file('striped-stack.tif') });
    expect(JSON.parse(applied.stdout).message).toContain(`dark frame '${file('dark-two.tif')}' has 2 pages but the frame has 3`);
  }, 120_000);

  it('names the file whose page does not exist', async () => {
    const missing = await calibrate('plain-page2.tif', '--page', '2');
    expect(missing.code).toBe(1);
    expect(JSON.parse(missing.stdout).message).toBe(`frame '${file('plain-page2.tif')}': page 2 does not exist: the TIFF has 1 page (0-0)`);
    const usage = await calibrate('plain-page2.tif', '--page', '1.5');
    expect(usage.code).toBe(2);
    expect(usage.stderr).toContain("--page expects a page number counted from 0, got '1.5'");
  }, 120_000);

  it('--line PIXEL=ENERGY_EV@LABEL anchors the scale and the JSON says by what and by how much', async () => {
    const lines = truth.lines.filter((l) => l.diffractionOrder === 1 && l.visible);
    const line = lines[lines.length >> 1];
    // A harmonic measured elsewhere: E = q·hc/λ0 (hc = 1239.841984 eV nm, CODATA 2018).
    const energyEv = (line.harmonic * HC_EV_NM) / truth.effectiveDriverNm;
    const anchored = await calibrate('plain-page2.tif', '--line', `${Math.round(line.pixel)}=${energyEv}@H${line.harmonic}`);
    expect(anchored.code).toBe(0);
    const result = JSON.parse(anchored.stdout);
    const c = result.calibration;
    expect(c.absoluteScale).toBe('anchored');
    expect(c.anchors).toEqual([{ kind: 'known-line', label: `H${line.harmonic}`, pixel: expect.closeTo(line.pixel, 0), pixelSigma: expect.any(Number), energyEv, energySigmaEv: 0 }]);
    expect(c.scaleSigmaRelative).toBeLessThan(c.unanchoredScaleSigmaRelative / 100);
    expect(c.notes.find((n: string) => n.startsWith('Scale '))).toMatch(/^Scale anchored by 1 known line \(H\d+ at px [\d.]+\): ±[\d.e-]+ eV at the line/);
    // λ0 = q·hc/E within its stated 3σ (the comb and the line agree).
    expect(Math.abs(c.driverNm - truth.effectiveDriverNm)).toBeLessThan(3 * c.driverSigmaNm + 1e-9);

    const table = await orderly(['calibrate', file('plain-page2.tif'), '--profile', profilePath, '--driver-nm', String(driverNm), '--line', `${Math.round(line.pixel)}=${energyEv}`]);
    expect(table.code).toBe(0);
    expect(table.stdout).toMatch(/Scale anchored by 1 known line \(known line [\d.]+ eV at px/);

    const plain = JSON.parse((await calibrate('plain-page2.tif')).stdout).calibration;
    expect(plain.absoluteScale).toBe('driver-tolerance');
    expect(plain.anchors).toBeUndefined();
    expect(plain.unanchoredScaleSigmaRelative).toBe(plain.scaleSigmaRelative);
  }, 120_000);

  it.each([
    ['812', "--line expects PIXEL=ENERGY_EV (e.g. 812.4=72.7, or 812.4=72.7@Al-edge), got '812'"],
    ['812=72.7=3', "--line expects PIXEL=ENERGY_EV (e.g. 812.4=72.7, or 812.4=72.7@Al-edge), got '812=72.7=3'"],
    ['abc=72.7', "--line abc=72.7: PIXEL must be a number, got 'abc'"],
    ['812=-5', "--line 812=-5: ENERGY_EV must be a positive number of eV, got '-5'"],
    ['812=0', "--line 812=0: ENERGY_EV must be a positive number of eV, got '0'"],
    ['812=eV', "--line 812=eV: ENERGY_EV must be a positive number of eV, got 'eV'"],
    ['812=72.7@', '--line 812=72.7@: the label after @ is empty'],
    ['5000=72.7', '--line 5000=72.7: The known line at pixel 5000 (72.7 eV) is off the detector: its spectral pixels run from 0 to 1023.'],
  ])('refuses --line %s with exit code 2', async (value, message) => {
    const refused = await calibrate('plain-page2.tif', '--line', value);
    expect(refused.code).toBe(2);
    expect(refused.stderr).toContain(`orderly: ${message}`);
    expect(JSON.parse(refused.stdout)).toEqual({ status: 'failed', message });
  }, 120_000);

  it('refuses a line with no peak near it with exit code 2, naming the flag and the pixel', async () => {
    const first = truth.lines.filter((l) => l.diffractionOrder === 1).map((l) => l.pixel);
    const between = Math.round((first[4] + first[5]) / 2);
    const refused = await calibrate('plain-page2.tif', '--line', `${between}=50`);
    expect(refused.code).toBe(2);
    expect(JSON.parse(refused.stdout).message).toMatch(
      new RegExp(`^--line ${between}=50: No detected peak within [\\d.]+ px of the known line at pixel ${between} \\(50 eV\\): the nearest detected peak is at pixel [\\d.]+\\.$`),
    );
  }, 120_000);
});
