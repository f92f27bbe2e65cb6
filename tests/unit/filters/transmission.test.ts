/**
 * The engine's one filter transmission (shared/engine/filters/transmission.ts) against the
 * Henke-based reference table it is built from: T(E) of free-standing foils, Henke, Gullikson &
 * Davis, At. Data Nucl. Data Tables 54, 181 (1993) via periodictable 1.6.0 (fixture
 * tests/fixtures/reference/xray/filters.json, copied from /work/shared/reference; its README:
 * Al 200 nm falls from 0.735 at 72 eV to 0.029 at 73 eV). Edge energies: calibration-data/edges.json
 * (the Henke f2 steps, checked in tests/unit/references/edge-energies.test.ts).
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { stackTransmission as assignerStack } from '../../../shared/engine/assign/filters.ts';
import { foilTransmission, isTabulatedEnergy, stackTransmission, stackTransmissionFn, TABULATED_RANGE_EV, toFoil } from '../../../shared/engine/filters/transmission.ts';
import { filterReferenceThicknessNm, knownFilterMaterials, transmissionStepEdges } from '../../../shared/engine/references.ts';
import { filterStackTransmission } from '../../../shared/engine/simulate/index.ts';

interface Table {
  material: string;
  thicknessNm: number;
  energyEv: number[];
  transmission: number[];
}
const tables = (JSON.parse(readFileSync(new URL('../../fixtures/reference/xray/filters.json', import.meta.url), 'utf8')) as { filters: Table[] }).filters;
const table = (m: string): Table => tables.find((t) => t.material === m)!;
/** Tabulated T at a grid energy of the fixture. */
const at = (m: string, e: number): number => table(m).transmission[table(m).energyEv.indexOf(e)];

describe('inside the tables', () => {
  it('Al 200 nm: 0.735 at 72 eV, 0.029 at 73 eV (reference README)', () => {
    expect(foilTransmission('Al', 72)).toBeCloseTo(0.735, 3);
    expect(foilTransmission('Al', 73)).toBeCloseTo(0.029, 3);
  });

  it('reproduces every tabulated point of every foil', () => {
    for (const f of tables) {
      f.energyEv.forEach((e, i) => {
        expect(Math.abs(foilTransmission(f.material, e) - f.transmission[i]) / f.transmission[i]).toBeLessThan(1e-9);
      });
    }
  });

  it('interpolates ln T linearly between table points away from edges (Zr at 100.5 eV: the geometric mean of 100 and 101)', () => {
    expect(foilTransmission('Zr', 100.5)).toBeCloseTo(Math.sqrt(at('Zr', 100) * at('Zr', 101)), 12);
  });

  it('a step wider than the grid is the table’s own (Zr M5, f2 step 176.3-178.8 eV): plain interpolation', () => {
    expect(foilTransmission('Zr', 177.5)).toBeCloseTo(Math.sqrt(at('Zr', 177) * at('Zr', 178)), 12);
  });

  const sharp = ['Mg', 'Al', 'Si', 'Ti', 'Sn'].map((m) => [m, transmissionStepEdges(m).find((e) => e.source === 'henke-f2-step')!] as const);
  it.each(sharp)('%s: a sharp edge steps at its edge energy, each side continued from its own neighbours', (m, edge) => {
    const es = edge.energyEv;
    const k = Math.floor(es);
    const below = es - 0.05;
    const above = es + 0.05;
    // Pre-edge: ln T continued from (k − 1, k); post-edge: from (k + 1, k + 2).
    const lnBelow = Math.log(at(m, k)) + (below - k) * (Math.log(at(m, k)) - Math.log(at(m, k - 1)));
    const lnAbove = Math.log(at(m, k + 1)) - (k + 1 - above) * (Math.log(at(m, k + 2)) - Math.log(at(m, k + 1)));
    expect(foilTransmission(m, below)).toBeCloseTo(Math.exp(lnBelow), 10);
    expect(foilTransmission(m, above)).toBeCloseTo(Math.exp(lnAbove), 10);
    // The steepest fall of T on a 0.01 eV scan of the interval is at the edge energy.
    let bestEv = Number.NaN;
    let bestFall = 0;
    for (let e = k; e + 0.01 <= k + 1 + 1e-9; e += 0.01) {
      const fall = Math.log(foilTransmission(m, e)) - Math.log(foilTransmission(m, e + 0.01));
      if (fall > bestFall) {
        bestFall = fall;
        bestEv = e + 0.005;
      }
    }
    expect(Math.abs(bestEv - es)).toBeLessThan(0.011);
  });

  it('Al at 72.5 eV, below the 72.7 eV edge, still passes like the pre-edge foil (plain interpolation would give 0.20)', () => {
    expect(foilTransmission('Al', 72.5)).toBeGreaterThan(0.73);
    expect(foilTransmission('Al', 72.5)).toBeLessThan(0.7345);
    expect(foilTransmission('Al', 72.9)).toBeLessThan(0.03);
  });

  it('Beer–Lambert: twice the thickness squares T; thicknesses add', () => {
    for (const material of knownFilterMaterials()) {
      const t0 = filterReferenceThicknessNm(material);
      for (const e of [30, 60.5, 72.65, 95, 150, 250, 10, 420]) {
        const t = foilTransmission(material, e);
        expect(foilTransmission(material, e, 2 * t0)).toBeCloseTo(t * t, 12);
        const a = foilTransmission(material, e, 70);
        const b = foilTransmission(material, e, 45);
        expect(Math.abs(a * b - foilTransmission(material, e, 115)) / (a * b)).toBeLessThan(1e-12);
        expect(foilTransmission(material, e, 0)).toBe(1);
        expect(stackTransmission([{ material, thicknessNm: 70 }, { material, thicknessNm: 45 }], e)).toBeCloseTo(foilTransmission(material, e, 115), 12);
      }
    }
  });
});

describe('outside the tables: the nearest tabulated value is held', () => {
  it('the tables cover 15-300 eV', () => {
    expect(TABULATED_RANGE_EV).toEqual([15, 300]);
    expect([14.99, 15, 300, 300.01].map(isTabulatedEnergy)).toEqual([false, true, true, false]);
  });

  it.each(knownFilterMaterials())('%s holds T(15 eV) below and T(300 eV) above, thickness-scaled', (m) => {
    expect(foilTransmission(m, 10)).toBe(foilTransmission(m, 15));
    expect(foilTransmission(m, 0.5)).toBe(foilTransmission(m, 15));
    expect(foilTransmission(m, 301)).toBe(foilTransmission(m, 300));
    expect(foilTransmission(m, 5000)).toBe(foilTransmission(m, 300));
    expect(foilTransmission(m, 10)).toBeCloseTo(at(m, 15), 12);
    expect(foilTransmission(m, 400)).toBeCloseTo(at(m, 300), 12);
    const t0 = table(m).thicknessNm;
    expect(foilTransmission(m, 350, 3 * t0)).toBeCloseTo(at(m, 300) ** 3, 12);
  });

  it('an energy that is not a finite positive number has no transmission (NaN)', () => {
    for (const e of [Number.NaN, 0, -5, Number.POSITIVE_INFINITY]) expect(foilTransmission('Al', e)).toBeNaN();
  });
});

describe('one function for every caller', () => {
  it('the assigner and the simulator get exactly this function, in and out of the tables', () => {
    const assigner = assignerStack(['Al 150nm', { material: 'Zr', thicknessNm: 100 }]);
    for (const e of [8, 15, 49.5, 72.65, 72.75, 99.9, 177.2, 300, 340]) {
      const expected = foilTransmission('Al', e, 150) * foilTransmission('Zr', e, 100);
      expect(assigner(e)).toBe(expected);
      expect(filterStackTransmission([{ material: 'Al', thicknessNm: 150 }, { material: 'Zr', thicknessNm: 100 }], e)).toBe(expected);
      expect(stackTransmissionFn(['Al:150', 'Zr 0.1um'])(e)).toBe(expected);
    }
  });

  it('refuses unknown materials and bad thicknesses by name', () => {
    expect(() => foilTransmission('Unobtainium', 50)).toThrow(/No transmission table for filter material "Unobtainium"/);
    expect(() => foilTransmission('Al', 50, -10)).toThrow('Filter thickness must be a finite number ≥ 0 nm, got -10 for Al.');
    expect(() => toFoil({ material: 'Al', thicknessNm: Number.NaN })).toThrow(/got NaN for Al/);
    expect(() => stackTransmissionFn(['Xx 200nm'])).toThrow(/No transmission table for filter material "Xx"/);
    expect(toFoil({ material: 'al' })).toEqual({ material: 'Al' });
  });
});
