/**
 * A scan: frames of one run with a scan variable (two-colour delay, pressure, field strength…),
 * each applied to a spectrum. Builds the order × scan-value yield map, per-order yield curves,
 * the sinusoidal modulation fit per order and the cutoff-versus-variable power-law fit.
 * Frames at the same scan value are averaged (σ of the mean from their σ).
 */
import { AnalysisError } from './errors.ts';
import { fitPowerLaw, type PowerLawFit } from './power-law.ts';
import { fitSinusoid, type SinusoidFit, type SinusoidOptions } from './sinusoid.ts';

export interface ScanFrame {
  frameId: string;
  scanValue: number;
  /** First-order lines of the frame's spectrum. */
  orders: ReadonlyArray<{ harmonic: number; diffractionOrder: number; yield: number; yieldSigma: number; energyEv: number }>;
  cutoffEv?: number | null;
}

export interface ScanCurvePoint {
  x: number;
  yield: number;
  yieldSigma: number;
  frames: number;
}

export interface ScanAnalysis {
  /** Sorted distinct scan values (map columns). */
  values: number[];
  /** First-order harmonics seen in any frame (map rows), ascending. */
  harmonics: number[];
  energyEv: number[];
  /** `yieldMap[h][v]`: mean yield of harmonics[h] at values[v]; null where no frame has that line. */
  yieldMap: (number | null)[][];
  curves: Array<{ harmonic: number; energyEv: number; points: ScanCurvePoint[] }>;
  modulation: Array<{ harmonic: number; fit: SinusoidFit | null; message: string | null }>;
  cutoff: { points: Array<{ x: number; cutoffEv: number; frames: number }>; fit: PowerLawFit | null; message: string | null };
}

function failure(error: unknown): string {
  if (error instanceof AnalysisError) return error.message;
  throw error;
}

export function analyseScan(frames: readonly ScanFrame[], options: SinusoidOptions = {}): ScanAnalysis {
  if (frames.length === 0) throw new AnalysisError('The run holds no applied frames with a scan value.');
  const values = [...new Set(frames.map((f) => f.scanValue))].sort((a, b) => a - b);
  const energy = new Map<number, number>();
  // harmonic → value index → list of (yield, σ)
  const cells = new Map<number, Map<number, Array<{ y: number; s: number }>>>();
  for (const frame of frames) {
    const v = values.indexOf(frame.scanValue);
    for (const order of frame.orders) {
      if (order.diffractionOrder !== 1 || !Number.isFinite(order.yield)) continue;
      energy.set(order.harmonic, order.energyEv);
      const row = cells.get(order.harmonic) ?? new Map<number, Array<{ y: number; s: number }>>();
      cells.set(order.harmonic, row);
      const list = row.get(v) ?? [];
      list.push({ y: order.yield, s: order.yieldSigma });
      row.set(v, list);
    }
  }
  const harmonics = [...cells.keys()].sort((a, b) => a - b);
  const curves = harmonics.map((harmonic) => {
    const row = cells.get(harmonic)!;
    const points: ScanCurvePoint[] = [];
    values.forEach((x, v) => {
      const list = row.get(v);
      if (!list) return;
      const n = list.length;
      const mean = list.reduce((a, c) => a + c.y, 0) / n;
      const sigma = Math.sqrt(list.reduce((a, c) => a + c.s * c.s, 0)) / n;
      points.push({ x, yield: mean, yieldSigma: sigma, frames: n });
    });
    return { harmonic, energyEv: energy.get(harmonic)!, points };
  });
  const yieldMap = curves.map((c) => values.map((x) => c.points.find((p) => p.x === x)?.yield ?? null));
  const modulation = curves.map((c) => {
    try {
      const sigma = c.points.every((p) => p.yieldSigma > 0) ? c.points.map((p) => p.yieldSigma) : undefined;
      const fit = fitSinusoid(
        c.points.map((p) => p.x),
        c.points.map((p) => p.yield),
        sigma,
        // Yield σ hold shot noise only; HHG yields also fluctuate shot to shot, so let the scatter widen them.
        { inflateByReducedChiSquare: true, ...options },
      );
      return { harmonic: c.harmonic, fit, message: null };
    } catch (error) {
      return { harmonic: c.harmonic, fit: null, message: failure(error) };
    }
  });

  const cutoffByValue = new Map<number, number[]>();
  for (const frame of frames) {
    if (frame.cutoffEv == null || !Number.isFinite(frame.cutoffEv)) continue;
    cutoffByValue.set(frame.scanValue, [...(cutoffByValue.get(frame.scanValue) ?? []), frame.cutoffEv]);
  }
  const cutoffPoints = [...cutoffByValue.entries()]
    .sort((a, b) => a[0] - b[0])
    .map(([x, list]) => ({ x, cutoffEv: list.reduce((a, b) => a + b, 0) / list.length, frames: list.length }));
  let cutoffFit: PowerLawFit | null = null;
  let cutoffMessage: string | null = null;
  try {
    // The cutoff is a detected harmonic's energy: quantised, with no per-frame σ, so the
    // covariance comes from the scatter about the line.
    cutoffFit = fitPowerLaw(
      cutoffPoints.map((p) => p.x),
      cutoffPoints.map((p) => p.cutoffEv),
    );
  } catch (error) {
    cutoffMessage = failure(error);
  }
  return {
    values,
    harmonics,
    energyEv: harmonics.map((h) => energy.get(h)!),
    yieldMap,
    curves,
    modulation,
    cutoff: { points: cutoffPoints, fit: cutoffFit, message: cutoffMessage },
  };
}
