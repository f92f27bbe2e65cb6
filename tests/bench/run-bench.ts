/**
 * `npm run bench`: median time and memory per engine stage on a 2048 x 2048 and a 2048 x 512
 * 16-bit frame, in one process after warm-up, beside the numpy/scipy reference pipeline in
 * ../shared/bench/ run on the same files when Python with numpy and tifffile is available.
 *
 * The frames are the reference pipeline's own synthetic frame (odd harmonics of 800 nm on a
 * 1200 l/mm grazing-incidence grating) when Python can write it; otherwise our simulator renders
 * the same geometry and our encoder writes it. Both pipelines then read the same file.
 */
import { execFileSync } from 'node:child_process';
import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { loadavg } from 'node:os';
import path from 'node:path';
import { decodeFrame } from '../../shared/engine/frames/index.ts';
import { reduceFrame } from '../../shared/engine/reduce.ts';
import { findPeaks } from '../../shared/engine/peaks.ts';
import { calibrateFrame } from '../../shared/engine/calibrate.ts';
import { applyCalibration } from '../../shared/engine/apply.ts';
import { fitPolynomialMap } from '../../shared/engine/dispersion/polynomial-map.ts';
import type { InstrumentProfile } from '../../shared/engine/types.ts';
import { benchFrameFallback } from './bench-frame.ts';

const REPEAT = Number(process.env.BENCH_REPEAT ?? 11);
/**
 * Rounds, each ours then the reference's: the machine's speed drifts by tens of percent within
 * a minute (shared cores), so each ratio is taken within one round and the median over rounds
 * is quoted, with the rounds' spread beside it.
 */
const ROUNDS = Number(process.env.BENCH_ROUNDS ?? 5);
const OUT_DIR = path.resolve('.data/bench');
const REFERENCE = path.resolve('../shared/bench/reference_pipeline.py');
const PYTHON = existsSync('/usr/bin/python3') ? '/usr/bin/python3' : 'python3';

/** The reference frame's geometry (reference_pipeline.py make_frame), as our profile. */
function referenceProfile(width: number): InstrumentProfile {
  return {
    name: 'reference pipeline frame',
    spectralAxis: 'x',
    grooveDensityPerMm: 1200,
    incidenceAngleDeg: 87,
    detectorDistanceMm: 235,
    pixelPitchUm: 13.5,
    wavelengthIncreasesWithPixel: false,
    detectorCenterPixel: width / 2,
    detectorAngleDeg: 77,
  };
}

function pythonHasNumpy(): boolean {
  try {
    execFileSync(PYTHON, ['-c', 'import numpy, tifffile'], { stdio: 'ignore' });
    return existsSync(REFERENCE);
  } catch {
    return false;
  }
}

function median(values: number[]): number {
  const sorted = [...values].sort((a, b) => a - b);
  const mid = sorted.length >> 1;
  return sorted.length % 2 ? sorted[mid] : (sorted[mid - 1] + sorted[mid]) / 2;
}

function memoryMiB(): number {
  const m = process.memoryUsage();
  return (m.heapUsed + m.arrayBuffers) / 2 ** 20;
}

/**
 * Bytes of the numbers a result holds: typed arrays by their length, plain arrays at 8 bytes a
 * number (V8 stores them unboxed), objects walked, each once. Object headers are not counted.
 */
function resultBytes(value: unknown, seen = new Set<unknown>()): number {
  if (value === null || typeof value !== 'object' || seen.has(value)) return 0;
  seen.add(value);
  if (ArrayBuffer.isView(value)) return value.byteLength;
  let total = 0;
  for (const item of Object.values(value as Record<string, unknown>)) total += typeof item === 'number' ? 8 : resultBytes(item, seen);
  return total;
}

interface StageFigures {
  medianMs: number;
  /** Fastest run: on a shared machine the closest figure to the code's own cost. */
  bestMs: number;
  /** Median CPU time (user + system, all threads) of one run: less sensitive than wall time to other load on the machine. */
  cpuMs: number;
  /** Heap and array buffers allocated by one run before a full collection. */
  peakMiB: number;
  retainedMiB: number;
}

/** Warm-up: at least this many runs and this long, so the JIT has optimised the stage's loops. */
const WARM_UP_RUNS = 3;
const WARM_UP_MS = 300;

/** Times `run` REPEAT times after a warm-up; memory is what one run's result retains. */
async function timeStage<T>(run: () => T | Promise<T>): Promise<{ figures: StageFigures; result: T }> {
  const gc = (globalThis as { gc?: () => void }).gc;
  // Start each stage from a collected heap, so the garbage of the stage before (a decoded frame
  // per run) is not collected, and billed, inside this one; then warm up, which also lets V8 size
  // its heap for this stage again. (Collecting right before the timed runs left the young
  // generation at its minimum: every run then paid an extra scavenge for its typed arrays, ~0.4 ms
  // wall and twice the cpu time on a 2048 x 2048 reduce, which a steady process does not.)
  gc?.();
  let result = await run();
  const warmStart = performance.now();
  for (let i = 1; i < WARM_UP_RUNS || performance.now() - warmStart < WARM_UP_MS; i++) result = await run();
  const times: number[] = [];
  const cpu: number[] = [];
  for (let i = 0; i < REPEAT; i += 1) {
    const start = performance.now();
    const cpuStart = process.cpuUsage();
    result = await run();
    const used = process.cpuUsage(cpuStart);
    times.push(performance.now() - start);
    cpu.push((used.user + used.system) / 1000);
  }
  // Peak: the most that three runs, each from a collected heap, allocated before a full
  // collection (young-generation scavenges inside a run can hide some). Kept: the numbers the
  // result holds, counted (heap deltas after a collection proved too noisy).
  let peakMiB = 0;
  for (let i = 0; i < 3; i++) {
    gc?.();
    const before = memoryMiB();
    result = await run();
    peakMiB = Math.max(peakMiB, memoryMiB() - before);
  }
  const retainedMiB = resultBytes(result) / 2 ** 20;
  peakMiB = Math.max(peakMiB, retainedMiB);
  return { figures: { medianMs: median(times), bestMs: Math.min(...times), cpuMs: median(cpu), peakMiB, retainedMiB }, result };
}

/** The reference pipeline's default rows (reference_pipeline.py run_once): signal h/4 … 3h/4, background 0 … h/8. */
function referenceRows(height: number) {
  return {
    signal: { start: Math.floor(height / 4), end: Math.floor((3 * height) / 4) },
    background: [{ start: 0, end: Math.max(1, Math.floor(height / 8)) }],
  };
}

async function benchOurs(file: string, width: number, height: number) {
  const bytes = new Uint8Array(readFileSync(file));
  const profile = referenceProfile(width);
  const decode = await timeStage(() => decodeFrame(bytes));
  const frame = decode.result;
  const reduceOptions = { spectralAxis: 'x' as const };
  // The reference's own work: its fixed rows, no hot-pixel or cosmic rejection (NaN pixels are
  // still replaced), no line-shape correction.
  const sameWorkReduceOptions = { spectralAxis: 'x' as const, ...referenceRows(height), rejectOutliers: false };
  const reduceSameWork = await timeStage(() => reduceFrame(frame, sameWorkReduceOptions));
  const reduce = await timeStage(() => reduceFrame(frame, reduceOptions));
  const peaks = await timeStage(() => findPeaks(reduce.result));
  const calibrateOptions = { profile, driverNm: 800, driverTolerancePct: 1, parity: 'odd' as const, filters: [] as string[], pins: [] };
  const calibrate = await timeStage(() => calibrateFrame(frame, calibrateOptions));
  const calibration = calibrate.result.calibration;
  if (!calibration) throw new Error(`bench frame did not calibrate: ${calibrate.result.status}: ${calibrate.result.message}`);
  // The reference's fit: a degree-3 polynomial through labelled lines (ours through the lines
  // our assignment labelled, with the calibrations' own fitting code: weights, covariance, LOO).
  const points = calibration.points.map((pt) => ({ pixel: pt.pixel, pixelSigma: pt.pixelSigma, wavelengthNm: pt.wavelengthNm, diffractionOrder: pt.diffractionOrder }));
  const fitSameWork = await timeStage(() => fitPolynomialMap(points, { pixelCount: width, degree: 3 }));
  const apply = await timeStage(() => applyCalibration(reduce.result, peaks.result, calibration));
  const assignFit: StageFigures = {
    medianMs: Math.max(0, calibrate.figures.medianMs - reduce.figures.medianMs - peaks.figures.medianMs),
    bestMs: Math.max(0, calibrate.figures.bestMs - reduce.figures.bestMs - peaks.figures.bestMs),
    cpuMs: Math.max(0, calibrate.figures.cpuMs - reduce.figures.cpuMs - peaks.figures.cpuMs),
    peakMiB: calibrate.figures.peakMiB,
    retainedMiB: calibrate.figures.retainedMiB,
  };
  // Applying a calibration to a new frame, end to end as a student's upload costs it: decode,
  // reduce, peaks and the map, timed as one run (not a sum of medians).
  const applyFrame = await timeStage(async () => {
    const f = await decodeFrame(bytes);
    const lineout = reduceFrame(f, reduceOptions);
    return applyCalibration(lineout, findPeaks(lineout), calibration);
  });
  return {
    status: calibrate.result.status,
    peaksFound: peaks.result.length,
    stages: [
      { name: 'decode', reference: 'decode', figures: decode.figures, same: true, extra: 'same work: TIFF to a float frame (the reference converts to float in its reduce)' },
      { name: 'reduce', reference: 'reduce', figures: reduceSameWork.figures, same: true, extra: "same work: the reference's rows, no outlier rejection; plus NaN repair, a noise floor from the rows' MAD, a binned band for spatial widths" },
      { name: 'reduce*', reference: 'reduce', figures: reduce.figures, same: false, extra: 'full: also finds the signal band (a pass over the whole frame) and rejects hot pixels and cosmic rays' },
      { name: 'peaks', reference: 'peaks', figures: peaks.figures, same: true, extra: 'same work, plus each line\'s spatial width and area uncertainty' },
      { name: 'fit', reference: 'fit', figures: fitSameWork.figures, same: true, extra: 'same work: degree-3 polynomial through the labelled lines, plus weights, covariance, leave-one-out' },
      { name: 'assign+fit*', reference: 'fit', figures: assignFit, same: false, extra: 'full: finds the harmonic orders (search over labellings, grating-model fits, margins); the reference assumes them' },
      { name: 'apply', reference: 'apply', figures: apply.figures, same: true, extra: 'same work, plus a wavelength sigma per pixel, order labels and yields' },
    ],
    calibrate: calibrate.figures,
    applyFrame: applyFrame.figures,
  };
}

function benchReference(file: string): Record<string, number> | null {
  try {
    const out = execFileSync(PYTHON, [REFERENCE, file, '--repeat', String(REPEAT)], { encoding: 'utf8' });
    const parsed = JSON.parse(out) as { medianMs: Record<string, number>; peakTracedMiB: number };
    return { ...parsed.medianMs, peakTracedMiB: parsed.peakTracedMiB };
  } catch (error) {
    console.warn(`reference pipeline failed: ${(error as Error).message}`);
    return null;
  }
}

function makeFrame(width: number, height: number, withPython: boolean): string {
  mkdirSync(OUT_DIR, { recursive: true });
  const file = path.join(OUT_DIR, `bench-${width}x${height}.tif`);
  if (withPython) {
    execFileSync(PYTHON, [REFERENCE, '--make-frame', file, '--width', String(width), '--height', String(height)]);
  } else {
    writeFileSync(file, benchFrameFallback(width, height));
  }
  return file;
}

const pad = (s: string, n: number) => s.padStart(n);
const fmt = (v: number | undefined) => (v === undefined || !Number.isFinite(v) ? '-' : v.toFixed(2));

async function main() {
  const withPython = pythonHasNumpy();
  console.log(`orderly bench: ${ROUNDS} rounds of ${REPEAT} runs per stage after a warm-up, medians; node ${process.version}`);
  // A shared 2-core machine: wall times mean little when other work runs beside the bench.
  console.log(`load average at start ${loadavg().map((v) => v.toFixed(2)).join(' ')} (best = fastest run; cpu ms = median user + system time of this process, all threads)`);
  console.log(withPython ? 'reference pipeline: ../shared/bench/reference_pipeline.py (numpy/scipy/tifffile), same files' : 'reference pipeline: not available (needs /usr/bin/python3 with numpy, scipy, tifffile); our figures only');
  const verdicts: string[] = [];
  for (const [width, height] of [
    [2048, 2048],
    [2048, 512],
  ]) {
    const file = makeFrame(width, height, withPython);
    const rounds: Array<{ ours: Awaited<ReturnType<typeof benchOurs>>; reference: Record<string, number> | null }> = [];
    for (let round = 0; round < ROUNDS; round++) {
      const ours = await benchOurs(file, width, height);
      rounds.push({ ours, reference: withPython ? benchReference(file) : null });
    }
    const ours = rounds[0].ours;
    const hasReference = rounds.every((r) => r.reference !== null);
    console.log(`\nframe ${width} x ${height} uint16 (${path.basename(file)}): status ${ours.status}, ${ours.peaksFound} peaks; medians over ${ROUNDS} rounds`);
    console.log(`${'stage'.padEnd(12)}${pad('orderly ms', 11)}${pad('best ms', 9)}${pad('cpu ms', 9)}${pad('peak MiB', 10)}${pad('kept MiB', 10)}${pad('ref ms', 9)}${pad('ratio', 7)}${pad('rounds', 12)}  what ours does`);
    ours.stages.forEach((stage, index) => {
      const figures = rounds.map((r) => r.ours.stages[index].figures);
      const refs = hasReference ? rounds.map((r) => (r.reference as Record<string, number>)[stage.reference]) : [];
      const ratios = refs.map((ref, k) => figures[k].medianMs / ref);
      const ratio = ratios.length > 0 ? median(ratios) : Number.NaN;
      const spread = ratios.length > 0 ? `${fmt(Math.min(...ratios))}-${fmt(Math.max(...ratios))}` : '-';
      const line = [
        stage.name.padEnd(12),
        pad(fmt(median(figures.map((f) => f.medianMs))), 11),
        pad(fmt(Math.min(...figures.map((f) => f.bestMs))), 9),
        pad(fmt(median(figures.map((f) => f.cpuMs))), 9),
        pad(fmt(Math.max(...figures.map((f) => f.peakMiB))), 10),
        pad(fmt(Math.max(...figures.map((f) => f.retainedMiB))), 10),
        pad(fmt(refs.length > 0 ? median(refs) : Number.NaN), 9),
        pad(fmt(ratio), 7),
        pad(spread, 12),
      ].join('');
      console.log(`${line}  ${stage.extra}`);
      if (stage.same && Number.isFinite(ratio)) verdicts.push(`${width}x${height} ${stage.name} ${fmt(ratio)}x ${ratio <= 1.5 ? 'ok' : 'OVER 1.5x'}`);
    });
    // The reference converts to float inside its reduce, ours inside decode: the two together are the like-for-like pair.
    if (hasReference) {
      const sumOf = (r: (typeof rounds)[number], names: string[]) => names.reduce((t, name) => t + (r.ours.stages.find((x) => x.name === name)?.figures.medianMs ?? Number.NaN), 0);
      const ratios = rounds.map((r) => sumOf(r, ['decode', 'reduce']) / ((r.reference as Record<string, number>).decode + (r.reference as Record<string, number>).reduce));
      const oursMs = median(rounds.map((r) => sumOf(r, ['decode', 'reduce'])));
      const refMs = median(rounds.map((r) => (r.reference as Record<string, number>).decode + (r.reference as Record<string, number>).reduce));
      console.log(`decode+reduce (same work, together) ${fmt(oursMs)} ms against ${fmt(refMs)} ms: ratio ${fmt(median(ratios))} (rounds ${fmt(Math.min(...ratios))}-${fmt(Math.max(...ratios))})`);
    }
    const calibrate = median(rounds.map((r) => r.ours.calibrate.medianMs));
    const applyFrame = median(rounds.map((r) => r.ours.applyFrame.medianMs));
    console.log(`calibrate-frame (reduce*+peaks+assign+fit*, one run) ${fmt(calibrate)} ms (best ${fmt(Math.min(...rounds.map((r) => r.ours.calibrate.bestMs)))}) (target < 200 ms on 2048 x 2048)`);
    console.log(`apply-frame (decode+reduce*+peaks+map, one run) ${fmt(applyFrame)} ms (best ${fmt(Math.min(...rounds.map((r) => r.ours.applyFrame.bestMs)))}) (target < 80 ms on 2048 x 2048)`);
    if (hasReference) console.log(`reference peak traced memory ${fmt((rounds[0].reference as Record<string, number>).peakTracedMiB)} MiB`);
  }
  console.log('\nrows marked * do work the reference does not do (named beside them); their ratios are shown, not judged.');
  if (verdicts.length > 0) console.log(`same-work stages against the 1.5x target: ${verdicts.join('; ')}`);
  console.log(`\nprocess max RSS ${(process.resourceUsage().maxRSS / 1024).toFixed(0)} MiB`);
}

await main();
