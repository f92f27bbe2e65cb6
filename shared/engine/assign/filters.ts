/**
 * The filter stack named in the assignment input as one function of photon energy: the
 * engine's one transmission (filters/transmission.ts, Henke-based tables, end values held
 * outside 15–300 eV, as documented there).
 */
import { stackTransmissionFn, toFoil } from '../filters/transmission.ts';
import type { FilterSpec } from './types.ts';

export interface ParsedFilter {
  material: string;
  thicknessNm?: number;
}

/** "Al", "Al 200nm", "Al:150", "Zr 0.2um" or { material, thicknessNm }; throws EngineError for unknown materials. */
export function parseFilter(spec: FilterSpec): ParsedFilter {
  return toFoil(spec);
}

/** Stack transmission T(E). */
export function stackTransmission(filters: readonly FilterSpec[]): (energyEv: number) => number {
  return stackTransmissionFn(filters);
}
