/**
 * The edge energies the product uses (calibration-data/edges.json) against the transmission
 * tables beside them (calibration-data/filters.json: Henke, Gullikson & Davis, At. Data Nucl.
 * Data Tables 54, 181 (1993) via periodictable 1.6.0). A filter edge seen in a spectrum is where
 * the transmission steps, so every edge of an element with a table must sit where that table
 * steps. Sources beside the checks: the Henke f2 step intervals transcribed from
 * /work/shared/reference/README.md ("Caution on edge energies", fixture
 * xray/henke-edge-steps.json); xraylib 4.0.0 EdgeEnergy (fixture xray/edges.json) for the values
 * kept beside them.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { absorptionEdges, transmissionStepEdges } from '../../../shared/engine/references.ts';

function json<T>(url: URL): T {
  return JSON.parse(readFileSync(url, 'utf8')) as T;
}

interface EdgeEntry {
  shell: string;
  energyEv: number;
  energySigmaEv?: number;
  source: string;
  stepIntervalEv?: [number, number];
  tableStepEv?: [number, number];
  xraylib: { shell: string; energyEv: number }[];
}
interface ProductEdges {
  elements: { symbol: string; transmissionTable: string | null; edges: EdgeEntry[] }[];
}
interface Table {
  material: string;
  energyEv: number[];
  transmission: number[];
}

const productEdges = json<ProductEdges>(new URL('../../../calibration-data/edges.json', import.meta.url));
const tables = json<{ filters: Table[] }>(new URL('../../../calibration-data/filters.json', import.meta.url)).filters;
const xraylib = json<{ source: string; elements: { symbol: string; edges: { shell: string; energyEv: number }[] }[] }>(new URL('../../fixtures/reference/xray/edges.json', import.meta.url));
const henkeSteps = json<{ steps: { symbol: string; stepEv: [number, number] }[] }>(new URL('../../fixtures/reference/xray/henke-edge-steps.json', import.meta.url)).steps;

const tableOf = (symbol: string): Table => tables.find((t) => t.material === symbol)!;
const lnT = (t: Table, k: number): number => Math.log(Math.max(t.transmission[k], 1e-300));
/** Fall of ln T across grid interval k, [E_k, E_k+1] (positive = the foil gets more opaque). */
const fall = (t: Table, k: number): number => lnT(t, k) - lnT(t, k + 1);

function median(values: number[]): number {
  const s = [...values].sort((a, b) => a - b);
  return s.length % 2 ? s[(s.length - 1) / 2] : (s[s.length / 2 - 1] + s[s.length / 2]) / 2;
}

/**
 * Does the table step at `energyEv`? The 1 eV interval holding it must be a fall of ln T at
 * least half the steepest within ±3 eV (so not the tail of a step elsewhere), and stand out:
 * either T drops by a third or more in that eV (ln-fall ≥ 0.4), or the fall is ≥ 5× the median
 * slope 4-12 eV away (a small step on a flat curve, as Zr M5). Common practice for reading a
 * step off a tabulated curve; the thresholds are ours.
 */
function tableStepsAt(t: Table, energyEv: number): boolean {
  const e = t.energyEv;
  const k = e.findIndex((x, i) => i + 1 < e.length && x <= energyEv && energyEv < e[i + 1]);
  if (k < 0) return false;
  const near: number[] = [];
  const far: number[] = [];
  for (let j = 0; j + 1 < e.length; j++) {
    const distance = Math.abs((e[j] + e[j + 1]) / 2 - energyEv);
    if (distance <= 3) near.push(fall(t, j));
    else if (distance >= 4 && distance <= 12) far.push(Math.abs(fall(t, j)));
  }
  const here = fall(t, k);
  return here > 0 && here >= 0.5 * Math.max(...near) && (here >= 0.4 || here >= 5 * median(far));
}

const withTables = productEdges.elements.filter((el) => el.transmissionTable !== null);
const henkeEdges = withTables.flatMap((el) => el.edges.filter((e) => e.source !== 'xraylib').map((e) => ({ symbol: el.symbol, ...e })));

describe('edge energies sit where the transmission tables step', () => {
  it('every element with a transmission table has one, and the list covers all seven foils', () => {
    expect(withTables.map((el) => el.symbol).sort()).toEqual(tables.map((t) => t.material).sort());
    for (const el of withTables) expect(el.edges.some((e) => e.source !== 'xraylib'), el.symbol).toBe(true);
  });

  it.each(henkeEdges.map((e) => [`${e.symbol} ${e.shell}`, e] as const))('%s: the table steps at the product energy', (_, edge) => {
    expect(tableStepsAt(tableOf(edge.symbol), edge.energyEv), `${edge.symbol} ${edge.shell} ${edge.energyEv} eV`).toBe(true);
    // The stated table interval is where the 1 eV table holds the step.
    const [lo, hi] = edge.tableStepEv!;
    expect(edge.energyEv).toBeGreaterThan(lo);
    expect(edge.energyEv).toBeLessThan(hi);
    expect(Number.isInteger(lo) && Number.isInteger(hi)).toBe(true);
  });

  it.each(henkeEdges.filter((e) => e.source === 'henke-f2-step').map((e) => [e.symbol, e] as const))(
    '%s: the f2 step interval is the reference README’s, the energy its midpoint, σ its width/√12',
    (symbol, edge) => {
      // /work/shared/reference/README.md, "Caution on edge energies" (fixture henke-edge-steps.json).
      const reference = henkeSteps.find((s) => s.symbol === symbol)!.stepEv;
      expect(edge.stepIntervalEv).toEqual(reference);
      expect(edge.energyEv).toBeCloseTo((reference[0] + reference[1]) / 2, 6);
      expect(edge.energySigmaEv!).toBeCloseTo((reference[1] - reference[0]) / Math.sqrt(12), 4);
      expect(reference[0]).toBeGreaterThanOrEqual(edge.tableStepEv![0]);
      expect(reference[1]).toBeLessThanOrEqual(edge.tableStepEv![1]);
    },
  );

  it('steps read off the 1 eV table alone (no f2 interval on record) carry σ = 1 eV/√12', () => {
    for (const e of henkeEdges.filter((x) => x.source === 'henke-table-step')) {
      expect(e.tableStepEv![1] - e.tableStepEv![0]).toBe(1);
      expect(e.energySigmaEv!).toBeCloseTo(1 / Math.sqrt(12), 4);
    }
  });

  it.each([
    // xraylib 4.0.0 EdgeEnergy values (fixture xray/edges.json) that the README says disagree with Henke.
    ['Mg', 51.4],
    ['Ti', 34.6],
    ['Zr', 180.0],
    ['Sn', 23.9],
    ['Si', 98.9],
    ['Al', 73.2],
    ['Zr', 28.7],
  ] as const)('the check refuses %s at the xraylib energy %s eV: the table does not step there', (symbol, energyEv) => {
    expect(tableStepsAt(tableOf(symbol), energyEv)).toBe(false);
  });

  it('Mg L2,3 is at the Henke step (49.4-49.6 eV), not at xraylib’s 51.4 eV', () => {
    const mg = transmissionStepEdges('Mg');
    expect(mg.map((e) => e.label)).toEqual(['Mg L2,3']);
    expect(mg[0].energyEv).toBeGreaterThanOrEqual(49.4);
    expect(mg[0].energyEv).toBeLessThanOrEqual(49.6);
    expect(mg[0].xraylib.map((x) => x.energyEv)).toEqual([51.4, 51.4]);
  });

  it('edges of table elements kept at their xraylib value are ones the table shows no step for', () => {
    for (const el of withTables) {
      for (const e of el.edges.filter((x) => x.source === 'xraylib' && x.energyEv >= 16 && x.energyEv < 299)) {
        expect(tableStepsAt(tableOf(el.symbol), e.energyEv), `${el.symbol} ${e.shell} ${e.energyEv} eV`).toBe(false);
      }
    }
  });
});

describe('the xraylib values beside them', () => {
  it('are xraylib 4.0.0 EdgeEnergy, every shell of the reference file exactly once', () => {
    expect(xraylib.source).toBe('xraylib 4.0.0 EdgeEnergy');
    for (const element of xraylib.elements) {
      const product = productEdges.elements.find((el) => el.symbol === element.symbol)!;
      const kept = product.edges.flatMap((e) => e.xraylib);
      expect(kept.map((x) => x.shell).sort(), element.symbol).toEqual(element.edges.map((x) => x.shell).sort());
      for (const x of element.edges) expect(kept.find((k) => k.shell === x.shell)!.energyEv).toBe(x.energyEv);
    }
  });

  it('elements without a transmission table keep xraylib values', () => {
    for (const el of productEdges.elements.filter((x) => x.transmissionTable === null)) {
      for (const e of el.edges) {
        expect(e.source).toBe('xraylib');
        expect(e.energyEv).toBe(e.xraylib[0].energyEv);
      }
    }
  });

  it('references.ts reads the product values: Al shows one step, L2,3 at 72.7 eV', () => {
    const al = absorptionEdges('Al');
    expect(al.map((e) => e.label)).toEqual(['Al L2,3', 'Al L1']);
    expect(al[0]).toMatchObject({ energyEv: 72.7, source: 'henke-f2-step', stepIntervalEv: [72.6, 72.8], tableStepEv: [72, 73] });
    expect(transmissionStepEdges('Al').map((e) => e.label)).toEqual(['Al L2,3']);
  });
});
