/**
 * Pins on a rendered frame: three high orders of 800 nm within an 8.9 % driver tolerance, which the
 * data alone cannot label (common practice: a one-step slip changes λ0 by only 2/63 ≈ 3 %). A true
 * pin on any one line must give the true labelling; a pin next to the strongest pair once seeded a
 * labelling that repeated a harmonic and hid the true comb (found by the workbench browser test).
 * Truth from our simulator (shared/engine/simulate); the frame goes through the whole pipeline.
 */
import { describe, expect, it } from 'vitest';
import { calibrateFrame } from '../../../shared/engine/calibrate.ts';
import { generateScenario, simulateFrame } from '../../../shared/engine/simulate/index.ts';

describe('calibrateFrame with pins', () => {
  const scenario = generateScenario('undecidable-wide-tolerance', 6, 0, { sizes: [[1024, 256]], spectralAxis: 'x', bitDepth: 16 });
  const { frame, truth } = simulateFrame(scenario, 2);
  const lines = truth.lines.filter((l) => l.visible && l.diffractionOrder === 1);
  const options = {
    profile: scenario.profile,
    driverNm: scenario.driver.nominalNm,
    driverTolerancePct: 8.88,
    parity: scenario.parity,
    signal: { start: 57, end: 143 },
    background: [{ start: 5, end: 40 }, { start: 200, end: 250 }],
  };

  it('is ambiguous without a pin', () => {
    expect(lines.length).toBe(3);
    expect(calibrateFrame(frame, options).status).toBe('ambiguous');
  });

  it.each([0, 1, 2])('a true pin on line %i gives the true orders', (k) => {
    const line = lines[k];
    const result = calibrateFrame(frame, { ...options, pins: [{ pixel: Number(line.pixel.toFixed(2)), harmonic: line.harmonic }] });
    expect(result.status).toBe('unique');
    for (const l of lines) {
      const peak = result.peaks.find((p) => Math.abs(p.pixel - l.pixel) < 2);
      expect(peak?.harmonic).toBe(l.harmonic);
    }
  });
});
