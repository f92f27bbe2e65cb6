/**
 * Second-order lines on a normal-incidence VUV frame, rendered by our simulator and checked against
 * its truth. Physics (common practice): the grating equation mλ = d(sin α − sin β) puts the m = 2
 * line of harmonic q where first-order wavelength 2·λ0/q lands; for odd q above the top first-order
 * harmonic on the detector that line is seen while its m = 1 partner (λ0/q) falls beyond the
 * detector's short-wavelength end. The m = 2 line of q has the photon energy of the m = 1 line of q,
 * so it passes the same filters and, with less grating efficiency in m = 2, cannot be seen without
 * its partner when the partner lands on the detector. The search method (grow the first-order comb
 * from the strong lines, then test leftovers as m = 2) follows /work/shared/ENGINE-NOTES.md.
 */
import { describe, expect, it } from 'vitest';
import { assignOrders, type AssignInput, type AssignResult } from '../../../shared/engine/assign/index.ts';
import { findPeaks } from '../../../shared/engine/peaks.ts';
import { reduceFrame } from '../../../shared/engine/reduce.ts';
import { driverPriorOf, generateFieldScenarios, simulateFrame, type SimScenario, type SimTruth } from '../../../shared/engine/simulate/index.ts';
import type { InstrumentProfile, Peak } from '../../../shared/engine/types.ts';

/** An invented 300 lines/mm normal-incidence spectrometer (a copy of the VUV demo scenario's nominal profile). */
const PROFILE: InstrumentProfile & { detectorAngleDeg: number; detectorCenterPixel: number } = {
  name: 'invented VUV normal incidence',
  spectralAxis: 'x',
  grooveDensityPerMm: 300,
  incidenceAngleDeg: 10,
  detectorDistanceMm: 1000,
  pixelPitchUm: 13.5,
  wavelengthIncreasesWithPixel: true,
  detectorCenterPixel: 1023.5,
  detectorAngleDeg: 8.43,
  pixelCount: 2048,
};

/**
 * Argon, 800 nm, harmonics 7–13 in m = 1; the m = 2 lines of 11–19 (4 % of their m = 1 photons)
 * fall between and beyond them. The true geometry is a small realignment away from the profile.
 */
const SCENARIO: SimScenario = {
  id: 'vuv-second-order',
  class: 'test',
  decidable: true,
  description: 'Invented: argon, 800 nm, low orders with m = 2 lines on a normal-incidence spectrometer',
  width: 2048,
  height: 512,
  spectralAxis: 'x',
  lineFwhmPx: 3.2,
  spatialFwhmPx: 46,
  divergenceExponent: 0.7,
  spatialCentrePx: 248,
  lineShape: { tiltPxPerPx: 0.004, curvaturePxPerPx2: 2e-6 },
  pedestalCounts: 210,
  readNoiseCounts: 4.5,
  gainCountsPerPhoton: 1.6,
  secondOrderRelativeStrength: 0.04,
  hotPixelFraction: 1e-5,
  cosmicRayCount: 1,
  bitDepth: 16,
  geometry: { ...PROFILE, incidenceAngleDeg: 10.2, detectorDistanceMm: 1004, detectorCenterPixel: 1016, detectorTiltDeg: 0.5 },
  profile: PROFILE,
  driver: { nominalNm: 800, tolerancePercent: 0.5, effectiveNm: 799.2 },
  parity: 'odd',
  envelope: { plateauPhotons: 6e5, plateauStartHarmonic: 5, cutoffHarmonic: 15, rollOffOrders: 1.5, jitterRelative: 0.1 },
  spatialReferenceHarmonic: 7,
};

function peaksOf(scenario: SimScenario, seed: number): { peaks: Peak[]; truth: SimTruth } {
  const sim = simulateFrame(scenario, seed);
  const lineout = reduceFrame(sim.frame, { spectralAxis: 'x' });
  return { peaks: findPeaks(lineout), truth: sim.truth };
}

const INPUT: AssignInput = { profile: PROFILE, pixelCount: 2048, driverNm: 800, driverTolerancePct: 0.5, parity: 'odd', filters: [] };

/** The true line (any order, visible or not) within 3 px of a pixel, or null. */
function trueLineAt(truth: SimTruth, pixel: number): SimTruth['lines'][number] | null {
  let best: SimTruth['lines'][number] | null = null;
  for (const l of truth.lines) if (Math.abs(l.pixel - pixel) < 3 && (!best || Math.abs(l.pixel - pixel) < Math.abs(best.pixel - pixel))) best = l;
  return best;
}

/** Labels of the best hypothesis as "q/m" per peak, and the list of wrong ones against the truth. */
function check(result: AssignResult, peaks: Peak[], truth: SimTruth): { labels: string[]; wrong: string[] } {
  const labels: string[] = [];
  const wrong: string[] = [];
  (result.best?.labels ?? []).forEach((l, i) => {
    if (l.harmonic === null) return;
    const label = `${l.harmonic}/${l.diffractionOrder}`;
    labels.push(label);
    // Blends (m = 3 of 3q on m = 1 of q) put two true lines on one pixel: either reading is right.
    const line = trueLineAt(truth, peaks[i].pixel);
    const matches = truth.lines.some((t) => Math.abs(t.pixel - peaks[i].pixel) < 3 && t.harmonic === l.harmonic && t.diffractionOrder === l.diffractionOrder);
    if (!line || !matches) wrong.push(`${label}@${peaks[i].pixel.toFixed(0)}`);
  });
  return { labels, wrong };
}

describe('assignOrders with second-order lines', () => {
  it('labels the first-order comb 7–13 and the m = 2 lines of 11–19, partners off the detector included', () => {
    for (const seed of [9001, 1, 2]) {
      const { peaks, truth } = peaksOf(SCENARIO, seed);
      const r = assignOrders(peaks, INPUT);
      const { labels, wrong } = check(r, peaks, truth);
      expect(r.status, `seed ${seed}: ${r.message}`).toBe('unique');
      expect(wrong, `seed ${seed}`).toEqual([]);
      for (const q of [7, 9, 11, 13]) expect(labels, `seed ${seed}`).toContain(`${q}/1`);
      // 11/2 and 13/2 have their partners on the detector; 15/2–19/2 do not (λ0/15 < the shortest
      // wavelength the detector covers, about 57 nm here).
      for (const q of [11, 13, 15, 17, 19]) expect(labels, `seed ${seed}`).toContain(`${q}/2`);
      // The truth agrees that the partners of 15–19 are off the detector (no m = 1 line of them).
      for (const q of [15, 17, 19]) expect(truth.lines.some((l) => l.harmonic === q && l.diffractionOrder === 1)).toBe(false);
    }
  });

  it('does not call a line m = 2 when its m = 1 partner lands on the detector unseen', () => {
    const { peaks, truth } = peaksOf(SCENARIO, 9001);
    const partner = truth.lines.find((l) => l.harmonic === 13 && l.diffractionOrder === 1);
    const second = truth.lines.find((l) => l.harmonic === 13 && l.diffractionOrder === 2);
    expect(partner && second).toBeTruthy();
    // Drop the 13/1 peak: the line at the 13/2 position now has no partner where one must be seen.
    const cut = peaks.filter((p) => Math.abs(p.pixel - (partner as { pixel: number }).pixel) > 5);
    expect(cut.length).toBe(peaks.length - 1);
    const r = assignOrders(cut, INPUT);
    expect(r.status).not.toBe('failed');
    const at = cut.findIndex((p) => Math.abs(p.pixel - (second as { pixel: number }).pixel) < 3);
    expect(at).toBeGreaterThanOrEqual(0);
    const label = r.best?.labels[at];
    expect(label?.harmonic === 13 && label?.diffractionOrder === 2).toBe(false);
    // Whatever else it says, a unique answer carries no wrong label.
    if (r.status === 'unique') expect(check(r, cut, truth).wrong).toEqual([]);
  });
});

describe('assignOrders with third-order lines', () => {
  it('labels m = 3 lines of normal-incidence field frames and never takes one for first order', () => {
    // Grating equation (common practice): m = 3 of harmonic q lands where 3·λ0/q lands in m = 1, between
    // the odd first-order lines for q not divisible by 3; m = 3 of 3k lands on m = 1 of k (a blend).
    const frames = generateFieldScenarios(8, 77, { classes: ['field-ni-vuv-low-orders'] })
      .map((scenario, k) => ({ scenario, sim: simulateFrame(scenario, 5000 + k) }))
      .filter(({ sim }) => sim.truth.lines.some((l) => l.visible && l.diffractionOrder === 3 && l.harmonic % 3 !== 0));
    expect(frames.length).toBeGreaterThan(0);
    let labelledThird = 0;
    for (const { scenario, sim } of frames) {
      const peaks = findPeaks(reduceFrame(sim.frame, { spectralAxis: scenario.profile.spectralAxis }));
      const r = assignOrders(peaks, { profile: scenario.profile, pixelCount: sim.truth.wavelengthNmAtPixel.length, driverNm: scenario.driver.nominalNm, ...driverPriorOf(scenario.driver), parity: scenario.parity, filters: [] });
      if (r.status !== 'unique') continue;
      const { labels, wrong } = check(r, peaks, sim.truth);
      expect(wrong, scenario.id).toEqual([]);
      labelledThird += labels.filter((l) => l.endsWith('/3')).length;
    }
    expect(labelledThird).toBeGreaterThan(0);
  });
});
