/**
 * Order assignment properties. The peak lists come from the grating equation mλ = d(sin α − sin β)
 * (peak-sim.ts, the textbook form; common practice) with harmonic q at λ0/q (Domain notes); the
 * assigner only sees a perturbed nominal profile. The margin rule (unique only when every rival
 * labelling, including slips of the whole comb, trails by ≥ 16 in −2 ln L) is from
 * /work/shared/ENGINE-NOTES.md ("Ambiguity needs a margin, not a winner").
 */
import { describe, expect, it } from 'vitest';
import { assignOrders, fitLabelling, UNIQUE_MARGIN, type AssignResult } from '../../../shared/engine/assign/index.ts';
import type { InstrumentProfile, Peak } from '../../../shared/engine/types.ts';
import { simulatePeaks, type SimPeaks } from './peak-sim.ts';

/** True when every peak the result labels carries its true (q, m). */
function labelsMatch(result: AssignResult, sim: SimPeaks): boolean {
  const best = result.best;
  if (!best) return false;
  return best.labels.every((l, i) => l.harmonic === null || (l.harmonic === sim.truth[i].harmonic && l.diffractionOrder === sim.truth[i].diffractionOrder));
}

/** An invented normal-incidence VUV spectrometer: 300 lines/mm, 12° incidence, 2048 px of 13.5 µm. */
const NI_PROFILE: InstrumentProfile = {
  name: 'invented VUV normal incidence',
  spectralAxis: 'x',
  grooveDensityPerMm: 300,
  incidenceAngleDeg: 12,
  detectorDistanceMm: 420,
  pixelPitchUm: 13.5,
  wavelengthIncreasesWithPixel: false,
  detectorCenterPixel: 1023.5,
  detectorAngleDeg: 8.8,
  pixelCount: 2048,
};

describe('assignOrders', () => {
  it('labels a clean odd comb of low orders uniquely and correctly', () => {
    const sim = simulatePeaks({ seed: 3, tolerancePct: 0.5, harmonicRange: [17, 41], centroidSigmaPx: 0.02 });
    const r = assignOrders(sim.peaks, { profile: sim.profile, pixelCount: 1024, driverNm: 800, driverTolerancePct: 0.5, parity: 'odd' });
    expect(r.status).toBe('unique');
    expect(labelsMatch(r, sim)).toBe(true);
  });

  it('never answers unique and wrong when a truncated edge line pulls a high-order comb by one step', () => {
    // High orders (q ≈ 101–121 of a 2100 nm driver): one odd step is ~2 % of λ, which the realignment
    // ranges can nearly absorb. The comb runs off the detector's low edge; the centre shift puts its
    // last line 3 px from the edge. Truncation biases that line's fitted centre inward by a pixel and
    // a naive fit states a far too small σ for it.
    let edgeCases = 0;
    for (let seed = 1; seed <= 6; seed++) {
      const perturb = { incidenceDeg: 0.06 * seed - 0.2, distanceRelative: 0.004 * seed - 0.012, centerShiftPx: 0, tiltDeg: seed - 3 };
      const base = { seed, nominalDriverNm: 2100, tolerancePct: 0.6, blueShiftFraction: 0.1 * seed, harmonicRange: [101, 121] as [number, number], centroidSigmaPx: 0.01 };
      const first = simulatePeaks({ ...base, perturb });
      const shift = 3 - Math.min(...first.peaks.map((p) => p.pixel));
      const sim = simulatePeaks({ ...base, perturb: { ...perturb, centerShiftPx: shift } });
      const peaks: Peak[] = sim.peaks.map((p) => ({ ...p }));
      const edge = peaks.reduce((a, p, i) => (p.pixel < peaks[a].pixel ? i : a), 0);
      if (!(peaks[edge].pixel < 5)) continue;
      edgeCases++;
      peaks[edge] = { ...peaks[edge], pixel: peaks[edge].pixel + 1, pixelSigma: 0.01 };
      const r = assignOrders(peaks, { profile: sim.profile, pixelCount: 1024, driverNm: 2100, driverTolerancePct: 0.6, parity: 'odd' });
      expect(r.status).not.toBe('failed');
      if (r.status === 'unique') expect(labelsMatch(r, sim)).toBe(true);
      else expect(r.hypotheses.length).toBeGreaterThan(1);
    }
    expect(edgeCases).toBeGreaterThanOrEqual(4);
  });

  it('answers ambiguous for a few high orders whose slip the driver tolerance allows, and unique once a pin decides', () => {
    // Tolerance 5 % > two odd steps at q ≈ 105 (2/105 ≈ 1.9 %): positions and prior cannot decide.
    const sim = simulatePeaks({ seed: 11, nominalDriverNm: 2400, tolerancePct: 5, harmonicRange: [103, 109], centroidSigmaPx: 0.01 });
    expect(sim.peaks.length).toBe(4);
    const input = { profile: sim.profile, pixelCount: 1024, driverNm: 2400, driverTolerancePct: 5, parity: 'odd' as const };
    const open = assignOrders(sim.peaks, input);
    expect(open.status).toBe('ambiguous');
    expect(open.hypotheses.length).toBeGreaterThan(1);
    expect(open.hypotheses[1].deltaScore).toBeLessThan(UNIQUE_MARGIN);
    // A true pin on ANY of the lines must give the true labelling: a pin next to the strongest pair
    // once seeded a labelling with a repeated harmonic and hid the true comb (found in the browser test).
    sim.truth.forEach((t, i) => {
      if (t.harmonic === null) return;
      const pinned = assignOrders(sim.peaks, { ...input, pins: [{ pixel: sim.peaks[i].pixel, harmonic: t.harmonic }] });
      expect(pinned.status, `pin on line ${i} (q = ${t.harmonic})`).toBe('unique');
      expect(labelsMatch(pinned, sim), `pin on line ${i} (q = ${t.harmonic})`).toBe(true);
    });
  });

  it('assigns a normal-incidence frame of low orders with m = 2 lines between them, after a realignment that moves the spectrum', () => {
    // Incidence realigned by 0.45°: at normal incidence that shifts the spectrum by ~L·Δα/pitch ≈ 240 px,
    // more than the centre's range, so only a fit that frees the incidence can place the comb.
    const sim = simulatePeaks({
      seed: 5,
      profile: NI_PROFILE,
      pixelCount: 2048,
      nominalDriverNm: 800,
      tolerancePct: 0.5,
      harmonicRange: [3, 9],
      secondOrder: [7, 9],
      perturb: { incidenceDeg: 0.45, distanceRelative: 0.02, centerShiftPx: 20, tiltDeg: 4 },
      centroidSigmaPx: 0.02,
    });
    expect(sim.truth.filter((t) => t.diffractionOrder === 1).length).toBeGreaterThanOrEqual(3);
    const r = assignOrders(sim.peaks, { profile: NI_PROFILE, pixelCount: 2048, driverNm: 800, driverTolerancePct: 0.5, parity: 'odd' });
    expect(r.status).toBe('unique');
    expect(labelsMatch(r, sim)).toBe(true);
    expect(r.best?.secondOrderPeaks).toBeGreaterThanOrEqual(1);
  });

  it('seeds from saturated first-order lines even when their fitted SNR trails the m = 2 lines between them', () => {
    // Clipped cores: the first-order lines' fitted SNR and area collapse (here to 20 and 3 %), below
    // the m = 2 lines of twice their harmonic region; an assigner ranking by SNR alone would build its
    // comb from the m = 2 lines.
    const q2 = [55, 57, 59, 61, 63, 65, 67, 69, 71, 73];
    const sim = simulatePeaks({ seed: 21, tolerancePct: 0.5, harmonicRange: [27, 73], secondOrder: q2, centroidSigmaPx: 0.02, perturb: { incidenceDeg: 0.1, distanceRelative: 0.01, centerShiftPx: 5, tiltDeg: 2 } });
    const peaks: Peak[] = sim.peaks.map((p, i) => (sim.truth[i].diffractionOrder === 1 ? { ...p, saturated: true, snr: 20, area: 0.03 * p.area, pixelSigma: 0.05 } : { ...p }));
    expect(sim.truth.filter((t) => t.diffractionOrder === 2).length).toBeGreaterThanOrEqual(4);
    const r = assignOrders(peaks, { profile: sim.profile, pixelCount: 1024, driverNm: 800, driverTolerancePct: 0.5, parity: 'odd' });
    expect(r.status).toBe('unique');
    expect(labelsMatch(r, sim)).toBe(true);
    expect(r.best?.labels.filter((l, i) => l.harmonic !== null && sim.truth[i].diffractionOrder === 1).length).toBe(sim.truth.filter((t) => t.diffractionOrder === 1).length);
  });

  it("reports the m = 2 blend on an 'all'-parity comb (m = 2 of 2k sits exactly on m = 1 of k)", () => {
    // Orders 20–30 on the detector; 40–60 fall off it in m = 1, so their m = 2 lines could hide under 20–30.
    const sim = simulatePeaks({ seed: 8, parity: 'all', tolerancePct: 0.3, harmonicRange: [20, 30], centroidSigmaPx: 0.02 });
    const r = assignOrders(sim.peaks, { profile: sim.profile, pixelCount: 1024, driverNm: 800, driverTolerancePct: 0.3, parity: 'all' });
    expect(r.status).not.toBe('failed');
    if (r.status === 'unique') expect(labelsMatch(r, sim)).toBe(true);
    const blended = r.best?.labels.filter((l) => l.blend?.some((b) => b.diffractionOrder === 2 && l.harmonic !== null && b.harmonic === 2 * l.harmonic)) ?? [];
    expect(blended.length).toBeGreaterThan(0);
    expect(r.notes.join(' ')).toMatch(/m = 2/);
  });

  it('fitLabelling: the true labelling fits to about its degrees of freedom, a one-step slip of a low-order comb does not', () => {
    const sim = simulatePeaks({ seed: 4, tolerancePct: 0.5, harmonicRange: [27, 45], centroidSigmaPx: 0.02, perturb: { incidenceDeg: 0.2, distanceRelative: 0.01, centerShiftPx: 10, tiltDeg: 1 } });
    const slipped = sim.truth.map((t) => (t.harmonic === null ? null : t.harmonic + 2));
    // Without a stated tilt the search spans perpendicular through the flat-field tilt (0–14° here),
    // which lets the slip bend towards the comb; with the tilt stated it cannot.
    for (const detectorTiltDeg of [undefined, 0]) {
      const input = { profile: { ...sim.profile, detectorTiltDeg }, pixelCount: 1024, driverNm: 800, driverTolerancePct: 0.5, parity: 'odd' as const };
      const truth = fitLabelling(sim.peaks, input, sim.truth.map((t) => t.harmonic));
      const slip = fitLabelling(sim.peaks, input, slipped);
      expect(truth).not.toBeNull();
      expect(slip).not.toBeNull();
      const dof = (truth?.fittedPoints ?? 0) - (truth?.freeParameters ?? 0);
      // χ² of a correct model with Gaussian errors: mean dof, sd √(2 dof); 5 sd is generous (common practice).
      expect(truth?.chiSquarePosition ?? Infinity).toBeLessThan(dof + 5 * Math.sqrt(2 * dof));
      const slipCost = (slip?.chiSquarePosition ?? 0) + (slip?.chiSquarePrior ?? 0) - (truth?.chiSquarePosition ?? 0);
      expect(slipCost).toBeGreaterThan(detectorTiltDeg === undefined ? UNIQUE_MARGIN : 100 * dof);
    }
  });
});
