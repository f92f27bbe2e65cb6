/**
 * Scoring one calibrate result against the simulator's truth, for `npm run eval`: the outcome
 * (correct / wrong-but-confident / ambiguous / failed), the map's error against the true
 * wavelength at every pixel with the share inside the stated 2σ band, and the label coverage of
 * true m = 1 and m = 2 lines that were detected as peaks.
 */
import type { CalibrateResult } from '../../shared/engine/calibrate.ts';
import { HC_EV_NM } from '../../shared/engine/constants.ts';
import { evaluateCalibration } from '../../shared/engine/dispersion/index.ts';
import { unblendedSecondOrder, type SimLine, type SimTruth } from '../../shared/engine/simulate/index.ts';
import { matchPeaksToLines } from './independent-decidability.ts';

export type Outcome = 'correct' | 'wrong' | 'ambiguous' | 'failed';

/** A labelled peak is right when a true line with its (q, m) lies within this of it. */
const LABEL_TOLERANCE_PX = 3;
/** Lines closer than this to the nearest true line count as the same place (m = 3 of 3k on m = 1 of k; blends). */
const COINCIDENT_PX = 0.5;

/**
 * Correct = unique, at least two labelled peaks, and every labelled peak sits within 3 px of a
 * true line of that harmonic and diffraction order (the nearest line, or one coinciding with it
 * within 0.5 px: a blend may carry either label). Every true line counts, visible or not: a faint
 * real line rightly labelled is no error.
 */
export function judgeResult(result: CalibrateResult, truth: Pick<SimTruth, 'lines'>): { outcome: Outcome; detail: string } {
  if (result.status === 'failed') return { outcome: 'failed', detail: result.message };
  if (result.status === 'ambiguous') return { outcome: 'ambiguous', detail: result.message };
  let labelled = 0;
  for (const peak of result.peaks) {
    if (peak.harmonic === null) continue;
    labelled += 1;
    const near = truth.lines.filter((l) => Math.abs(l.pixel - peak.pixel) <= LABEL_TOLERANCE_PX);
    if (near.length === 0) return { outcome: 'wrong', detail: `peak at ${peak.pixel.toFixed(1)} labelled q=${peak.harmonic} matches no true line` };
    const nearest = Math.min(...near.map((l) => Math.abs(l.pixel - peak.pixel)));
    const candidates = near.filter((l) => Math.abs(l.pixel - peak.pixel) <= nearest + COINCIDENT_PX);
    if (!candidates.some((l) => l.harmonic === peak.harmonic && l.diffractionOrder === peak.diffractionOrder)) {
      const t = candidates[0];
      return { outcome: 'wrong', detail: `peak at ${peak.pixel.toFixed(1)}: said q=${peak.harmonic}/m=${peak.diffractionOrder}, truth q=${t.harmonic}/m=${t.diffractionOrder}` };
    }
  }
  if (labelled < 2) return { outcome: 'wrong', detail: 'unique with fewer than two labelled peaks' };
  return { outcome: 'correct', detail: result.message };
}

export interface MapErrors {
  errorsNm: number[];
  errorsMeV: number[];
  /** Pixels whose true wavelength lies within the stated 2σ band. */
  inside: number;
  pixels: number;
}

/** Map error against the truth over the span of the labelled peaks (where a calibration is meant to hold). */
export function mapErrors(result: CalibrateResult, truth: Pick<SimTruth, 'wavelengthNmAtPixel'>): MapErrors {
  const cal = result.calibration;
  const out: MapErrors = { errorsNm: [], errorsMeV: [], inside: 0, pixels: 0 };
  if (!cal || cal.points.length === 0) return out;
  const labelledPixels = cal.points.map((p) => p.pixel);
  const lo = Math.max(0, Math.floor(Math.min(...labelledPixels)));
  const hi = Math.min(cal.pixelCount - 1, Math.ceil(Math.max(...labelledPixels)));
  const pixels = Array.from({ length: hi - lo + 1 }, (_, i) => lo + i);
  const evaluated = evaluateCalibration(cal, pixels);
  pixels.forEach((p, i) => {
    const trueNm = truth.wavelengthNmAtPixel[p];
    if (!Number.isFinite(trueNm)) return;
    const errNm = evaluated.wavelengthNm[i] - trueNm;
    out.errorsNm.push(errNm);
    out.errorsMeV.push(1000 * (HC_EV_NM / evaluated.wavelengthNm[i] - HC_EV_NM / trueNm));
    out.pixels += 1;
    if (Math.abs(errNm) <= 2 * evaluated.wavelengthSigmaNm[i]) out.inside += 1;
  });
  return out;
}

export interface LabelCoverage {
  /** True m = 1 lines detected as peaks (a peak within 1.5 px, claimed by no nearer line). */
  firstOrderDetected: number;
  /** Of those, labelled at all (unique results only: ambiguous ones carry no labels). */
  firstOrderLabelled: number;
  /** True m = 2 lines position can tell apart (unblendedSecondOrder, visible or not) detected as peaks. */
  secondOrderDetected: number;
  /** Of those, labelled with the right (q, m = 2). */
  secondOrderRight: number;
}

/** Label coverage of detected true lines, counted on unique results only (all zeros otherwise). */
export function labelCoverage(result: CalibrateResult, lines: readonly SimLine[], lineFwhmPx: number): LabelCoverage {
  const out: LabelCoverage = { firstOrderDetected: 0, firstOrderLabelled: 0, secondOrderDetected: 0, secondOrderRight: 0 };
  if (result.status !== 'unique') return out;
  const matched = matchPeaksToLines(result.peaks, lines);
  const clearSecond = new Set(unblendedSecondOrder(lines, lineFwhmPx, false));
  matched.forEach((line, i) => {
    if (!line) return;
    const peak = result.peaks[i];
    if (line.diffractionOrder === 1) {
      out.firstOrderDetected += 1;
      if (peak.harmonic !== null) out.firstOrderLabelled += 1;
    } else if (line.diffractionOrder === 2 && clearSecond.has(line)) {
      out.secondOrderDetected += 1;
      if (peak.harmonic === line.harmonic && peak.diffractionOrder === 2) out.secondOrderRight += 1;
    }
  });
  return out;
}
