// Filters in the simulator. Edge energies: calibration-data/edges.json through references.ts
// absorptionEdges (Al L2,3 = 72.7 eV, where the Henke f2 steps at 72.6-72.8 eV:
// /work/shared/reference/README.md, "Caution on edge energies"). Transmission:
// calibration-data/filters.json (Henke, Gullikson & Davis 1993 via periodictable 1.6.0), whose
// 200 nm Al foil falls from 0.735 at 72 eV to 0.029 at 73 eV (shared/reference/README.md).
import { describe, expect, it } from 'vitest';
import { HC_EV_NM } from '../../../shared/engine/constants.ts';
import { absorptionEdges } from '../../../shared/engine/references.ts';
import { filterStackTransmission, simulateFrame, steepestEdgeEv } from '../../../shared/engine/simulate/index.ts';
import { baseScenario, lineout, windowSum } from './helpers.ts';

const alEdgeEv = absorptionEdges('Al').find((e) => e.shell === 'L2,3')!.energyEv;

describe('filters cut the comb at the edge energy', () => {
  it('the edge file gives Al L2,3 at 72.7 eV (the Henke step, 72.6-72.8 eV)', () => {
    expect(alEdgeEv).toBeCloseTo(72.7, 1);
  });

  it('200 nm Al: rendered lines above the L edge are attenuated > 10x, lines below pass', () => {
    // 800 nm × (1 − 0.5 %) harmonics 1.558 eV apart: q = 45 (70.1 eV) below, q ≥ 47 (73.2 eV) above.
    const open = baseScenario({}, 46);
    const filtered = baseScenario({ filters: [{ material: 'Al', thicknessNm: 200 }] }, 46);
    const a = simulateFrame(open, 7);
    const b = simulateFrame(filtered, 7);
    const sumA = lineout(a.frame, 'x', 0, a.frame.height, 100);
    const sumB = lineout(b.frame, 'x', 0, b.frame.height, 100);
    let above = 0;
    let below = 0;
    for (const line of a.truth.lines) {
      if (line.pixel < 12 || line.pixel > 1011 || a.truth.lines.some((o) => o !== line && Math.abs(o.pixel - line.pixel) < 24)) continue;
      const ratio = windowSum(sumB, line.pixel - 10, line.pixel + 10) / windowSum(sumA, line.pixel - 10, line.pixel + 10);
      if (line.energyEv > alEdgeEv + 1) {
        expect(ratio).toBeLessThan(0.1);
        above += 1;
      } else if (line.energyEv > 30 && line.energyEv < alEdgeEv - 1) {
        expect(ratio).toBeGreaterThan(0.6);
        below += 1;
      }
    }
    expect(above).toBeGreaterThanOrEqual(2);
    expect(below).toBeGreaterThanOrEqual(2);
  });

  it('Beer–Lambert: two 100 nm foils transmit as one 200 nm foil', () => {
    for (const e of [40, 60, 80, 150]) {
      const two = filterStackTransmission([{ material: 'Zr', thicknessNm: 100 }, { material: 'Zr', thicknessNm: 100 }], e);
      const one = filterStackTransmission([{ material: 'Zr', thicknessNm: 200 }], e);
      expect(two / one).toBeCloseTo(1, 9);
    }
  });

  it('the steepest drop of the Al table lies at the tabulated edge', () => {
    const edge = steepestEdgeEv([{ material: 'Al', thicknessNm: 200 }], 60, 90);
    expect(Math.abs(edge - alEdgeEv)).toBeLessThan(1);
  });

  it('a continuum behind the filter shows the edge where the comb is cut', () => {
    const scenario = baseScenario({
      envelope: { plateauPhotons: 0, cutoffHarmonic: 80 },
      continuum: { photonsPerPixel: 400, spatialFwhmPx: 60 },
      filters: [{ material: 'Al', thicknessNm: 200 }],
    }, 46);
    const { frame, truth } = simulateFrame(scenario, 3);
    const sum = lineout(frame, 'x', truth.signal.start, truth.signal.end, 100);
    // Smooth over 5 px, then find the steepest fall towards higher energy.
    let best = 0;
    let bestPixel = -1;
    for (let p = 5; p < sum.length - 5; p += 1) {
      const eHere = HC_EV_NM / truth.wavelengthNmAtPixel[p];
      const left = windowSum(sum, p - 5, p - 1);
      const right = windowSum(sum, p + 1, p + 5);
      // Wavelength increases with pixel here, so energy falls with pixel: the edge is a rise to the right.
      const step = right - left;
      if (eHere > 40 && eHere < 110 && step > best) {
        best = step;
        bestPixel = p;
      }
    }
    const edgeEv = HC_EV_NM / truth.wavelengthNmAtPixel[bestPixel];
    expect(Math.abs(edgeEv - alEdgeEv)).toBeLessThan(1);
  });

  it('the continuum passes the spectrometer like the lines: the edge is a step of the line width, centred where the true map gives the edge energy', () => {
    const lineFwhmPx = 4;
    const scenario = baseScenario({
      envelope: { plateauPhotons: 0, cutoffHarmonic: 80 },
      continuum: { photonsPerPixel: 1e6, spatialFwhmPx: 60 },
      filters: [{ material: 'Al', thicknessNm: 200 }],
      readNoiseCounts: 0,
      lineFwhmPx,
    }, 46);
    const { frame, truth } = simulateFrame(scenario, 3);
    const sum = lineout(frame, 'x', 0, frame.height, 100);
    const energy = (p: number): number => HC_EV_NM / truth.wavelengthNmAtPixel[p];
    // Pixel of the edge energy on the true map (energy falls with pixel here), interpolated.
    let edgePx = Number.NaN;
    for (let p = 1; p < sum.length; p += 1) if (energy(p - 1) >= alEdgeEv && energy(p) < alEdgeEv) edgePx = p - 1 + (energy(p - 1) - alEdgeEv) / (energy(p - 1) - energy(p));
    const k = Math.round(edgePx);
    const low = sum[k - 12];
    const high = sum[k + 12];
    // Where the lineout crosses a level between its values 12 px either side, interpolated.
    const crossing = (level: number): number => {
      for (let p = k - 12; p < k + 12; p += 1) if (sum[p] <= level && sum[p + 1] > level) return p + (level - sum[p]) / (sum[p + 1] - sum[p]);
      return Number.NaN;
    };
    expect(Math.abs(crossing(low + 0.5 * (high - low)) - edgePx)).toBeLessThan(0.15);
    // A Gaussian-blurred step rises from 10 % to 90 % over 2.563 σ (common practice); pixel
    // integration adds 1/12 px² to σ².
    const sigmaPx = Math.sqrt((lineFwhmPx / (2 * Math.sqrt(2 * Math.LN2))) ** 2 + 1 / 12);
    const rise = crossing(low + 0.9 * (high - low)) - crossing(low + 0.1 * (high - low));
    expect(rise / (2.563 * sigmaPx)).toBeGreaterThan(0.85);
    expect(rise / (2.563 * sigmaPx)).toBeLessThan(1.15);
  });
});
