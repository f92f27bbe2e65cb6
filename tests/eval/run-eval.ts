/**
 * `npm run eval`: the whole calibrate pipeline (encode → decode → reduce → peaks → assign → fit)
 * on simulated scenarios from our simulator, scored against the simulator's truth.
 *
 * Per class and in total: correct (unique and every labelled first-order peak right),
 * wrong-but-confident (unique with any wrong label: the silent failures), ambiguous, failed;
 * wavelength error of the map against the true map (RMS and max, nm and meV) and the share of
 * pixels whose truth lies within the stated 2σ band (unique results only); the centroid scatter
 * against the Cramér–Rao bound on clean lines; the median time per frame.
 *
 * Usage: npm run eval [-- --count N --seed S]
 */
import { parseArgs } from 'node:util';
import { decodeFrame } from '../../shared/engine/frames/index.ts';
import { calibrateFrame } from '../../shared/engine/calibrate.ts';
import { evaluateCalibration } from '../../shared/engine/dispersion/index.ts';
import { HC_EV_NM } from '../../shared/engine/constants.ts';
import { encodeFits, encodePng16, encodeTiff, generateScenarios, simulateFrame, type SimScenario, type SimTruth } from '../../shared/engine/simulate/index.ts';
import type { Frame } from '../../shared/engine/types.ts';
import type { CalibrateResult } from '../../shared/engine/calibrate.ts';
import { cramerRaoRows } from './cramer-rao.ts';
import { decidability } from './decidability.ts';

const { values } = parseArgs({ options: { count: { type: 'string', default: '312' }, seed: { type: 'string', default: '2026' } } });
const COUNT = Number(values.count);
const SEED = Number(values.seed);

type Outcome = 'correct' | 'wrong' | 'ambiguous' | 'failed';

interface Row {
  cls: string;
  /** The information check (decidability.ts) on the detected peaks: can the data decide? */
  decidable: boolean;
  /** The class's own claim. */
  classDecidable: boolean;
  /** Δ(−2 ln L) of the best slipped labelling over the truth on the detected peaks. */
  slipMargin: number;
  outcome: Outcome;
  format: string;
  ms: number;
  errorsNm: number[];
  errorsMeV: number[];
  inside: number;
  pixels: number;
  detail: string;
}

/** Writes the frame in one of the formats a lab would upload, rotating by scenario index. */
function encodeFor(frame: Frame, index: number): { bytes: Uint8Array; format: string } {
  const integer = frame.sampleFormat !== 'float';
  switch (index % 4) {
    case 1:
      return integer ? { bytes: encodePng16(frame), format: 'png16' } : { bytes: encodeFits(frame, -32), format: 'fits-32' };
    case 2:
      return { bytes: encodeFits(frame, integer ? 16 : -32), format: integer ? 'fits16' : 'fits-32' };
    case 3:
      return { bytes: encodeTiff(frame, { bitsPerSample: integer ? 16 : 32, sampleFormat: integer ? 'uint' : 'float', littleEndian: false }), format: 'tiff-be' };
    default:
      return { bytes: encodeTiff(frame, { bitsPerSample: integer ? 16 : 32, sampleFormat: integer ? 'uint' : 'float', littleEndian: true }), format: 'tiff-le' };
  }
}

/**
 * Correct = every peak the result labels matches a true line of that harmonic and order within 3 px.
 * Every true line counts, not only those the simulator expects to be "visible" (expected SNR ≥ 5):
 * a faint real line that was detected and labelled rightly is not a wrong answer.
 */
function judge(result: CalibrateResult, truth: SimTruth): { outcome: Outcome; detail: string } {
  if (result.status === 'failed') return { outcome: 'failed', detail: result.message };
  if (result.status === 'ambiguous') return { outcome: 'ambiguous', detail: result.message };
  const visible = truth.lines;
  let labelled = 0;
  for (const peak of result.peaks) {
    if (peak.harmonic === null) continue;
    labelled += 1;
    const nearest = visible.reduce<{ d: number; line: (typeof visible)[number] | null }>(
      (best, line) => {
        const d = Math.abs(line.pixel - peak.pixel);
        return d < best.d ? { d, line } : best;
      },
      { d: Infinity, line: null },
    );
    if (!nearest.line || nearest.d > 3) return { outcome: 'wrong', detail: `peak at ${peak.pixel.toFixed(1)} labelled q=${peak.harmonic} matches no true line` };
    if (nearest.line.harmonic !== peak.harmonic || nearest.line.diffractionOrder !== peak.diffractionOrder) {
      return { outcome: 'wrong', detail: `peak at ${peak.pixel.toFixed(1)}: said q=${peak.harmonic}/m=${peak.diffractionOrder}, truth q=${nearest.line.harmonic}/m=${nearest.line.diffractionOrder}` };
    }
  }
  if (labelled < 2) return { outcome: 'wrong', detail: 'unique with fewer than two labelled peaks' };
  return { outcome: 'correct', detail: result.message };
}

/** Map error against truth over the span of the labelled peaks (where a calibration is meant to hold). */
function mapErrors(result: CalibrateResult, truth: SimTruth) {
  const cal = result.calibration;
  const errorsNm: number[] = [];
  const errorsMeV: number[] = [];
  let inside = 0;
  if (!cal) return { errorsNm, errorsMeV, inside, pixels: 0 };
  const labelledPixels = cal.points.map((p) => p.pixel);
  const lo = Math.max(0, Math.floor(Math.min(...labelledPixels)));
  const hi = Math.min(cal.pixelCount - 1, Math.ceil(Math.max(...labelledPixels)));
  const pixels = Array.from({ length: hi - lo + 1 }, (_, i) => lo + i);
  const evaluated = evaluateCalibration(cal, pixels);
  pixels.forEach((p, i) => {
    const trueNm = truth.wavelengthNmAtPixel[p];
    const errNm = evaluated.wavelengthNm[i] - trueNm;
    errorsNm.push(errNm);
    errorsMeV.push(1000 * (HC_EV_NM / evaluated.wavelengthNm[i] - HC_EV_NM / trueNm));
    if (Math.abs(errNm) <= 2 * evaluated.wavelengthSigmaNm[i]) inside += 1;
  });
  return { errorsNm, errorsMeV, inside, pixels: pixels.length };
}

function assignInputOf(scenario: SimScenario, pixelCount: number) {
  return {
    profile: scenario.profile,
    pixelCount,
    driverNm: scenario.driver.nominalNm,
    driverTolerancePct: scenario.driver.tolerancePercent,
    parity: scenario.parity,
    filters: (scenario.filters ?? []).map((f) => ({ material: f.material, thicknessNm: f.thicknessNm })),
  };
}

async function runScenario(scenario: SimScenario, index: number): Promise<Row> {
  const { frame, truth } = simulateFrame(scenario, SEED * 7919 + index);
  const { bytes, format } = encodeFor(frame, index);
  const start = performance.now();
  const decoded = await decodeFrame(bytes);
  const result = calibrateFrame(decoded, {
    profile: scenario.profile,
    driverNm: scenario.driver.nominalNm,
    driverTolerancePct: scenario.driver.tolerancePercent,
    parity: scenario.parity,
    filters: (scenario.filters ?? []).map((f) => ({ material: f.material, thicknessNm: f.thicknessNm })),
  });
  const ms = performance.now() - start;
  const { outcome, detail } = judge(result, truth);
  const errors = outcome === 'correct' ? mapErrors(result, truth) : { errorsNm: [], errorsMeV: [], inside: 0, pixels: 0 };
  const peaks = result.peaks.map((p) => ({ pixel: p.pixel, pixelSigma: p.pixelSigma, fwhmPx: p.fwhmPx, amplitude: p.area / Math.max(p.fwhmPx, 1e-9), area: p.area, areaSigma: p.area / Math.max(p.snr, 1e-9), snr: p.snr, spatialWidthPx: p.spatialWidthPx, saturated: false }));
  const info = peaks.length > 0 ? decidability(peaks, truth, assignInputOf(scenario, truth.wavelengthNmAtPixel.length)) : { decidable: false, marginOverSlip: Number.NaN };
  return { cls: scenario.class, decidable: info.decidable, classDecidable: scenario.decidable, slipMargin: info.marginOverSlip, outcome, format, ms, detail, ...errors };
}

function rms(values: number[]): number {
  return values.length ? Math.sqrt(values.reduce((s, v) => s + v * v, 0) / values.length) : Number.NaN;
}
function maxAbs(values: number[]): number {
  return values.reduce((m, v) => Math.max(m, Math.abs(v)), 0);
}
function median(values: number[]): number {
  const s = [...values].sort((a, b) => a - b);
  return s.length ? s[s.length >> 1] : Number.NaN;
}

function printTable(rows: Row[]) {
  const groups = new Map<string, Row[]>();
  for (const row of rows) groups.set(row.cls, [...(groups.get(row.cls) ?? []), row]);
  groups.set('TOTAL decidable (class)', rows.filter((r) => r.classDecidable));
  groups.set('TOTAL undecidable (class)', rows.filter((r) => !r.classDecidable));
  groups.set('TOTAL decidable', rows.filter((r) => r.decidable));
  groups.set('TOTAL undecidable', rows.filter((r) => !r.decidable));
  groups.set('TOTAL', rows);
  const header = ['class', 'n', 'flip*', 'correct', 'wrong!', 'ambig', 'failed', 'rms nm', 'max nm', 'rms meV', 'max meV', 'in 2σ', 'ms med'];
  const widths = [30, 4, 6, 8, 7, 6, 7, 9, 9, 9, 9, 7, 7];
  const line = (cells: string[]) => cells.map((c, i) => (i === 0 ? c.padEnd(widths[i]) : c.padStart(widths[i]))).join(' ');
  console.log(line(header));
  for (const [name, group] of groups) {
    const count = (o: Outcome) => String(group.filter((r) => r.outcome === o).length);
    const nm = group.flatMap((r) => r.errorsNm);
    const mev = group.flatMap((r) => r.errorsMeV);
    const pixels = group.reduce((s, r) => s + r.pixels, 0);
    const inside = group.reduce((s, r) => s + r.inside, 0);
    console.log(
      line([
        name,
        String(group.length),
        String(group.filter((r) => r.classDecidable !== r.decidable).length),
        count('correct'),
        count('wrong'),
        count('ambiguous'),
        count('failed'),
        rms(nm).toExponential(2),
        maxAbs(nm).toExponential(2),
        rms(mev).toFixed(1),
        maxAbs(mev).toFixed(1),
        pixels ? `${((100 * inside) / pixels).toFixed(1)}%` : '-',
        median(group.map((r) => r.ms)).toFixed(0),
      ]),
    );
  }
}

async function main() {
  const scenarios = generateScenarios(COUNT, SEED);
  console.log(`orderly eval: ${scenarios.length} simulated scenarios (seed ${SEED}), full pipeline through encoded files`);
  const rows: Row[] = [];
  for (let i = 0; i < scenarios.length; i += 1) {
    try {
      rows.push(await runScenario(scenarios[i], i));
    } catch (error) {
      rows.push({ cls: scenarios[i].class, decidable: scenarios[i].decidable, classDecidable: scenarios[i].decidable, slipMargin: Number.NaN, outcome: 'failed', format: '?', ms: 0, errorsNm: [], errorsMeV: [], inside: 0, pixels: 0, detail: `threw: ${(error as Error).message}` });
    }
  }
  printTable(rows);
  console.log('flip* = scenarios whose class claim (decidable or not) the information check (decidability.ts) contradicts: in a');
  console.log('"decidable" class a slip of the labelling fits the detected peaks within the realignment ranges and driver tolerance');
  console.log('to less than the unique margin, or in an "undecidable" class every slip misses by more. The TOTAL decidable /');
  console.log('undecidable rows and the verdicts use the check; "TOTAL decidable (class)" keeps the class claim.');
  const decidable = rows.filter((r) => r.decidable);
  const undecidable = rows.filter((r) => !r.decidable);
  const wrong = rows.filter((r) => r.outcome === 'wrong');
  const correctPct = (100 * decidable.filter((r) => r.outcome === 'correct').length) / Math.max(1, decidable.length);
  const ambiguousPct = (100 * undecidable.filter((r) => r.outcome === 'ambiguous' || r.outcome === 'failed').length) / Math.max(1, undecidable.length);
  const pixels = rows.reduce((s, r) => s + r.pixels, 0);
  const insidePct = (100 * rows.reduce((s, r) => s + r.inside, 0)) / Math.max(1, pixels);
  const verdict = (ok: boolean) => (ok ? 'PASS' : 'FAIL');
  const classDecidable = rows.filter((r) => r.classDecidable);
  const classUndecidable = rows.filter((r) => !r.classDecidable);
  console.log(
    `\nBy the class claims alone: correct on decidable ${((100 * classDecidable.filter((r) => r.outcome === 'correct').length) / Math.max(1, classDecidable.length)).toFixed(1)} %, ` +
      `ambiguous/refused on undecidable ${((100 * classUndecidable.filter((r) => r.outcome === 'ambiguous' || r.outcome === 'failed').length) / Math.max(1, classUndecidable.length)).toFixed(1)} %.`,
  );
  console.log(`${verdict(correctPct >= 97)} correct on decidable: ${correctPct.toFixed(1)} % (target ≥ 97 %)`);
  console.log(`${verdict(wrong.length === 0)} wrong-but-confident: ${wrong.length} (target 0)`);
  console.log(`${verdict(ambiguousPct >= 95)} undecidable answered ambiguous (or refused): ${ambiguousPct.toFixed(1)} % (target ≥ 95 %)`);
  console.log(`${verdict(insidePct >= 90 && insidePct <= 98)} truth inside the 2σ band: ${insidePct.toFixed(1)} % of ${pixels} pixels (target 90-98 %)`);
  const crb = cramerRaoRows();
  console.log('\nCentroid scatter on clean lines against the Cramér–Rao bound (200 frames each):');
  console.log('photons  sigma px  scatter px   bound px  ratio');
  for (const r of crb) console.log(`${String(r.photons).padStart(7)}  ${r.sigmaPx.toFixed(1).padStart(8)}  ${r.scatterPx.toExponential(3).padStart(10)}  ${r.boundPx.toExponential(3).padStart(9)}  ${r.ratio.toFixed(3)}`);
  const worstRatio = Math.max(...crb.map((r) => r.ratio));
  console.log(`${verdict(worstRatio <= 1.5)} centroid scatter within 1.5× the Cramér–Rao bound: worst ratio ${worstRatio.toFixed(3)}`);
  for (const row of wrong) console.log(`  silent failure [${row.cls}, ${row.format}, slip margin ${row.slipMargin.toFixed(1)}]: ${row.detail}`);
  const missed = rows.filter((r) => r.decidable && r.outcome === 'ambiguous').slice(0, 10);
  for (const row of rows.filter((r) => !r.decidable && r.outcome === 'correct')) console.log(`  unique (right) on undecidable [${row.cls}, ${row.format}, slip margin ${row.slipMargin.toFixed(1)}]: ${row.detail}`);
  for (const row of missed) console.log(`  ambiguous on decidable [${row.cls}, ${row.format}, slip margin ${row.slipMargin.toFixed(1)}]: ${row.detail.slice(0, 200)}`);
  const failures = rows.filter((r) => r.outcome === 'failed' && r.decidable).slice(0, 10);
  for (const row of failures) console.log(`  failed [${row.cls}, ${row.format}]: ${row.detail}`);
}

await main();
