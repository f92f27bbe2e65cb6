/**
 * The centroid scatter of clean lines against the Cramér–Rao bound, through the engine's reduce +
 * peaks stages, for `npm run eval`. Bound for a pixelated Gaussian line without background
 * (Thompson, Larson & Webb, Biophys. J. 82, 2775 (2002); from memory): σ² = (s² + a²/12) / N for
 * line sigma s, pixel size a = 1 and N detected photons in the summed band. Frames come from the
 * independent test generator (tests/unit/reduce/support/synthetic.ts: Poisson photons, read noise).
 */
import { findPeaks } from '../../shared/engine/peaks.ts';
import { reduceFrame } from '../../shared/engine/reduce.ts';
import { expectedPhotons, syntheticFrame, type SyntheticFrameSpec } from '../unit/reduce/support/synthetic.ts';

export interface CramerRaoRow {
  photons: number;
  sigmaPx: number;
  trials: number;
  scatterPx: number;
  boundPx: number;
  ratio: number;
}

const TRIALS = 200;

function one(photons: number, sigmaPx: number, seedBase: number): CramerRaoRow {
  const spec: SyntheticFrameSpec = {
    spectralLength: 96,
    spatialLength: 44,
    spectralAxis: 'x',
    spatialCentre: 22,
    lines: [{ pixel: 47.35, sigmaPx, photons, spatialSigmaPx: 3 }],
    readNoiseCounts: 0.5,
    seed: 0,
  };
  const model = expectedPhotons(spec);
  const signal = { start: 8, end: 37 };
  const inBand = model.slice(signal.start * 96, signal.end * 96).reduce((a, b) => a + b, 0);
  const boundPx = Math.sqrt((sigmaPx ** 2 + 1 / 12) / inBand);
  const centres: number[] = [];
  for (let k = 0; k < TRIALS; k++) {
    const frame = syntheticFrame({ ...spec, seed: seedBase + k }, model);
    const lineout = reduceFrame(frame, { spectralAxis: 'x', signal, background: [{ start: 0, end: 4 }, { start: 40, end: 44 }] });
    const peak = findPeaks(lineout).find((p) => Math.abs(p.pixel - 47.35) < 3);
    if (peak) centres.push(peak.pixel);
  }
  const mean = centres.reduce((a, b) => a + b, 0) / centres.length;
  const scatterPx = Math.sqrt(centres.reduce((a, b) => a + (b - mean) ** 2, 0) / (centres.length - 1));
  return { photons, sigmaPx, trials: centres.length, scatterPx, boundPx, ratio: scatterPx / boundPx };
}

/** Lines from 1000 to 100 000 photons and 1–2.5 px sigma (FWHM 2.4–5.9 px). */
export function cramerRaoRows(): CramerRaoRow[] {
  const rows: CramerRaoRow[] = [];
  let seed = 70_000;
  for (const photons of [1_000, 10_000, 100_000]) {
    for (const sigmaPx of [1, 1.7, 2.5]) {
      rows.push(one(photons, sigmaPx, seed));
      seed += TRIALS;
    }
  }
  return rows;
}
