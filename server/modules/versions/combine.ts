/**
 * Several frames in one workbench run (e.g. the same harmonics through different filters): each
 * frame is calibrated on its own, then the run is `unique` only if at least one frame is unique
 * and every unique frame agrees on the order of every line they share (API contract: "run each
 * and report ambiguous unless all unique results agree on every common line's harmonic").
 */
import type { CalibrateResult } from '../../../shared/engine/calibrate.ts';
import type { WorkbenchResult } from '../../../shared/api/workbench.ts';

/** Peaks closer than this are the same line seen in two frames (line FWHM is ~4 px; common practice). */
export const SAME_LINE_PX = 2;

interface Labelled {
  pixel: number;
  harmonic: number;
  diffractionOrder: number;
}

function labelled(result: CalibrateResult): Labelled[] {
  return result.peaks.filter((p): p is typeof p & { harmonic: number } => p.harmonic !== null).map((p) => ({ pixel: p.pixel, harmonic: p.harmonic, diffractionOrder: p.diffractionOrder }));
}

/** Lines both results labelled at the same pixel with a different wavelength (q/m differs). */
export function disagreements(a: CalibrateResult, b: CalibrateResult): { pixel: number; a: string; b: string }[] {
  const out: { pixel: number; a: string; b: string }[] = [];
  const lb = labelled(b);
  for (const pa of labelled(a)) {
    const pb = lb.find((p) => Math.abs(p.pixel - pa.pixel) <= SAME_LINE_PX);
    if (pb && pa.harmonic * pb.diffractionOrder !== pb.harmonic * pa.diffractionOrder) {
      out.push({ pixel: pa.pixel, a: `H${pa.harmonic}${pa.diffractionOrder > 1 ? ` (m=${pa.diffractionOrder})` : ''}`, b: `H${pb.harmonic}${pb.diffractionOrder > 1 ? ` (m=${pb.diffractionOrder})` : ''}` });
    }
  }
  return out;
}

export function combineResults(results: { frameId: string; label: string; result: CalibrateResult }[]): WorkbenchResult {
  const perFrame = results.map((r) => ({ frameId: r.frameId, status: r.result.status, message: r.result.message }));
  if (results.length === 1) return results[0]!.result;
  const unique = results.filter((r) => r.result.status === 'unique');
  if (unique.length === 0) {
    const status = results.some((r) => r.result.status === 'ambiguous') ? 'ambiguous' : 'failed';
    const first = results.find((r) => r.result.status === status)!;
    return { ...first.result, status, message: `No frame alone decides the orders (${first.label}: ${first.result.message})`, perFrame };
  }
  for (let i = 0; i < unique.length; i++) {
    for (let j = i + 1; j < unique.length; j++) {
      const d = disagreements(unique[i]!.result, unique[j]!.result);
      if (d.length > 0) {
        const where = d.map((x) => `pixel ${x.pixel.toFixed(1)}: ${x.a} vs ${x.b}`).join('; ');
        return {
          ...unique[i]!.result,
          status: 'ambiguous',
          message: `${unique[i]!.label} and ${unique[j]!.label} each decide the orders but disagree (${where}); pin an order or run them separately.`,
          perFrame,
        };
      }
    }
  }
  // The unique frame with the most labelled lines carries the map; the others confirm it.
  const best = unique.reduce((a, b) => (labelled(b.result).length > labelled(a.result).length ? b : a));
  const note = `${unique.length} of ${results.length} frames decide the orders on their own and agree on every shared line; the map is from ${best.label}.`;
  return { ...best.result, notes: [...best.result.notes, note], perFrame };
}
