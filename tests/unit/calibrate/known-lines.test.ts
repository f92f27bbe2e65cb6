/**
 * A known line as an absolute anchor, through the whole calibrate pipeline. The frame comes from
 * our simulator (shared/engine/simulate, invented data) with a driver whose real wavelength sits
 * 0.8 % red of its nameplate ("800 nm is often a nameplate: the real centre can sit a few nm
 * either side", PRODUCT.md domain notes). The known line is a true harmonic "measured elsewhere":
 * E = q·hc/λ0_true with hc = 1239.841984 eV·nm (CODATA 2018).
 *
 * Expectations (PRODUCT.md, ENGINE-NOTES.md: "without an absolute anchor the absolute scale is
 * known only to roughly the driver tolerance, however good the centroids are"):
 * - without the line the map is off by the driver's error at every pixel: every λq = λ0/q moves
 *   together, and the assumed λ0 lies inside the blue-shift band [nominal·(1 − B), nominal], so at
 *   least 0.8 % away from the truth;
 * - with it the map's error at every pixel is at the level of the centroid errors (common
 *   practice: a line's centroid σ times the local dispersion);
 * - in both cases the truth lies inside the stated ±2σ band at every pixel.
 */
import { describe, expect, it } from 'vitest';
import { calibrateFrame, type CalibrateOptions } from '../../../shared/engine/calibrate.ts';
import { HC_EV_NM } from '../../../shared/engine/constants.ts';
import { calibrationDispersionNmPerPixel, evaluateCalibration } from '../../../shared/engine/dispersion/index.ts';
import { generateScenarios, simulateFrame } from '../../../shared/engine/simulate/index.ts';
import type { Calibration } from '../../../shared/engine/types.ts';

const NAMEPLATE_ERROR = 0.008;

const [base] = generateScenarios(1, 8, { classes: ['gi-odd-clean'], sizes: [[1024, 256]], spectralAxis: 'x', bitDepth: 16 });
const nominalNm = base.driver.nominalNm;
const scenario = { ...base, driver: { ...base.driver, effectiveNm: nominalNm * (1 + NAMEPLATE_ERROR) } };
const { frame, truth } = simulateFrame(scenario, 11);
const comb = truth.lines.filter((l) => l.diffractionOrder === 1 && l.visible);
const options: CalibrateOptions = { profile: scenario.profile, driverNm: nominalNm, driverTolerancePct: 1 };

/** Largest relative error of the map against the simulator's true wavelength, and the largest |error| / σ, over every pixel. */
function mapErrors(calibration: Calibration): { maxRelative: number; maxZ: number } {
  const pixels = Array.from({ length: frame.width }, (_, i) => i);
  const { wavelengthNm, wavelengthSigmaNm } = evaluateCalibration(calibration, pixels);
  let maxRelative = 0;
  let maxZ = 0;
  let checked = 0;
  for (const p of pixels) {
    const trueNm = truth.wavelengthNmAtPixel[p];
    if (!Number.isFinite(trueNm)) continue;
    checked++;
    maxRelative = Math.max(maxRelative, Math.abs(wavelengthNm[p] / trueNm - 1));
    maxZ = Math.max(maxZ, Math.abs(wavelengthNm[p] - trueNm) / wavelengthSigmaNm[p]);
  }
  expect(checked).toBe(frame.width);
  return { maxRelative, maxZ };
}

/** Median over the labelled lines of σ_centroid·|dλ/dp|/λ: the relative error the centroids alone leave. */
function centroidLevel(calibration: Calibration): number {
  const dispersion = calibrationDispersionNmPerPixel(calibration, calibration.points.map((p) => p.pixel));
  const levels = calibration.points.map((p, i) => (p.pixelSigma * Math.abs(dispersion[i])) / p.wavelengthNm).sort((a, b) => a - b);
  return levels[levels.length >> 1];
}

describe('calibrateFrame with a known line', () => {
  const plain = calibrateFrame(frame, options);

  it('without the line: decided orders, a scale off by the driver error and not anchored', () => {
    expect(comb.length).toBeGreaterThanOrEqual(10);
    expect(plain.status).toBe('unique');
    const cal = plain.calibration!;
    expect(cal.absoluteScale).toBe('driver-tolerance');
    expect(cal.anchors).toBeUndefined();
    expect(cal.unanchoredScaleSigmaRelative).toBeCloseTo(cal.scaleSigmaRelative, 12);
    expect(cal.notes.some((n) => n.startsWith('Scale not anchored: known only to the driver tolerance'))).toBe(true);
    const { maxRelative, maxZ } = mapErrors(cal);
    // The assumed λ0 lies in [nominal·(1 − B), nominal]; the truth is 0.8 % above nominal.
    expect(maxRelative).toBeGreaterThan(0.95 * NAMEPLATE_ERROR);
    expect(maxZ).toBeLessThan(2);
  });

  it.each(['first', 'middle', 'last'] as const)('with a true harmonic (the %s line) as the line: anchored, centroid-level error, truth inside 2σ', (which) => {
    const line = comb[which === 'first' ? 0 : which === 'middle' ? comb.length >> 1 : comb.length - 1];
    const energyEv = (line.harmonic * HC_EV_NM) / truth.effectiveDriverNm;
    const result = calibrateFrame(frame, { ...options, knownLines: [{ pixel: Math.round(line.pixel), energyEv, label: `H${line.harmonic}` }] });
    expect(result.status).toBe('unique');
    const cal = result.calibration!;
    expect(cal.absoluteScale).toBe('anchored');
    expect(cal.anchors).toHaveLength(1);
    const anchor = cal.anchors![0];
    expect(anchor).toMatchObject({ kind: 'known-line', label: `H${line.harmonic}`, energyEv, energySigmaEv: 0 });
    // The anchor sits at the detected peak's fitted centre, not at the rounded pixel typed.
    const peak = result.peaks.find((p) => Math.abs(p.pixel - line.pixel) < 1)!;
    expect(anchor.pixel).toBe(peak.pixel);
    expect(anchor.pixelSigma).toBe(peak.pixelSigma);

    // What the anchor bought: the driver prior alone leaves ~1 %; the line leaves ~1e-6.
    expect(cal.unanchoredScaleSigmaRelative).toBeCloseTo(plain.calibration!.scaleSigmaRelative, 12);
    expect(cal.scaleSigmaRelative).toBeLessThan(cal.unanchoredScaleSigmaRelative! / 100);
    expect(Math.abs(cal.driverNm / truth.effectiveDriverNm - 1)).toBeLessThan(3 * cal.scaleSigmaRelative + 1e-6);
    expect(cal.notes[0]).toMatch(new RegExp(`^Scale anchored by 1 known line \\(H${line.harmonic} at px ${peak.pixel.toFixed(1)}\\): ±[0-9.e-]+ eV at the line, ±[0-9.e-]+ % of the scale \\(1σ\\); the driver tolerance alone would leave ±1\\.0 %\\.$`));

    const level = centroidLevel(cal);
    const { maxRelative, maxZ } = mapErrors(cal);
    expect(maxRelative).toBeLessThan(10 * level);
    expect(maxRelative).toBeLessThan(mapErrors(plain.calibration!).maxRelative / 1000);
    expect(maxZ).toBeLessThan(2);
    // A harmonic measured elsewhere is still that harmonic: its peak keeps its order label.
    expect(peak.harmonic).toBe(line.harmonic);
  });

  it('a pin fixes an order, not the scale', () => {
    const line = comb[comb.length >> 1];
    const result = calibrateFrame(frame, { ...options, pins: [{ pixel: line.pixel, harmonic: line.harmonic }] });
    expect(result.status).toBe('unique');
    expect(result.calibration!.absoluteScale).toBe('driver-tolerance');
    expect(result.calibration!.anchors).toBeUndefined();
    expect(mapErrors(result.calibration!).maxRelative).toBeGreaterThan(0.95 * NAMEPLATE_ERROR);
  });

  it('the same line given twice is one anchor', () => {
    const line = comb[1];
    const energyEv = (line.harmonic * HC_EV_NM) / truth.effectiveDriverNm;
    const result = calibrateFrame(frame, { ...options, knownLines: [{ pixel: line.pixel - 1, energyEv }, { pixel: line.pixel + 1, energyEv, label: 'again' }] });
    expect(result.calibration!.anchors).toHaveLength(1);
    expect(result.calibration!.anchors![0].label).toBe('again');
  });
});
