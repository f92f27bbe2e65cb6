/**
 * calibrateFrame with filter edges as anchors, on frames rendered by the simulator (invented
 * spectrometers; the truth is the simulator's grating forward model, grating.ts). Edge energies:
 * the Henke steps of calibration-data/edges.json. PRODUCT.md (domain notes): only an edge seen on
 * a continuum fixes the scale; an edge between two harmonics fixes labels, not the scale, and
 * can sit anywhere in a gap of 2·hc/λ0 (hc = 1239.841984 eV·nm, CODATA 2018).
 */
import { describe, expect, it } from 'vitest';
import { calibrateFrame } from '../../../shared/engine/calibrate.ts';
import { evaluateCalibration } from '../../../shared/engine/dispersion/index.ts';
import { generateScenarios, simulateFrame, type SimScenario } from '../../../shared/engine/simulate/index.ts';

function calibrate(s: SimScenario, seed: number) {
  const { frame, truth } = simulateFrame(s, seed);
  const result = calibrateFrame(frame, {
    profile: s.profile,
    driverNm: s.driver.nominalNm,
    driverTolerancePct: s.driver.tolerancePercent,
    parity: s.parity,
    filters: (s.filters ?? []).map((f) => `${f.material}:${f.thicknessNm}`),
  });
  return { result, truth };
}

describe('an edge located on the continuum anchors the scale', () => {
  const scenarios = generateScenarios(6, 2026, { classes: ['gi-odd-continuum-edge'] });
  it.each(scenarios.map((s, i) => [s.id, s, i] as const))('%s', (_, s, i) => {
    const { result, truth } = calibrate(s, 300 + i);
    const cal = result.calibration!;
    expect(result.status).not.toBe('failed');
    const anchor = cal.anchors!.find((a) => a.kind === 'filter-edge')!;
    expect(anchor.label).toContain(s.filters![0].material);
    expect(cal.absoluteScale).toBe('anchored');
    // The anchor buys at least a factor 3 on the scale over the driver tolerance alone.
    expect(cal.scaleSigmaRelative).toBeLessThan(cal.unanchoredScaleSigmaRelative! / 3);
    const located = result.notes.find((n) => / edge located on the continuum at pixel \d+\.\d ± [\d.]+: fixes the scale to ±[\d.]+ eV/.test(n));
    expect(located, result.notes.join('\n')).toBeDefined();
    expect(cal.notes).toContain(located);
    // The map against the truth, across the detector, within 3σ of its own band.
    const pixels = [0.1, 0.5, 0.9].map((f) => Math.round(f * (cal.pixelCount - 1)));
    const { wavelengthNm, wavelengthSigmaNm } = evaluateCalibration(cal, pixels);
    pixels.forEach((p, k) => expect(Math.abs(wavelengthNm[k] - truth.wavelengthNmAtPixel[p])).toBeLessThan(3 * wavelengthSigmaNm[k]));
  });
});

describe('without a continuum the edge only checks the labels', () => {
  const scenarios = generateScenarios(4, 2026, { classes: ['gi-odd-filter-edge'] });
  it.each(scenarios.map((s, i) => [s.id, s, i] as const))('%s', (_, s, i) => {
    const { result } = calibrate(s, 300 + i);
    const cal = result.calibration!;
    expect(cal.anchors ?? []).toEqual([]);
    expect(cal.absoluteScale).toBe('driver-tolerance');
    const between = result.notes.find((n) => / edge lies between q = \d+ and \d+: fixes labels, not the scale \(the gap is [\d.]+ eV\)/.test(n))!;
    expect(between, result.notes.join('\n')).toBeDefined();
    // The gap is 2·hc/λ0 of the hypothesis (odd comb), to the 0.1 eV printed.
    const gap = Number(/the gap is ([\d.]+) eV/.exec(between)![1]);
    expect(Math.abs(gap - (2 * 1239.841984) / cal.driverNm)).toBeLessThanOrEqual(0.051);
  });

  it('a frame without filters gets no edge notes', () => {
    const [s] = generateScenarios(1, 7, { classes: ['gi-odd-clean'] });
    const { result } = calibrate(s, 1);
    expect(result.notes.some((n) => /edge/.test(n) && /located|lies between/.test(n))).toBe(false);
  });
});
