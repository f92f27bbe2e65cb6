/**
 * Reference data for calibration: absorption edges, Henke-based filter transmission tables of
 * free-standing foils, and driver-laser presets. The numbers live in calibration-data/*.json,
 * each file naming its source (see calibration-data/README.md). The transmission itself (one
 * interpolation, one out-of-range rule) is filters/transmission.ts; this module only reads.
 */
import drivers from '../../calibration-data/drivers.json';
import edges from '../../calibration-data/edges.json';
import filters from '../../calibration-data/filters.json';
import { EngineError } from './errors.ts';

/**
 * Where an edge energy comes from: the step of the Henke f2 tables behind filters.json (an
 * interval on record), the 1 eV interval where filters.json itself steps, or xraylib 4.0.0
 * EdgeEnergy (elements or shells whose Henke-based table shows no step).
 */
export type EdgeSource = 'henke-f2-step' | 'henke-table-step' | 'xraylib';

export interface AbsorptionEdge {
  /** e.g. "Al L2,3". */
  label: string;
  /** e.g. "L2,3" (a Henke step merges the shells xraylib lists apart). */
  shell: string;
  /** The energy the product uses, eV. */
  energyEv: number;
  source: EdgeSource;
  /** 1σ of `energyEv` for a Henke step: (step interval width)/√12; absent for an xraylib value. */
  energySigmaEv?: number;
  /** Interval where the Henke f2 tables step (source 'henke-f2-step'), eV. */
  stepIntervalEv?: [number, number];
  /** Interval of the 1 eV transmission table that holds the step, eV. */
  tableStepEv?: [number, number];
  /** xraylib 4.0.0 EdgeEnergy of the shells behind this edge, for reference. */
  xraylib: { shell: string; energyEv: number }[];
}

export interface FilterEdge extends AbsorptionEdge {
  material: string;
}

/** One foil's tabulated transmission, as in calibration-data/filters.json. */
export interface FilterTable {
  material: string;
  thicknessNm: number;
  /** Ascending photon energies, eV. */
  energyEv: readonly number[];
  transmission: readonly number[];
}

export interface DriverPreset {
  id: string;
  label: string;
  wavelengthNm: number;
  /** Typical 1-σ spread of the centre wavelength (common practice, not a specification). */
  toleranceNm: number;
  provenance: string;
}

const filterTables = new Map<string, FilterTable>(
  filters.filters.map((f) => [f.material.toLowerCase(), { material: f.material, thicknessNm: f.thicknessNm, energyEv: f.energyEv, transmission: f.transmission }]),
);

interface EdgeRecord {
  shell: string;
  energyEv: number;
  energySigmaEv?: number;
  source: string;
  stepIntervalEv?: number[];
  tableStepEv?: number[];
  xraylib: { shell: string; energyEv: number }[];
}
const edgeTable = new Map(edges.elements.map((e) => [e.symbol.toLowerCase(), { symbol: e.symbol, edges: e.edges as EdgeRecord[] }]));

function pair(v: number[] | undefined): [number, number] | undefined {
  return v && v.length === 2 ? [v[0], v[1]] : undefined;
}

/**
 * Absorption edges of an element between 10 and 600 eV, by energy: for an element with a
 * transmission table, its Henke steps (where that table steps) and, for shells it shows no step
 * for, the xraylib values; xraylib values otherwise (calibration-data/edges.json).
 */
export function absorptionEdges(material: string): AbsorptionEdge[] {
  const element = edgeTable.get(material.trim().toLowerCase());
  if (!element) throw new EngineError('invalid_input', `No absorption edges tabulated for "${material}"; known: ${[...edgeTable.values()].map((e) => e.symbol).join(', ')}.`);
  return element.edges
    .map((e): AbsorptionEdge => {
      const step = pair(e.stepIntervalEv);
      const table = pair(e.tableStepEv);
      return {
        label: `${element.symbol} ${e.shell}`,
        shell: e.shell,
        energyEv: e.energyEv,
        source: e.source as EdgeSource,
        ...(e.energySigmaEv !== undefined ? { energySigmaEv: e.energySigmaEv } : {}),
        ...(step ? { stepIntervalEv: step } : {}),
        ...(table ? { tableStepEv: table } : {}),
        xraylib: e.xraylib.map((x) => ({ ...x })),
      };
    })
    .sort((a, b) => a.energyEv - b.energyEv);
}

/** The edges a foil of this material shows in a spectrum: the steps of its Henke-based table, by energy. */
export function transmissionStepEdges(material: string): AbsorptionEdge[] {
  return absorptionEdges(material).filter((e) => e.source !== 'xraylib');
}

/** Materials with a tabulated foil transmission (Henke-based). */
export function knownFilterMaterials(): string[] {
  return [...filterTables.values()].map((f) => f.material);
}

/** Tabulated thickness of a material's reference foil, nm. */
export function filterReferenceThicknessNm(material: string): number {
  return filterTable(material).thicknessNm;
}

/** The tabulated transmission of a material's reference foil (Henke-based, 15-300 eV every 1 eV). */
export function filterTable(material: string): FilterTable {
  const t = filterTables.get(material.trim().toLowerCase());
  if (!t) throw new EngineError('invalid_input', `No transmission table for filter material "${material}"; known: ${knownFilterMaterials().join(', ')}.`);
  return t;
}

/**
 * A filter as written in a calibration's `filters` list: "Al", "Al 200nm", "Al:150", "Zr 0.2um".
 * Thickness defaults to the tabulated foil's.
 */
export function parseFilterSpec(spec: string): { material: string; thicknessNm: number } {
  const m = /^\s*([A-Za-z]{1,2})\s*(?:[:\s-]\s*([0-9]*\.?[0-9]+)\s*(nm|um|µm)?)?\s*$/.exec(spec);
  if (!m) throw new EngineError('invalid_input', `Cannot read filter "${spec}"; write e.g. "Al", "Al 200nm" or "Zr:150".`);
  const material = filterTable(m[1]).material;
  if (m[2] === undefined) return { material, thicknessNm: filterReferenceThicknessNm(material) };
  const value = Number(m[2]);
  return { material, thicknessNm: m[3] === 'um' || m[3] === 'µm' ? value * 1000 : value };
}

/**
 * The edges the given filters show inside [eMinEv, eMaxEv] (their transmission steps, see
 * transmissionStepEdges), by energy; unknown elements are refused.
 */
export function filterEdgeEnergiesInRange(materials: readonly string[], eMinEv: number, eMaxEv: number): FilterEdge[] {
  const out: FilterEdge[] = [];
  for (const material of materials) {
    const symbol = edgeTable.get(material.trim().toLowerCase())?.symbol ?? material;
    for (const edge of transmissionStepEdges(material)) if (edge.energyEv >= eMinEv && edge.energyEv <= eMaxEv) out.push({ ...edge, material: symbol });
  }
  return out.sort((a, b) => a.energyEv - b.energyEv);
}

/** Driver-laser presets (nominal wavelength and typical tolerance; common practice). */
export function driverPresets(): DriverPreset[] {
  return drivers.presets.map((p) => ({ ...p }));
}
