// The scenario generator: classes, determinism, physical consistency of what it claims.
import { describe, expect, it } from 'vitest';
import { HC_EV_NM } from '../../../shared/engine/constants.ts';
import { absorptionEdges } from '../../../shared/engine/references.ts';
import { generateScenario, generateScenarios, SCENARIO_CLASSES, scenarioProfile, simulateFrame } from '../../../shared/engine/simulate/index.ts';
import { EngineError } from '../../../shared/engine/errors.ts';

const sizes: [number, number][] = [
  [1024, 256],
  [512, 512],
];
const list = generateScenarios(SCENARIO_CLASSES.length * 2, 2026, { sizes });

describe('generateScenarios', () => {
  it('produces every requested class, tagged, with ids unique', () => {
    expect(new Set(list.map((s) => s.class))).toEqual(new Set(SCENARIO_CLASSES));
    expect(new Set(list.map((s) => s.id)).size).toBe(list.length);
    for (const s of list) expect(s.decidable).toBe(!s.class.startsWith('undecidable'));
  });

  it('is deterministic from its seed; a longer list starts with the shorter one', () => {
    const again = generateScenarios(SCENARIO_CLASSES.length * 2, 2026, { sizes });
    expect(JSON.stringify(again)).toBe(JSON.stringify(list));
    const longer = generateScenarios(SCENARIO_CLASSES.length * 2 + 3, 2026, { sizes });
    expect(JSON.stringify(longer.slice(0, list.length))).toBe(JSON.stringify(list));
    const other = generateScenarios(SCENARIO_CLASSES.length * 2, 2027, { sizes });
    expect(JSON.stringify(other)).not.toBe(JSON.stringify(list));
  });

  it('keeps the requested classes only', () => {
    const only = generateScenarios(4, 1, { classes: ['ni-vuv-low-orders'], sizes });
    expect(only.every((s) => s.class === 'ni-vuv-low-orders')).toBe(true);
    expect(() => generateScenario('no-such-class' as never, 1)).toThrow(EngineError);
  });

  it('every decidable scenario renders ≥ 3 visible first-order lines; undecidable two-line cases show exactly 2', () => {
    for (const s of list) {
      const { truth } = simulateFrame(s, 1);
      const visible = truth.lines.filter((l) => l.visible && l.diffractionOrder === 1);
      if (s.decidable) expect(visible.length, s.id).toBeGreaterThanOrEqual(3);
      if (s.class === 'undecidable-two-lines') expect(truth.lines.filter((l) => l.visible).length, s.id).toBe(2);
    }
  });

  it('drivers are blue-shifted within tolerance and the nominal profile is a realignment away', () => {
    for (const s of list) {
      const { nominalNm, tolerancePercent, effectiveNm } = s.driver;
      expect(effectiveNm).toBeLessThanOrEqual(nominalNm);
      expect(effectiveNm).toBeGreaterThanOrEqual(nominalNm * (1 - tolerancePercent / 100));
      const p = scenarioProfile(s);
      const spectral = s.spectralAxis === 'x' ? s.width : s.height;
      expect(p.spectralAxis).toBe(s.spectralAxis);
      expect(p.pixelCount).toBe(spectral);
      expect(p.grooveDensityPerMm).toBe(s.geometry.grooveDensityPerMm);
      expect(Math.abs(p.incidenceAngleDeg - s.geometry.incidenceAngleDeg)).toBeLessThanOrEqual(0.5);
      expect(Math.abs(p.detectorDistanceMm / s.geometry.detectorDistanceMm - 1)).toBeLessThanOrEqual(0.03);
      expect(Math.abs((p.detectorCenterPixel ?? 0) - s.geometry.detectorCenterPixel)).toBeLessThanOrEqual(0.03 * spectral);
      expect(p.notes).toMatch(/Invented/);
      // A copy: editing it leaves the scenario alone.
      p.incidenceAngleDeg = 0;
      expect(s.profile.incidenceAngleDeg).not.toBe(0);
    }
  });

  it('grazing-incidence geometries sit at 85-88° and 235-470 mm, normal-incidence ones at 5-15° over 100-400 nm', () => {
    for (const s of list) {
      const g = s.geometry;
      if (s.class.startsWith('ni-')) {
        expect(g.incidenceAngleDeg).toBeGreaterThanOrEqual(5);
        expect(g.incidenceAngleDeg).toBeLessThanOrEqual(15);
        const nm = Array.from(simulateFrame(s, 1).truth.wavelengthNmAtPixel);
        expect(Math.min(...nm)).toBeGreaterThan(80);
        expect(Math.max(...nm)).toBeLessThan(400);
      } else {
        expect([1200, 2400]).toContain(g.grooveDensityPerMm);
        expect(g.incidenceAngleDeg).toBeGreaterThanOrEqual(85);
        expect(g.incidenceAngleDeg).toBeLessThanOrEqual(88);
        expect(g.detectorDistanceMm).toBeGreaterThanOrEqual(235);
        expect(g.detectorDistanceMm).toBeLessThanOrEqual(470);
      }
    }
  });

  it('filter-edge scenarios put a tabulated edge (calibration-data/edges.json) inside the detector range with lines on both sides', () => {
    const edged = generateScenarios(6, 99, { classes: ['gi-odd-filter-edge', 'gi-odd-continuum-edge'], sizes });
    for (const s of edged) {
      const material = s.filters![0].material;
      const { truth } = simulateFrame(s, 1);
      const energies = Array.from(truth.wavelengthNmAtPixel, (nm) => HC_EV_NM / nm);
      const lo = Math.min(...energies);
      const hi = Math.max(...energies);
      // The edge list gives the Henke steps of the same tables the simulator cuts the comb with (calibration-data/README.md).
      const inside = absorptionEdges(material).filter((e) => e.energyEv > lo - 3 && e.energyEv < hi + 3);
      expect(inside.length, `${s.id} ${material}`).toBeGreaterThan(0);
      const edgeEv = inside[0].energyEv;
      const first = truth.lines.filter((l) => l.diffractionOrder === 1);
      expect(first.some((l) => l.energyEv < edgeEv && l.visible)).toBe(true);
      expect(first.some((l) => l.energyEv > edgeEv)).toBe(true);
    }
  });

  it('undecidable comb cases allow a slipped labelling within the driver tolerance', () => {
    for (const s of list.filter((x) => x.class === 'undecidable-all-parity-comb' || x.class === 'undecidable-wide-tolerance')) {
      const { truth } = simulateFrame(s, 1);
      const q = Math.min(...truth.lines.filter((l) => l.visible).map((l) => l.harmonic));
      const step = s.parity === 'odd' ? 2 : 1;
      // Relabelling q → q ± step scales λ0 by (q ± step)/q; one of the two must stay inside
      // [nominal·(1 − tol), nominal], the range the user allows.
      const { nominalNm, tolerancePercent, effectiveNm } = s.driver;
      const inRange = (nm: number): boolean => nm <= nominalNm && nm >= nominalNm * (1 - tolerancePercent / 100);
      expect(inRange((effectiveNm * (q + step)) / q) || inRange((effectiveNm * (q - step)) / q), s.id).toBe(true);
    }
  });
});
