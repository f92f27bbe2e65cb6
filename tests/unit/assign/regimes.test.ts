/**
 * Issue 14's confidently-wrong regimes, each failing before the priors and gates of priors.ts and
 * verdict.ts: a flat-field camera tilted 10–16° (from memory: a flat focal plane's normal sits
 * roughly 90° − β0 off the central ray), the diffraction angle moved by up to 0.3° while the profile
 * states it, the distance off by 8 %, a laser at 805 nm entered as "800 nm". 40 random
 * realignments each (peak lists from the forward model, tests/unit/assign/regimes.ts).
 */
import { describe, expect, it } from 'vitest';
import { assignOrders } from '../../../shared/engine/assign/index.ts';
import { regimeCase, REGIMES } from './regimes.ts';

const SEEDS = 40;

describe('realignment regimes of real flat-field instruments', () => {
  for (const regime of REGIMES) {
    it(`${regime.name}: never unique and wrong, mostly unique and right`, () => {
      let right = 0;
      for (let seed = 1; seed <= SEEDS; seed++) {
        const c = regimeCase(regime, seed);
        const r = assignOrders(c.sim.peaks, c.input);
        if (r.status !== 'unique') continue;
        const wrong = r.best!.labels.filter((l, i) => l.harmonic !== null && (l.harmonic !== c.sim.truth[i].harmonic || l.diffractionOrder !== c.sim.truth[i].diffractionOrder));
        expect(wrong, `seed ${seed}: ${r.message}`).toEqual([]);
        right++;
        // The scale: the stated 1σ is a real 1σ of the driver prior; 3.5σ is generous for a 40-draw test.
        expect(Math.abs(r.driverNm - c.sim.effectiveDriverNm) / r.driverSigmaNm, `seed ${seed}`).toBeLessThan(3.5);
      }
      // These frames hold 12+ bright lines: the data decide them (the old engine got ≥ 90 % of them
      // right as well, but called the rest unique and wrong).
      expect(right).toBeGreaterThanOrEqual(0.9 * SEEDS);
    });
  }

  it('a laser at 805 nm entered as "800 nm" (0.3 % σ) keeps its axis within its stated band', () => {
    const regime = REGIMES.find((r) => r.name.startsWith('laser'))!;
    const c = regimeCase(regime, 3);
    const r = assignOrders(c.sim.peaks, c.input);
    expect(r.status).toBe('unique');
    // The old one-sided window put λ0 at 798.8 nm ± 0.57 nm against an effective 800-805 nm.
    const pull = Math.abs(r.driverNm - c.sim.effectiveDriverNm) / r.driverSigmaNm;
    expect(pull).toBeLessThan(2.5);
    expect(r.notes.join(' ')).toMatch(/blue-shift/);
  });
});
