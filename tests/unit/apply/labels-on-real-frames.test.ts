/**
 * Order labels when a calibration is applied to frames it does not quite describe, through the
 * whole pipeline on frames rendered by our simulator (invented spectrometer, truth known):
 *  - a camera moved by 14 px: the first-order lines no longer sit on their predictions, so no peak
 *    may be labelled as a second-order image that happens to sit on a predicted m = 2 position
 *    (common practice: higher-order images of a grating are weaker than the first-order comb);
 *  - a two-colour frame (even orders present) calibrated with a single-colour version: with the
 *    frame's parity the even orders are labelled, with the calibration's they are not.
 */
import { describe, expect, it } from 'vitest';
import { applyCalibration } from '../../../shared/engine/apply.ts';
import { calibrateFrame } from '../../../shared/engine/calibrate.ts';
import { findPeaks } from '../../../shared/engine/peaks.ts';
import { reduceFrame } from '../../../shared/engine/reduce.ts';
import { simulateFrame, type SimScenario } from '../../../shared/engine/simulate/index.ts';
import type { Calibration, InstrumentProfile } from '../../../shared/engine/types.ts';

const profile: InstrumentProfile = {
  name: 'Invented flat-field XUV spectrometer (test)',
  spectralAxis: 'x',
  grooveDensityPerMm: 1200,
  incidenceAngleDeg: 87,
  detectorDistanceMm: 235,
  pixelPitchUm: 13.5,
  wavelengthIncreasesWithPixel: false,
  detectorCenterPixel: 1023.5,
  detectorAngleDeg: 77.1,
  pixelCount: 2048,
};
const geometry = { ...profile, detectorCenterPixel: 1027.5, incidenceAngleDeg: 87.05, detectorDistanceMm: 234.1, detectorTiltDeg: 0.8, detectorAngleDeg: 77.1 };

function scenario(overrides: Partial<SimScenario> = {}): SimScenario {
  return {
    id: 'apply-labels',
    class: 'test',
    decidable: true,
    description: 'neon, 800 nm, Al 200 nm (invented)',
    geometry,
    profile,
    width: 2048,
    height: 256,
    spectralAxis: 'x',
    driver: { nominalNm: 800, tolerancePercent: 0.5, effectiveNm: 798.6 },
    parity: 'odd',
    envelope: { plateauPhotons: 9e5, plateauStartHarmonic: 21, cutoffHarmonic: 61, rollOffOrders: 3, jitterRelative: 0.1 },
    filters: [{ material: 'Al', thicknessNm: 200 }],
    lineFwhmPx: 3.2,
    spatialFwhmPx: 30,
    spatialReferenceHarmonic: 25,
    spatialCentrePx: 128,
    secondOrderRelativeStrength: 0.04,
    ...overrides,
  };
}

function applyTo(s: SimScenario, seed: number, cal: Calibration, parity?: 'odd' | 'all') {
  const { frame, truth } = simulateFrame(s, seed);
  const lineout = reduceFrame(frame, { spectralAxis: 'x' });
  const peaks = findPeaks(lineout);
  return { spectrum: applyCalibration(lineout, peaks, cal, parity ? { parity } : undefined), truth };
}

describe('order labels of applied calibrations', () => {
  const base = scenario();
  const calibrated = calibrateFrame(simulateFrame(base, 1).frame, { profile, driverNm: 800, driverTolerancePct: 0.5, parity: 'odd', filters: ['Al'] });
  const cal = calibrated.calibration!;

  it('calibrates the reference frame uniquely', () => {
    expect(calibrated.status).toBe('unique');
  });

  it('labels no second-order image on a frame whose camera moved by 14 px', () => {
    const moved = scenario({ geometry: { ...geometry, detectorCenterPixel: geometry.detectorCenterPixel + 14 } });
    const { spectrum } = applyTo(moved, 2, cal);
    expect(spectrum.orders.filter((o) => o.detected && o.diffractionOrder > 1)).toEqual([]);
    expect(spectrum.notes.join(' ')).toMatch(/first-order line/);
  });

  it('labels the even orders of a two-colour frame with the frame parity, each within 1 px of its true line', () => {
    const twoColour = scenario({ parity: 'all', evenRelativeStrength: 0.6 });
    const odd = applyTo(twoColour, 3, cal);
    expect(odd.spectrum.orders.some((o) => o.harmonic % 2 === 0)).toBe(false);
    const all = applyTo(twoColour, 3, cal, 'all');
    const evenSeen = all.spectrum.orders.filter((o) => o.detected && o.diffractionOrder === 1 && o.harmonic % 2 === 0);
    expect(evenSeen.length).toBeGreaterThanOrEqual(8);
    for (const o of evenSeen) {
      const line = all.truth.lines.find((l) => l.harmonic === o.harmonic && l.diffractionOrder === 1)!;
      expect(Math.abs(o.pixel - line.pixel)).toBeLessThan(1);
    }
  });
});

describe('light of higher diffraction orders on first-order pixels', () => {
  it('says which first-order yields may hold m = 3 of harmonic 3q (odd comb), and not where harmonic 3q is on the detector and absent', () => {
    // Grating equation mλ = d(sin α − sin β): m = 3 of λ0/(3q) leaves at the angle of m = 1 of λ0/q
    // (common practice); for an odd comb 3q is odd whenever q is.
    const s = scenario({ filters: [] });
    const calibrated = calibrateFrame(simulateFrame(s, 5).frame, { profile, driverNm: 800, driverTolerancePct: 0.5, parity: 'odd' });
    expect(calibrated.status).toBe('unique');
    const { spectrum } = applyTo(s, 6, calibrated.calibration!);
    const firstOrder = spectrum.orders.filter((o) => o.diffractionOrder === 1);
    const byHarmonic = new Map(firstOrder.map((o) => [o.harmonic, o]));
    let shared = 0;
    for (const o of firstOrder) {
      const own = byHarmonic.get(3 * o.harmonic);
      if (own && !own.detected) expect(o.sharedWith ?? []).toEqual([]);
      else {
        expect(o.sharedWith).toEqual([{ harmonic: 3 * o.harmonic, diffractionOrder: 3 }]);
        shared++;
      }
    }
    expect(shared).toBeGreaterThan(0);
    expect(spectrum.notes.join(' ')).toMatch(/m = 3 of/);
  });
});
