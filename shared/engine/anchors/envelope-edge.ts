/**
 * A filter edge between two harmonics: with the first-order lines a hypothesis labels, say which
 * two comb orders each edge of the filters lies between, and whether the line strengths follow
 * the transmission step (lines above an opaque edge absent or much weaker). That checks the
 * labels; it buys no scale: the edge can sit anywhere in the gap between the two orders
 * (2·hc/λ0 for an odd comb), and the report says how wide that gap is. See README.md.
 */
import { HC_EV_NM } from '../constants.ts';
import { EngineError } from '../errors.ts';
import { stackTransmission, toFoil, type Foil } from '../filters/transmission.ts';
import { transmissionStepEdges } from '../references.ts';
import type { Parity } from '../types.ts';

/** A labelled first-order line: harmonic, photon energy, area (counts) and its 1σ when known. */
export interface EnvelopeLine {
  harmonic: number;
  energyEv: number;
  area: number;
  areaSigma?: number;
}

export interface EnvelopeEdgeInput {
  lines: readonly EnvelopeLine[];
  filters: readonly (string | Foil)[];
  parity: Parity;
  /** Effective driver wavelength of the hypothesis, nm. @default the median of q·hc/E over the lines */
  driverNm?: number;
  /** First-order photon energies the detector sees, eV: an order predicted inside but not labelled is absent. @default the lines' range */
  detectorRangeEv?: [number, number];
}

export type EnvelopeVerdict = 'consistent' | 'inconsistent' | 'untestable';

/** One comb order beside an edge; `area` null when the order is on the detector but not labelled. */
export interface EdgeNeighbour {
  harmonic: number;
  energyEv: number;
  area: number | null;
  transmission: number;
}

export interface EnvelopeEdgeReport {
  material: string;
  /** e.g. "Al L2,3". */
  edgeLabel: string;
  energyEv: number;
  below: EdgeNeighbour;
  above: EdgeNeighbour;
  /** Width of the gap the edge may sit anywhere in, eV. */
  gapEv: number;
  /** ln T(below) − ln T(above) of the filters. */
  expectedLogDrop: number;
  /** ln A(below) − ln A(above) of the labelled lines; null when one is absent. */
  observedLogDrop: number | null;
  verdict: EnvelopeVerdict;
  /** The report in plain words. */
  message: string;
}

/** A line is taken as seen when its area is this many σ (the usual 5σ detection threshold, common practice). */
const DETECTION_SIGMA = 5;

/**
 * How far neighbouring harmonics' strengths may differ for other reasons (envelope slope,
 * shot-to-shot jitter): a factor 3, in ln. Common practice for a plateau; our choice of number.
 */
const ENVELOPE_SCATTER_LN = Math.log(3);

function median(values: number[]): number {
  const s = [...values].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
}

function times(ratio: number): string {
  return ratio >= 10 ? ratio.toFixed(0) : ratio.toFixed(1);
}

function strengthWords(r: Omit<EnvelopeEdgeReport, 'message' | 'verdict'>, verdict: EnvelopeVerdict): string {
  const { below, above } = r;
  const tableRatio = Math.exp(r.expectedLogDrop);
  if (verdict === 'untestable') {
    if (below.area === null && above.area === null) return 'neither order is labelled, so the line strengths cannot be compared';
    return `the step (×${times(tableRatio)}) is within the scatter of neighbouring lines, so the line strengths cannot test it`;
  }
  if (above.area === null) {
    return verdict === 'consistent'
      ? `q = ${above.harmonic} is absent, as the filter's transmission there (${above.transmission.toPrecision(2)}) predicts`
      : `q = ${above.harmonic} is absent although the filters pass ${above.transmission.toPrecision(2)} there: check the labels`;
  }
  if (below.area === null) return `q = ${below.harmonic} is absent on the side the filters pass while q = ${above.harmonic} is seen: check the labels`;
  const seen = Math.exp(r.observedLogDrop!);
  const words = seen >= 1 ? `q = ${above.harmonic} is ${times(seen)}× weaker than q = ${below.harmonic}` : `q = ${above.harmonic} is ${times(1 / seen)}× stronger than q = ${below.harmonic}`;
  return verdict === 'consistent'
    ? `the line strengths follow the step (${words}; the filters say ${times(tableRatio)}×)`
    : `the line strengths do not follow the step (${words}; the filters say ${times(tableRatio)}× weaker): check the labels, the filter and its thickness`;
}

function verdictOf(r: Omit<EnvelopeEdgeReport, 'message' | 'verdict'>, detectionArea: number): EnvelopeVerdict {
  const { below, above } = r;
  if (below.area === null && above.area === null) return 'untestable';
  if (below.area !== null && above.area === null) {
    // The line above should have had area A_below · T_above/T_below: absent is right when that is too weak to be seen.
    return below.area * (above.transmission / below.transmission) < detectionArea ? 'consistent' : 'inconsistent';
  }
  if (r.expectedLogDrop < ENVELOPE_SCATTER_LN) return 'untestable';
  if (below.area === null) return 'inconsistent';
  return Math.abs(r.observedLogDrop! - r.expectedLogDrop) <= ENVELOPE_SCATTER_LN ? 'consistent' : 'inconsistent';
}

/**
 * For each edge of the filters (their transmission steps) between two comb orders on the
 * detector: the two orders, the gap, and whether the labelled lines' strengths follow the step.
 *
 * @throws EngineError 'invalid_input' for no lines, unknown filters or a bad driver wavelength.
 */
export function reportEnvelopeEdges(input: EnvelopeEdgeInput): EnvelopeEdgeReport[] {
  const lines = input.lines.filter((l) => Number.isFinite(l.energyEv) && l.energyEv > 0 && Number.isInteger(l.harmonic) && l.harmonic > 0);
  if (lines.length === 0) throw new EngineError('invalid_input', 'The envelope check needs at least one labelled first-order line (harmonic, photon energy, area).');
  const foils = input.filters.map(toFoil);
  const driverNm = input.driverNm ?? median(lines.map((l) => (l.harmonic * HC_EV_NM) / l.energyEv));
  if (!(driverNm > 0 && Number.isFinite(driverNm))) throw new EngineError('invalid_input', `The driver wavelength must be a positive number of nm, got ${input.driverNm}.`);
  const photonEv = HC_EV_NM / driverNm;
  const step = input.parity === 'odd' ? 2 : 1;
  const energies = lines.map((l) => l.energyEv);
  const [lo, hi] = input.detectorRangeEv ?? [Math.min(...energies), Math.max(...energies)];
  const byHarmonic = new Map(lines.map((l) => [l.harmonic, l]));
  // The weakest area that would be seen: 5σ of a typical line when the σ are given, else (no better
  // bound known) the weakest line labelled.
  const sigmas = lines.map((l) => l.areaSigma ?? Number.NaN).filter((x) => Number.isFinite(x) && x > 0);
  const detectionArea = sigmas.length > 0 ? DETECTION_SIGMA * median(sigmas) : Math.min(...lines.map((l) => l.area).filter((a) => a > 0));
  const neighbour = (q: number): EdgeNeighbour => ({ harmonic: q, energyEv: q * photonEv, area: byHarmonic.get(q)?.area ?? null, transmission: stackTransmission(foils, q * photonEv) });
  const seen = new Set<string>();
  const reports: EnvelopeEdgeReport[] = [];
  for (const foil of foils) {
    for (const edge of transmissionStepEdges(foil.material)) {
      if (seen.has(edge.label)) continue;
      seen.add(edge.label);
      // The comb order just below the edge (of the comb's parity), and the next one.
      let qBelow = Math.floor(edge.energyEv / photonEv - 1e-9);
      if (step === 2 && qBelow % 2 === 0) qBelow -= 1;
      const qAbove = qBelow + step;
      if (qBelow < 1 || qBelow * photonEv < lo - 1e-9 || qAbove * photonEv > hi + 1e-9) continue;
      const below = neighbour(qBelow);
      const above = neighbour(qAbove);
      const observedLogDrop = below.area !== null && above.area !== null && below.area > 0 && above.area > 0 ? Math.log(below.area / above.area) : null;
      const partial = {
        material: foil.material,
        edgeLabel: edge.label,
        energyEv: edge.energyEv,
        below,
        above,
        gapEv: step * photonEv,
        expectedLogDrop: Math.log(below.transmission / above.transmission),
        observedLogDrop,
      };
      const verdict = verdictOf(partial, detectionArea);
      const message = `${edge.label} edge lies between q = ${qBelow} and ${qAbove}: fixes labels, not the scale (the gap is ${partial.gapEv.toFixed(1)} eV); ${strengthWords(partial, verdict)}.`;
      reports.push({ ...partial, verdict, message });
    }
  }
  return reports.sort((a, b) => a.energyEv - b.energyEv);
}
