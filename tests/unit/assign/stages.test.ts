/**
 * The assigner's stages on their own: priors (priors.ts), context (context.ts) and the verdict's
 * gates (verdict.ts), each with a case that must pass and one that must not. Peak lists from the
 * forward model (regimes.ts, peak-sim.ts); invented instruments.
 */
import { describe, expect, it } from 'vitest';
import { assignOrders } from '../../../shared/engine/assign/index.ts';
import { buildPriors, DEFAULT_RANGES, driverPriorMoments, flatFieldTiltDeg, modelTiltDeg, unanchoredScaleSigma } from '../../../shared/engine/assign/priors.ts';
import { P_DRIVER, P_TILT } from '../../../shared/engine/assign/model.ts';
import { pixelToWavelengthNm } from '../../../shared/engine/grating.ts';
import type { GratingGeometry } from '../../../shared/engine/types.ts';
import { FLAT_FIELD_PROFILE, regimeCase, REGIMES } from './regimes.ts';
import { rng } from './peak-sim.ts';

describe('priors', () => {
  it('gives the driver prior a real 1σ: measured σ and a uniform blue shift add in quadrature', () => {
    // Variance of U[0, B] is B²/12 (textbook); independent errors add in variance.
    const m = driverPriorMoments({ nominalNm: 800, sigmaRelative: 0.003, blueShiftRelative: 0.01 });
    expect(m.meanNm).toBeCloseTo(796, 9);
    expect(m.sigmaRelative).toBeCloseTo(Math.sqrt(0.003 ** 2 + 0.01 ** 2 / 12), 12);
    expect(unanchoredScaleSigma(0.3, 1)).toBeCloseTo(m.sigmaRelative, 12);
    // Monte Carlo of the same prior (10^5 draws) agrees with the formula within 1 %.
    const r = rng(11);
    let s = 0;
    let s2 = 0;
    const n = 100_000;
    for (let i = 0; i < n; i++) {
      const x = 800 * (1 + 0.003 * r.normal()) * (1 - 0.01 * r.uniform());
      s += x;
      s2 += x * x;
    }
    const sd = Math.sqrt(s2 / n - (s / n) ** 2) / 800;
    expect(Math.abs(sd / m.sigmaRelative - 1)).toBeLessThan(0.01);
  });

  it('puts the long-wavelength end of a positively tilted camera farther from the grating, in both pixel directions', () => {
    for (const wavelengthIncreasesWithPixel of [true, false]) {
      const g: GratingGeometry = { ...FLAT_FIELD_PROFILE, wavelengthIncreasesWithPixel, detectorCenterPixel: 1023.5, detectorAngleDeg: 74, detectorTiltDeg: modelTiltDeg(12, wavelengthIncreasesWithPixel) };
      const lo = 0;
      const hi = 2047;
      const longEnd = pixelToWavelengthNm(g, hi) > pixelToWavelengthNm(g, lo) ? hi : lo;
      const shortEnd = longEnd === hi ? lo : hi;
      // Distance from the grating to a point s along the plane (grating.ts's geometry): |L·u0 + s·v| with v·u0 = sin θ.
      const distance = (p: number): number => {
        const s = (p - g.detectorCenterPixel) * g.pixelPitchUm * 1e-3;
        const t = (g.detectorTiltDeg * Math.PI) / 180;
        return Math.hypot(g.detectorDistanceMm + s * Math.sin(t), s * Math.cos(t));
      };
      expect(distance(longEnd)).toBeGreaterThan(distance(shortEnd));
    }
  });

  it('centres the tilt search on the profile when it states a tilt, and spans perpendicular through 90° − β0 when not', () => {
    const driver = { nominalNm: 800, sigmaRelative: 0.003, blueShiftRelative: 0.01 };
    const stated = buildPriors({ ...FLAT_FIELD_PROFILE, detectorTiltDeg: 12 }, 2048, driver, DEFAULT_RANGES);
    expect(stated.nominal[P_TILT]).toBe(12);
    expect(stated.walls[P_TILT]).toMatchObject({ lo: 9, hi: 15 });
    expect(flatFieldTiltDeg(FLAT_FIELD_PROFILE)).toBeCloseTo(16, 9);
    const unstated = buildPriors(FLAT_FIELD_PROFILE, 2048, driver, DEFAULT_RANGES);
    expect(unstated.walls[P_TILT]!.lo).toBeLessThanOrEqual(-5);
    expect(unstated.walls[P_TILT]!.hi).toBeGreaterThanOrEqual(16);
    expect(unstated.notes.join(' ')).toMatch(/states no detector tilt/);
    // The driver band is the blue-shift band below the measured value, with Gaussian tails of its σ.
    expect(unstated.walls[P_DRIVER]).toMatchObject({ lo: 792, hi: 800 });
    expect(unstated.walls[P_DRIVER]!.softness).toBeCloseTo(2.4, 9);
  });
});

describe('context', () => {
  it('refuses a tilt that no camera has and a negative blue shift, naming them', () => {
    const c = regimeCase(REGIMES[0], 1);
    expect(assignOrders(c.sim.peaks, { ...c.input, profile: { ...c.input.profile, detectorTiltDeg: 60 } }).message).toMatch(/detectorTiltDeg/);
    expect(assignOrders(c.sim.peaks, { ...c.input, blueShiftPct: -1 }).message).toMatch(/blue-shift/);
  });
});

describe('verdict gates', () => {
  it('passes every gate on a clean realignment and says so', () => {
    const c = regimeCase(REGIMES[0], 2);
    const r = assignOrders(c.sim.peaks, c.input);
    expect(r.status).toBe('unique');
    expect(r.gates.map((g) => g.name)).toEqual(['fit', 'explained', 'comb', 'priors', 'lines', 'margin']);
    expect(r.gates.every((g) => g.passed)).toBe(true);
  });

  it('fit gate: centroids that claim 0.001 px but scatter by 0.3 px are not unique', () => {
    const c = regimeCase(REGIMES[0], 3);
    const r0 = rng(5);
    const peaks = c.sim.peaks.map((p) => ({ ...p, pixel: p.pixel + 0.3 * r0.normal(), pixelSigma: 0.001 }));
    const r = assignOrders(peaks, c.input);
    expect(r.status).not.toBe('unique');
    expect(r.message).toMatch(/fit gate/);
  });

  it('explained gate: a comb beside many bright lines it cannot explain is not unique', () => {
    const c = regimeCase(REGIMES[0], 4);
    const r0 = rng(9);
    const stray = Array.from({ length: 14 }, () => ({ ...c.sim.peaks[0], pixel: 30 + 1990 * r0.uniform(), snr: 300, area: 9e4, spatialWidthPx: 25 }));
    const r = assignOrders([...c.sim.peaks, ...stray], c.input);
    expect(r.status).not.toBe('unique');
    if (r.status === 'ambiguous') expect(r.gates.some((g) => !g.passed)).toBe(true);
  });

  it('priors gate: a camera 25 % farther than the profile says is never called unique', () => {
    for (let seed = 1; seed <= 6; seed++) {
      const c = regimeCase(REGIMES[0], seed);
      const r = assignOrders(c.sim.peaks, { ...c.input, profile: { ...c.input.profile, detectorDistanceMm: 235 / 1.25 } });
      expect(r.status, r.message).not.toBe('unique');
    }
  });

  it('never prints a margin as "only" when it passed', () => {
    for (const regime of REGIMES) {
      for (let seed = 1; seed <= 8; seed++) {
        const c = regimeCase(regime, seed);
        const few = { ...c, sim: { ...c.sim, peaks: c.sim.peaks.filter((_, i) => i % 3 === 0) } };
        for (const r of [assignOrders(c.sim.peaks, c.input), assignOrders(few.sim.peaks, c.input)]) {
          const m = /trails by only ([0-9.]+) \(unique needs ([0-9.]+)\)/.exec(r.message);
          if (m) expect(Number(m[1])).toBeLessThan(Number(m[2]));
          if (r.status === 'ambiguous') expect(r.gates.some((g) => !g.passed)).toBe(true);
        }
      }
    }
  });
});
