/**
 * Reference data for calibration: absorption edges (xraylib 4.0.0), Henke-based filter
 * transmissions of free-standing foils, and driver-laser presets. The numbers live in
 * calibration-data/*.json, each file naming its source (see calibration-data/README.md).
 */
import drivers from '../../calibration-data/drivers.json';
import edges from '../../calibration-data/edges.json';
import filters from '../../calibration-data/filters.json';
import { EngineError } from './errors.ts';

export interface AbsorptionEdge {
  /** e.g. "Al L3". */
  label: string;
  shell: string;
  energyEv: number;
}

export interface FilterEdge extends AbsorptionEdge {
  material: string;
}

export interface DriverPreset {
  id: string;
  label: string;
  wavelengthNm: number;
  /** Typical 1-σ spread of the centre wavelength (common practice, not a specification). */
  toleranceNm: number;
  provenance: string;
}

interface FilterTable {
  material: string;
  thicknessNm: number;
  energyEv: number[];
  logT: Float64Array;
}

const SMALLEST_T = 1e-300;

const filterTables = new Map<string, FilterTable>(
  filters.filters.map((f) => [
    f.material.toLowerCase(),
    { material: f.material, thicknessNm: f.thicknessNm, energyEv: f.energyEv, logT: Float64Array.from(f.transmission, (t) => Math.log(Math.max(t, SMALLEST_T))) },
  ]),
);

const edgeTable = new Map(edges.elements.map((e) => [e.symbol.toLowerCase(), e]));

/** Absorption edges of an element between 10 and 600 eV (xraylib 4.0.0 EdgeEnergy), by energy. */
export function absorptionEdges(material: string): AbsorptionEdge[] {
  const element = edgeTable.get(material.trim().toLowerCase());
  if (!element) throw new EngineError('invalid_input', `No absorption edges tabulated for "${material}"; known: ${[...edgeTable.values()].map((e) => e.symbol).join(', ')}.`);
  return element.edges
    .map((e) => ({ label: `${element.symbol} ${e.shell}`, shell: e.shell, energyEv: e.energyEv }))
    .sort((a, b) => a.energyEv - b.energyEv);
}

/** Materials with a tabulated foil transmission (Henke-based). */
export function knownFilterMaterials(): string[] {
  return [...filterTables.values()].map((f) => f.material);
}

/** Tabulated thickness of a material's reference foil, nm. */
export function filterReferenceThicknessNm(material: string): number {
  return table(material).thicknessNm;
}

function table(material: string): FilterTable {
  const t = filterTables.get(material.trim().toLowerCase());
  if (!t) throw new EngineError('invalid_input', `No transmission table for filter material "${material}"; known: ${knownFilterMaterials().join(', ')}.`);
  return t;
}

/**
 * Transmission of a free-standing foil at `energyEv`: linear interpolation of ln T between the
 * tabulated 1 eV steps (ln T ∝ μ, which varies smoothly away from edges), then Beer–Lambert
 * rescaling from the tabulated thickness t0: T(t) = T(t0)^(t/t0). NaN outside the table's
 * 15-300 eV. Indicative only below ~30 eV and within ~10 eV of edges (Henke tables).
 */
export function filterTransmission(material: string, energyEv: number, thicknessNm?: number): number {
  const t = table(material);
  const thickness = thicknessNm ?? t.thicknessNm;
  if (!(thickness >= 0)) throw new EngineError('invalid_input', `Filter thickness must be ≥ 0 nm, got ${thicknessNm}.`);
  const e = t.energyEv;
  if (!(energyEv >= e[0] && energyEv <= e[e.length - 1])) return Number.NaN;
  // The grid is uniform (1 eV) but search anyway so a future table with another step still works.
  let lo = 0;
  let hi = e.length - 1;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if (e[mid] <= energyEv) lo = mid;
    else hi = mid;
  }
  const f = e[hi] === e[lo] ? 0 : (energyEv - e[lo]) / (e[hi] - e[lo]);
  const logT = t.logT[lo] + f * (t.logT[hi] - t.logT[lo]);
  return Math.exp(logT * (thickness / t.thicknessNm));
}

/**
 * A filter as written in a calibration's `filters` list: "Al", "Al 200nm", "Al:150", "Zr 0.2um".
 * Thickness defaults to the tabulated foil's.
 */
export function parseFilterSpec(spec: string): { material: string; thicknessNm: number } {
  const m = /^\s*([A-Za-z]{1,2})\s*(?:[:\s-]\s*([0-9]*\.?[0-9]+)\s*(nm|um|µm)?)?\s*$/.exec(spec);
  if (!m) throw new EngineError('invalid_input', `Cannot read filter "${spec}"; write e.g. "Al", "Al 200nm" or "Zr:150".`);
  const material = table(m[1]).material;
  if (m[2] === undefined) return { material, thicknessNm: filterReferenceThicknessNm(material) };
  const value = Number(m[2]);
  return { material, thicknessNm: m[3] === 'um' || m[3] === 'µm' ? value * 1000 : value };
}

/** Edges of the given elements inside [eMinEv, eMaxEv], by energy; unknown elements are refused. */
export function filterEdgeEnergiesInRange(materials: readonly string[], eMinEv: number, eMaxEv: number): FilterEdge[] {
  const out: FilterEdge[] = [];
  for (const material of materials) {
    const symbol = edgeTable.get(material.trim().toLowerCase())?.symbol ?? material;
    for (const edge of absorptionEdges(material)) if (edge.energyEv >= eMinEv && edge.energyEv <= eMaxEv) out.push({ ...edge, material: symbol });
  }
  return out.sort((a, b) => a.energyEv - b.energyEv);
}

/** Driver-laser presets (nominal wavelength and typical tolerance; common practice). */
export function driverPresets(): DriverPreset[] {
  return drivers.presets.map((p) => ({ ...p }));
}
