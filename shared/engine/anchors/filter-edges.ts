/**
 * The filter edges of one frame under a first assignment, for calibrateFrame: the edges located
 * on the continuum (with that assignment's map as the provisional one) as known lines for the
 * assigner and as scale anchors, the envelope report of the edges between two labelled orders,
 * and both in plain words. See README.md.
 */
import { HC_EV_NM } from '../constants.ts';
import { calibrationDispersionNmPerPixel, calibrationWavelengthToPixel, evaluateCalibration } from '../dispersion/index.ts';
import type { Foil } from '../filters/transmission.ts';
import type { Calibration, Lineout, Parity, Peak, ScaleAnchor } from '../types.ts';
import { locateContinuumEdges, type LineAt, type LocatedEdge } from './continuum-edge.ts';
import { reportEnvelopeEdges, type EnvelopeEdgeReport, type EnvelopeLine } from './envelope-edge.ts';

export interface FilterEdgeInput {
  lineout: Lineout;
  peaks: readonly Peak[];
  /** The first assignment's calibration: the provisional map. */
  calibration: Calibration;
  /** (harmonic, diffraction order) of each peak in that assignment's best hypothesis; null = unexplained. */
  labels: readonly { harmonic: number | null; diffractionOrder: number | null }[];
  /** Effective driver wavelength of that hypothesis, nm. */
  driverNm: number;
  parity: Parity;
  filters: readonly (string | Foil)[];
  /** Relative 1σ of that map's scale: the locator searches ±4σ (at least ±2 %). */
  scaleSigmaRelative: number;
}

/** A located edge as the assigner takes a known line. */
export interface EdgeKnownLine {
  wavelengthNm: number;
  pixel: number;
  /** The located pixel's σ with the edge energy's σ folded in: √(σ_px² + (σ_E/|dE/dp|)²). */
  pixelSigma: number;
  label: string;
}

export interface FilterEdgeFindings {
  located: LocatedEdge[];
  envelope: EnvelopeEdgeReport[];
  knownLines: EdgeKnownLine[];
  anchors: ScaleAnchor[];
  /** What each edge says, in plain words. */
  notes: string[];
}

/** |dE/dp| of the map at a pixel, eV per pixel. */
function energyPerPixel(calibration: Calibration, pixel: number): number {
  const lambda = evaluateCalibration(calibration, [pixel]).wavelengthNm[0];
  const slope = calibrationDispersionNmPerPixel(calibration, [pixel])[0];
  return Math.abs((HC_EV_NM / (lambda * lambda)) * slope);
}

/** Detected peaks, plus the first-order comb positions the hypothesis predicts (a line the peak finder cannot see on a step). */
function linesForLocator(input: FilterEdgeInput): LineAt[] {
  const lines: LineAt[] = input.peaks.map((p) => ({ pixel: p.pixel, fwhmPx: p.fwhmPx }));
  const n = input.lineout.counts.length;
  const ends = evaluateCalibration(input.calibration, [0, n - 1]).wavelengthNm;
  const shortest = Math.min(ends[0], ends[1]);
  const longest = Math.max(ends[0], ends[1]);
  const step = input.parity === 'odd' ? 2 : 1;
  for (let q = Math.max(1, Math.floor(input.driverNm / longest) - 1); q <= Math.ceil(input.driverNm / shortest) + 1; q++) {
    if (step === 2 && q % 2 === 0) continue;
    const pixel = calibrationWavelengthToPixel(input.calibration, input.driverNm / q, 1);
    if (Number.isFinite(pixel) && pixel > -10 && pixel < n + 10) lines.push({ pixel });
  }
  return lines;
}

function envelopeLines(input: FilterEdgeInput): EnvelopeLine[] {
  const out: EnvelopeLine[] = [];
  input.labels.forEach((label, i) => {
    if (label.harmonic === null || label.diffractionOrder !== 1) return;
    const peak = input.peaks[i];
    out.push({ harmonic: label.harmonic, energyEv: (label.harmonic * HC_EV_NM) / input.driverNm, area: peak.area, areaSigma: peak.areaSigma });
  });
  return out;
}

function twoDigits(value: number): string {
  return value.toPrecision(2);
}

/** The edges of the filters on this frame, under a first assignment. Never throws for the data; unknown filters throw EngineError. */
export function findFilterEdges(input: FilterEdgeInput): FilterEdgeFindings {
  const findings: FilterEdgeFindings = { located: [], envelope: [], knownLines: [], anchors: [], notes: [] };
  if (input.filters.length === 0) return findings;
  const n = input.lineout.counts.length;
  const ends = evaluateCalibration(input.calibration, [0, n - 1]).wavelengthNm.map((nm) => HC_EV_NM / nm);
  const lines = envelopeLines(input);
  if (lines.length > 0) {
    findings.envelope = reportEnvelopeEdges({ lines, filters: input.filters, parity: input.parity, driverNm: input.driverNm, detectorRangeEv: [Math.min(...ends), Math.max(...ends)] });
  }
  const search = locateContinuumEdges(
    { lineout: input.lineout, map: input.calibration, filters: input.filters, lines: linesForLocator(input) },
    { searchRelative: Math.min(0.2, Math.max(0.02, 4 * input.scaleSigmaRelative)) },
  );
  findings.located = search.edges;
  for (const edge of search.edges) {
    const dEdp = energyPerPixel(input.calibration, edge.pixel);
    const edgeSigmaPx = dEdp > 0 ? edge.energySigmaEv / dEdp : 0;
    findings.knownLines.push({ wavelengthNm: HC_EV_NM / edge.energyEv, pixel: edge.pixel, pixelSigma: Math.hypot(edge.pixelSigma, edgeSigmaPx), label: edge.label });
    findings.anchors.push({ kind: 'filter-edge', label: edge.label, pixel: edge.pixel, pixelSigma: edge.pixelSigma, energyEv: edge.energyEv, energySigmaEv: edge.energySigmaEv });
    const scaleEv = Math.hypot(edge.energySigmaEv, edge.pixelSigma * dEdp);
    findings.notes.push(`${edge.edgeLabel} edge located on the continuum at pixel ${edge.pixel.toFixed(1)} ± ${twoDigits(edge.pixelSigma)}: fixes the scale to ±${twoDigits(scaleEv)} eV (the Henke step at ${edge.energyEv} eV, itself ±${twoDigits(edge.energySigmaEv)} eV).`);
  }
  for (const s of search.searches) if (s.onDetector && !s.located) findings.notes.push(`Not located on the continuum: ${s.reason}`);
  for (const r of findings.envelope) findings.notes.push(r.message);
  return findings;
}
