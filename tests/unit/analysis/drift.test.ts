/**
 * computeDrift against the simulator's truth: frames rendered with the detector moved by a known
 * number of pixels (the simulator's true geometry, shared/engine/simulate), reduced and labelled by
 * the same code path as `orderly apply` (runApplyDetailed), under the calibration of the unmoved
 * true geometry (tests/support/truth-calibration.ts).
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { computeDrift, DEFAULT_DRIFT_THRESHOLD } from '../../../shared/analysis/drift.ts';
import { encodeTiff, generateScenarios, simulateFrame, type SimScenario } from '../../../shared/engine/simulate/index.ts';
import type { Calibration } from '../../../shared/engine/types.ts';
import { HC_EV_NM } from '../../../shared/engine/constants.ts';
import { evaluateCalibration } from '../../../shared/engine/dispersion/evaluate.ts';
import { runApplyDetailed } from '../../../server/cli/commands.ts';
import { truthCalibration } from '../../support/truth-calibration.ts';

let scenario: SimScenario;
let calibration: Calibration;
beforeAll(() => {
  [scenario] = generateScenarios(1, 7, { classes: ['gi-odd-clean'], sizes: [[512, 128]], spectralAxis: 'x', bitDepth: 16 });
  calibration = truthCalibration(scenario, simulateFrame(scenario, 1).truth);
});

async function driftOf(shiftPx: number, seed: number, threshold = DEFAULT_DRIFT_THRESHOLD) {
  const moved = { ...scenario, geometry: { ...scenario.geometry, detectorCenterPixel: scenario.geometry.detectorCenterPixel + shiftPx } };
  const bytes = encodeTiff(simulateFrame(moved, seed).frame, { bitsPerSample: 16 });
  const d = await runApplyDetailed({ frameBytes: bytes, calibrationJson: calibration });
  return computeDrift({ orders: d.spectrum.orders, peaks: d.peaks, calibration: d.calibration }, threshold);
}

describe('computeDrift on simulated camera moves', () => {
  it.each([
    [0, false],
    [0.5, false],
    [2, true],
    [-2, true],
    [3, true],
  ])('detector moved %s px → shift measured within 0.05 px, flagged %s (3 σ and 1 px)', async (shift, flagged) => {
    const drift = await driftOf(shift, 11);
    expect(Math.abs(drift.shiftPx! - shift)).toBeLessThan(0.05);
    expect(drift.flagged).toBe(flagged);
    expect(drift.matchedPeaks).toBeGreaterThanOrEqual(5);
  });

  it('the meV shift of each line is the calibrated energy difference between its observed and predicted pixel', async () => {
    const drift = await driftOf(2, 12);
    const used = drift.lines.filter((l) => l.used && l.diffractionOrder === 1);
    expect(used.length).toBeGreaterThanOrEqual(5);
    const { wavelengthNm: atObserved } = evaluateCalibration(calibration, used.map((l) => l.observedPixel));
    const { wavelengthNm: atPredicted } = evaluateCalibration(calibration, used.map((l) => l.predictedPixel));
    used.forEach((line, i) => {
      // E = hc/λ (CODATA hc in constants.ts); over 2 px the linearised ΔE agrees to ~1 % (curvature of E(p)).
      const exactMeV = 1000 * (HC_EV_NM / atObserved[i] - HC_EV_NM / atPredicted[i]);
      expect(Math.abs(line.offsetMeV - exactMeV)).toBeLessThan(0.02 * Math.abs(exactMeV));
    });
    expect(drift.shiftMeVSigma!).toBeGreaterThan(0);
  });

  it('a stricter pixel threshold keeps a 2 px move unflagged; σ alone decides when px = 0', async () => {
    expect((await driftOf(2, 13, { sigma: 3, px: 2.5 })).flagged).toBe(false);
    expect((await driftOf(0.5, 13, { sigma: 3, px: 0 })).flagged).toBe(true);
  });

  it('no peaks → no shift, not flagged', () => {
    const drift = computeDrift({ orders: [{ harmonic: 21, diffractionOrder: 1, predictedPixel: 100 }], peaks: [], calibration });
    expect(drift).toMatchObject({ shiftPx: null, flagged: false, matchedPeaks: 0 });
  });

  it('a stray peak far from the others does not pull the mean (median/MAD rejection)', () => {
    const orders = [100, 150, 200, 250, 300].map((p, i) => ({ harmonic: 31 - 2 * i, diffractionOrder: 1, predictedPixel: p }));
    const peaks = [101, 151, 201, 251, 300 + 15].map((p) => ({ pixel: p, pixelSigma: 0.05 }));
    const drift = computeDrift({ orders, peaks, calibration });
    expect(drift.shiftPx).toBeCloseTo(1, 10);
    expect(drift.lines.find((l) => l.predictedPixel === 300)!.used).toBe(false);
  });
});
