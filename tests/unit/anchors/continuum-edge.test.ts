/**
 * Filter edges located on a continuum, on frames rendered by the simulator's
 * 'gi-odd-continuum-edge' class (invented spectrometers; the truth is the simulator's grating
 * forward model, grating.ts). The edge energies are the Henke steps of calibration-data/edges.json
 * (checked against the Henke-based tables in tests/unit/references/edge-energies.test.ts).
 *
 * The provisional map is the true one with its scale off by up to ±0.6 % (a comb alone leaves the
 * scale uncertain by about the driver tolerance, a few tenths of a percent to a percent:
 * PRODUCT.md, domain notes). An honest 1σ holds the truth 68 % of the time and 2σ 95 %, so the
 * test asks for the truth within 2σ in ≥ 90 % of the frames and within 1σ in ≥ 60 % (an inflated σ
 * would pass the first and fail the second only if it also blew up: the median σ must stay under
 * 0.2 px).
 */
import { describe, expect, it } from 'vitest';
import { locateContinuumEdges, type LineAt } from '../../../shared/engine/anchors/index.ts';
import { HC_EV_NM } from '../../../shared/engine/constants.ts';
import { findPeaks } from '../../../shared/engine/peaks.ts';
import { reduceFrame } from '../../../shared/engine/reduce.ts';
import { transmissionStepEdges } from '../../../shared/engine/references.ts';
import { generateScenarios, simulateFrame, type SimScenario } from '../../../shared/engine/simulate/index.ts';
import type { Lineout } from '../../../shared/engine/types.ts';

/** Linear interpolation of the true first-order wavelengths, scaled by (1 + scaleError). */
function provisionalMap(trueNm: Float64Array, scaleError: number): (pixel: number) => number {
  return (p) => {
    const k = Math.min(trueNm.length - 2, Math.max(0, Math.floor(p)));
    const f = p - k;
    return (trueNm[k] * (1 - f) + trueNm[k + 1] * f) * (1 + scaleError);
  };
}

/** Pixel where the true map gives photon energy `energyEv`, interpolated. */
function truePixel(trueNm: Float64Array, energyEv: number): number {
  for (let p = 1; p < trueNm.length; p++) {
    const a = HC_EV_NM / trueNm[p - 1];
    const b = HC_EV_NM / trueNm[p];
    if ((a - energyEv) * (b - energyEv) <= 0) return p - 1 + (a - energyEv) / (a - b);
  }
  return Number.NaN;
}

/** Detected peaks, plus the first-order comb positions the (scaled) provisional hypothesis predicts. */
function linesFor(lineout: Lineout, trueNm: Float64Array, driverNm: number, scaleError: number): LineAt[] {
  const lines: LineAt[] = findPeaks(lineout).map((p) => ({ pixel: p.pixel, fwhmPx: p.fwhmPx }));
  const nm = Array.from(trueNm, (x) => x * (1 + scaleError));
  for (let q = 1; q < 400; q += 2) {
    const target = (driverNm * (1 + scaleError)) / q;
    for (let p = 1; p < nm.length; p++) {
      if ((nm[p - 1] - target) * (nm[p] - target) <= 0) {
        lines.push({ pixel: p - 1 + (nm[p - 1] - target) / (nm[p - 1] - nm[p]) });
        break;
      }
    }
  }
  return lines;
}

function run(s: SimScenario, seed: number, scaleError: number, filters = s.filters ?? []) {
  const { frame, truth } = simulateFrame(s, seed);
  const lineout = reduceFrame(frame, { spectralAxis: s.spectralAxis });
  const lines = linesFor(lineout, truth.wavelengthNmAtPixel, truth.effectiveDriverNm, scaleError);
  return { truth, result: locateContinuumEdges({ lineout, map: provisionalMap(truth.wavelengthNmAtPixel, scaleError), filters, lines }) };
}

const scaleErrors = [-0.006, -0.003, 0, 0.003, 0.006];

describe('an edge on a continuum is located at its true pixel', () => {
  it('in ≥ 90 % of 30 rendered frames within 2σ (≥ 60 % within 1σ), with the filter’s Henke step energy', () => {
    const scenarios = generateScenarios(30, 4242, { classes: ['gi-odd-continuum-edge'] });
    let within1 = 0;
    let within2 = 0;
    const sigmas: number[] = [];
    scenarios.forEach((s, i) => {
      const { truth, result } = run(s, 31 + i, scaleErrors[i % scaleErrors.length]);
      const material = s.filters![0].material;
      const step = transmissionStepEdges(material).find((e) => Math.abs(truePixel(truth.wavelengthNmAtPixel, e.energyEv) - result.edges[0]?.pixel) < 50);
      if (result.edges.length !== 1 || !step) return;
      const edge = result.edges[0];
      expect(edge).toMatchObject({ kind: 'filter-edge', material, edgeLabel: step.label, energyEv: step.energyEv, energySigmaEv: step.energySigmaEv });
      const error = Math.abs(edge.pixel - truePixel(truth.wavelengthNmAtPixel, edge.energyEv));
      if (error <= edge.pixelSigma) within1++;
      if (error <= 2 * edge.pixelSigma) within2++;
      sigmas.push(edge.pixelSigma);
    });
    expect(within2).toBeGreaterThanOrEqual(27);
    expect(within1).toBeGreaterThanOrEqual(18);
    sigmas.sort((a, b) => a - b);
    expect(sigmas[sigmas.length >> 1]).toBeLessThan(0.2);
  });
});

describe('no edge without a step to see', () => {
  it('reports none on frames without a continuum (the comb alone, cut by its filter)', () => {
    const scenarios = generateScenarios(12, 99, { classes: ['gi-odd-filter-edge'] });
    scenarios.forEach((s, i) => {
      const { result } = run(s, 7 + i, scaleErrors[i % scaleErrors.length]);
      expect(result.edges, s.id).toEqual([]);
      expect(result.searches.filter((x) => x.onDetector).length, s.id).toBeGreaterThan(0);
    });
  });

  it('reports none on a continuum without that filter in the beam, though the edge is searched for', () => {
    const scenarios = generateScenarios(12, 4242, { classes: ['gi-odd-continuum-edge'] });
    scenarios.forEach((s, i) => {
      const { result } = run({ ...s, filters: [] }, 31 + i, scaleErrors[i % scaleErrors.length], s.filters);
      expect(result.edges, s.id).toEqual([]);
      expect(result.searches.some((x) => x.onDetector && !x.located), s.id).toBe(true);
    });
  });
});

describe('bad input is refused by name', () => {
  const lineout: Lineout = {
    counts: new Float64Array(64),
    variance: new Float64Array(64).fill(1),
    saturated: new Uint8Array(64),
    band: new Float32Array(64),
    bandRows: 1,
    signal: { start: 0, end: 1 },
    background: [],
    lineShape: { tiltPxPerPx: 0, curvaturePxPerPx2: 0 },
    rejectedPixels: 0,
  };
  const map = (p: number): number => 17 - 0.01 * p;
  it.each([
    [{ lineout: { ...lineout, variance: new Float64Array(10) }, map, filters: ['Al'] }, {}, "The lineout's counts (64), variance (10) and saturation flags (64) must have one value per pixel."],
    [{ lineout, map, filters: ['Xx'] }, {}, 'No transmission table for filter material "Xx"'],
    [{ lineout, map, filters: [{ material: 'Al', thicknessNm: -1 }] }, {}, 'Filter thickness must be a finite number ≥ 0 nm, got -1 for Al.'],
    [{ lineout, map, filters: ['Al'] }, { searchRelative: 0.5 }, 'searchRelative must be in (0, 0.2], got 0.5.'],
    [{ lineout, map, filters: ['Al'] }, { resolutionFwhmPx: 0 }, 'resolutionFwhmPx must be between 0 and 200 px, got 0.'],
  ] as const)('%#', (input, options, message) => {
    expect(() => locateContinuumEdges(input, options)).toThrow(message);
  });

  it('an edge off the detector is searched for and said so, not located', () => {
    const { edges, searches } = locateContinuumEdges({ lineout, map, filters: ['Al'] });
    expect(edges).toEqual([]);
    expect(searches).toEqual([{ material: 'Al', edgeLabel: 'Al L2,3', energyEv: 72.7, onDetector: false, located: false, reason: 'Al L2,3 (72.7 eV) is not on the detector under the provisional map.' }]);
  });
});
