/**
 * Filter transmission for the simulator: the engine's one transmission
 * (../filters/transmission.ts over calibration-data/filters.json: Henke-based free-standing
 * foils, 15-300 eV, the nearest end value held outside, sharp steps at the tabulated edges).
 */
import { foilTransmission } from '../filters/transmission.ts';
import type { SimFilter } from './types.ts';

/** Transmission of one foil at one photon energy (the signature of filters/transmission.ts' foilTransmission). */
export type FilterTransmissionFn = (material: string, energyEv: number, thicknessNm?: number) => number;

/** The engine's foil transmission, the simulator's default source. */
export const referenceFilterTransmission: FilterTransmissionFn = foilTransmission;

/** Product of the transmissions of a stack of foils at `energyEv`. */
export function filterStackTransmission(
  filters: readonly SimFilter[],
  energyEv: number,
  transmission: FilterTransmissionFn = referenceFilterTransmission,
): number {
  let product = 1;
  for (const filter of filters) product *= transmission(filter.material, energyEv, filter.thicknessNm);
  return product;
}

/**
 * The energy (eV) in [loEv, hiEv] where the stack's transmission drops most steeply with rising
 * energy (largest fall of ln T per eV, on a 0.5 eV grid): where an edge cuts a comb.
 * NaN when nothing drops by more than a factor 2 over 1 eV.
 */
export function steepestEdgeEv(
  filters: readonly SimFilter[],
  loEv: number,
  hiEv: number,
  transmission: FilterTransmissionFn = referenceFilterTransmission,
): number {
  let bestEv = Number.NaN;
  let bestDrop = Math.log(2);
  for (let e = loEv; e + 1 <= hiEv; e += 0.5) {
    const drop = Math.log(Math.max(filterStackTransmission(filters, e, transmission), 1e-300)) -
      Math.log(Math.max(filterStackTransmission(filters, e + 1, transmission), 1e-300));
    if (drop > bestDrop) {
      bestDrop = drop;
      bestEv = e + 0.5;
    }
  }
  return bestEv;
}
