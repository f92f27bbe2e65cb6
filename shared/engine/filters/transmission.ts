/**
 * Transmission of filter foils: the one function behind the assigner's filter model, the
 * simulator's filters, and apply's filter correction (which the client shows). Data: the
 * Henke-based tables of calibration-data/filters.json through references.ts.
 *
 * - Between the 1 eV table points, ln T is interpolated linearly (ln T = −μ·t, and μ varies
 *   smoothly away from edges).
 * - Across a sharp edge — a Henke f2 step narrower than the 1 eV grid (Mg, Al, Si L2,3; Ti M2,3;
 *   Sn N4,5 in edges.json) — each side is continued linearly in ln T from its own two nearest
 *   points up to the edge energy, where T steps. Interpolating across the interval instead would
 *   smear a step that Henke puts within 0.2 eV over the whole eV (Al 200 nm at 72.5 eV: 0.20
 *   instead of 0.73), and the step would not sit at the edge energy the product uses.
 * - Thickness: Beer–Lambert, T(t) = T(t0)^(t/t0) from the tabulated foil t0.
 * - Out of range: below the tables' first energy (15 eV) or above their last (300 eV) the
 *   nearest tabulated value is held. Every caller needs a finite number (the simulator renders,
 *   the assigner scores, apply corrects), and holding is the smallest assumption that keeps T
 *   continuous at the table ends; it is wrong across an edge beyond them (Zr M3 at 330 eV in
 *   xraylib, the Al plasma edge near 15 eV), so apply counts and reports the pixels it corrected
 *   with a held value (`isTabulatedEnergy`). An energy that is not a finite positive number (a
 *   pixel a map gives no wavelength) gives NaN.
 */
import { EngineError } from '../errors.ts';
import { filterTable, knownFilterMaterials, parseFilterSpec, transmissionStepEdges } from '../references.ts';

/** A foil in the beam; thickness defaults to the tabulated foil's. */
export interface Foil {
  material: string;
  thicknessNm?: number;
}

/** A sharp step inside grid interval k = [E_k, E_k+1]. */
interface SharpStep {
  k: number;
  energyEv: number;
}

interface PreparedTable {
  material: string;
  thicknessNm: number;
  energyEv: readonly number[];
  lnT: Float64Array;
  /** Grid spacing when uniform (the tables are every 1 eV), else 0 (then a binary search). */
  uniformStepEv: number;
  steps: SharpStep[];
}

/** ln of the smallest transmission kept: the tables hold values down to ~1e-14, never 0. */
const SMALLEST_T = 1e-300;

function prepare(material: string): PreparedTable {
  const t = filterTable(material);
  const e = t.energyEv;
  const lnT = Float64Array.from(t.transmission, (v) => Math.log(Math.max(v, SMALLEST_T)));
  const step = e[1] - e[0];
  const uniform = e.every((x, i) => i === 0 || Math.abs(x - e[i - 1] - step) < 1e-9) ? step : 0;
  const steps: SharpStep[] = [];
  for (const edge of transmissionStepEdges(t.material)) {
    const interval = edge.stepIntervalEv;
    if (!interval) continue;
    const k = e.findIndex((x, i) => i + 1 < e.length && x <= interval[0] && interval[1] <= e[i + 1]);
    // An edge needs a neighbour on each side to continue from; a step wider than the grid is
    // resolved by the table itself (Zr M5) and plain interpolation is right there.
    if (k >= 1 && k + 2 < e.length) steps.push({ k, energyEv: edge.energyEv });
  }
  return { material: t.material, thicknessNm: t.thicknessNm, energyEv: e, lnT, uniformStepEv: uniform, steps };
}

const prepared = new Map<string, PreparedTable>();

function tableFor(material: string): PreparedTable {
  const key = material.trim().toLowerCase();
  let t = prepared.get(key);
  if (!t) {
    t = prepare(material);
    prepared.set(key, t);
  }
  return t;
}

/** The photon-energy range every table covers, eV ([15, 300] for calibration-data/filters.json). */
export const TABULATED_RANGE_EV: readonly [number, number] = (() => {
  let lo = Number.NEGATIVE_INFINITY;
  let hi = Number.POSITIVE_INFINITY;
  for (const m of knownFilterMaterials()) {
    const e = filterTable(m).energyEv;
    lo = Math.max(lo, e[0]);
    hi = Math.min(hi, e[e.length - 1]);
  }
  return [lo, hi] as const;
})();

/** True when `energyEv` lies inside the tables (no held value is used there). */
export function isTabulatedEnergy(energyEv: number): boolean {
  return energyEv >= TABULATED_RANGE_EV[0] && energyEv <= TABULATED_RANGE_EV[1];
}

/** Index k of the grid interval [E_k, E_k+1] holding `energyEv` (inside the table). */
function intervalIndex(t: PreparedTable, energyEv: number): number {
  const e = t.energyEv;
  const last = e.length - 2;
  if (t.uniformStepEv > 0) return Math.min(last, Math.max(0, Math.floor((energyEv - e[0]) / t.uniformStepEv)));
  let lo = 0;
  let hi = e.length - 1;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if (e[mid] <= energyEv) lo = mid;
    else hi = mid;
  }
  return Math.min(lo, last);
}

/** ln T of the tabulated foil at `energyEv` (inside the table). */
function lnTransmissionTabulated(t: PreparedTable, energyEv: number): number {
  const e = t.energyEv;
  const L = t.lnT;
  const k = intervalIndex(t, energyEv);
  for (const s of t.steps) {
    if (s.k !== k) continue;
    if (energyEv < s.energyEv) return L[k] + ((energyEv - e[k]) * (L[k] - L[k - 1])) / (e[k] - e[k - 1]);
    return L[k + 1] - ((e[k + 1] - energyEv) * (L[k + 2] - L[k + 1])) / (e[k + 2] - e[k + 1]);
  }
  const f = (energyEv - e[k]) / (e[k + 1] - e[k]);
  return L[k] + f * (L[k + 1] - L[k]);
}

function checkThickness(material: string, thicknessNm: number | undefined): void {
  if (thicknessNm !== undefined && !(Number.isFinite(thicknessNm) && thicknessNm >= 0)) {
    throw new EngineError('invalid_input', `Filter thickness must be a finite number ≥ 0 nm, got ${thicknessNm} for ${material}.`);
  }
}

/**
 * Transmission of one free-standing foil at photon energy `energyEv` (first-order energy of the
 * light that crosses it). Unknown materials and negative thicknesses throw EngineError.
 */
export function foilTransmission(material: string, energyEv: number, thicknessNm?: number): number {
  const t = tableFor(material);
  checkThickness(t.material, thicknessNm);
  if (!(Number.isFinite(energyEv) && energyEv > 0)) return Number.NaN;
  const e = t.energyEv;
  const lnT = energyEv <= e[0] ? t.lnT[0] : energyEv >= e[e.length - 1] ? t.lnT[e.length - 1] : lnTransmissionTabulated(t, energyEv);
  const thickness = thicknessNm ?? t.thicknessNm;
  return thickness === 0 ? 1 : Math.exp(lnT * (thickness / t.thicknessNm));
}

/** Product of the foils' transmissions at `energyEv` (foils in series multiply). */
export function stackTransmission(foils: readonly Foil[], energyEv: number): number {
  let product = 1;
  for (const f of foils) product *= foilTransmission(f.material, energyEv, f.thicknessNm);
  return product;
}

/**
 * A foil as callers write it: "Al", "Al 200nm", "Al:150", "Zr 0.2um", or { material, thicknessNm }.
 * Unknown materials and bad thicknesses throw EngineError naming them.
 */
export function toFoil(spec: string | Foil): Foil {
  if (typeof spec === 'string') return parseFilterSpec(spec);
  const material = tableFor(spec.material).material;
  checkThickness(material, spec.thicknessNm);
  return spec.thicknessNm === undefined ? { material } : { material, thicknessNm: spec.thicknessNm };
}

/** T(E) of a stack given as specs, checked once. */
export function stackTransmissionFn(specs: readonly (string | Foil)[]): (energyEv: number) => number {
  const foils = specs.map(toFoil);
  if (foils.length === 0) return () => 1;
  return (energyEv) => stackTransmission(foils, energyEv);
}
