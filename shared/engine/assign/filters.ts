/**
 * Transmission of the filter stack named in the assignment input, as one function of photon
 * energy, from the project's reference tables (references.ts; Henke-based foil transmissions).
 * Foils multiply (Beer–Lambert per foil). Outside the tables' 15–300 eV the end values are held:
 * the assigner needs a number everywhere, and the table ends are far from the common edges.
 */
import { filterTransmission, parseFilterSpec } from '../references.ts';
import type { FilterSpec } from './types.ts';

const TABLE_MIN_EV = 15;
const TABLE_MAX_EV = 300;

export interface ParsedFilter {
  material: string;
  thicknessNm?: number;
}

/** "Al", "Al 200nm", "Al:150", "Zr 0.2um" or { material, thicknessNm }; throws EngineError for unknown materials. */
export function parseFilter(spec: FilterSpec): ParsedFilter {
  if (typeof spec !== 'string') {
    filterTransmission(spec.material, 50, spec.thicknessNm);
    return { material: spec.material, thicknessNm: spec.thicknessNm };
  }
  return parseFilterSpec(spec);
}

/** Stack transmission T(E). */
export function stackTransmission(filters: readonly FilterSpec[]): (energyEv: number) => number {
  const parsed = filters.map(parseFilter);
  if (parsed.length === 0) return () => 1;
  return (energyEv: number) => {
    const e = Math.min(Math.max(energyEv, TABLE_MIN_EV), TABLE_MAX_EV);
    let t = 1;
    for (const f of parsed) t *= filterTransmission(f.material, e, f.thicknessNm);
    return t;
  };
}
