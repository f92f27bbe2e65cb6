/** analyseScan on contrived scans with known modulation and cutoff law (table-driven, noise-free). */
import { describe, expect, it } from 'vitest';
import { analyseScan, type ScanFrame } from '../../../shared/analysis/scan.ts';

function scan(values: number[], yieldOf: (q: number, x: number) => number, cutoff?: (x: number) => number): ScanFrame[] {
  return values.map((x, i) => ({
    frameId: `f${i}`,
    scanValue: x,
    orders: [21, 23, 25].map((q) => ({ harmonic: q, diffractionOrder: 1, yield: yieldOf(q, x), yieldSigma: 1, energyEv: q * 1.55 })),
    cutoffEv: cutoff ? cutoff(x) : null,
  }));
}

describe('analyseScan', () => {
  const phases = Array.from({ length: 12 }, (_, k) => (2 * Math.PI * k) / 12);

  it('map and curves: orders × values, frames at one value averaged', () => {
    const frames = [...scan([0, 1, 2], (q, x) => q + x), ...scan([1], (q, x) => q + x + 2)];
    const a = analyseScan(frames);
    expect(a.values).toEqual([0, 1, 2]);
    expect(a.harmonics).toEqual([21, 23, 25]);
    expect(a.yieldMap[0]).toEqual([21, 23, 23]); // value 1: mean of 22 and 24
    expect(a.curves[0].points[1]).toMatchObject({ x: 1, frames: 2, yieldSigma: Math.SQRT2 / 2 });
  });

  it('modulation per order: amplitude and phase of 100 + 30·cos(x + 0.05q)', () => {
    const a = analyseScan(scan(phases, (q, x) => 100 + 30 * Math.cos(x + 0.05 * q)));
    for (const m of a.modulation) {
      expect(m.fit!.amplitude).toBeCloseTo(30, 9);
      expect(m.fit!.phaseRad).toBeCloseTo(0.05 * m.harmonic, 9);
      expect(m.fit!.modulationDepth).toBeCloseTo(0.3, 9);
    }
  });

  it('cutoff versus field strength: E_c ∝ I¹ gives exponent 1 (E_c = Ip + 3.17 Up, Up ∝ I; Ip neglected here)', () => {
    // Intensities in 1e14 W/cm²; cutoff in eV from 3.17·Up with Up = 9.33 eV per 1e14 W/cm² at 1 µm
    // (Up[eV] = 9.33·I[1e14 W/cm²]·λ²[µm], common practice; from memory).
    const a = analyseScan(scan([1, 1.5, 2, 3, 4], () => 10, (i) => 3.17 * 9.33 * i));
    expect(a.cutoff.fit!.exponent).toBeCloseTo(1, 12);
    expect(a.cutoff.fit!.prefactor).toBeCloseTo(3.17 * 9.33, 10);
  });

  it('too few points: the fit is null with the reason, the rest still returned', () => {
    const a = analyseScan(scan([0, 1, 2], () => 5));
    expect(a.modulation[0].fit).toBeNull();
    expect(a.modulation[0].message).toContain('at least 4 points');
    expect(a.cutoff.fit).toBeNull();
    expect(a.cutoff.message).toContain('at least 3 points, got 0');
  });

  it('an empty scan is refused', () => {
    expect(() => analyseScan([])).toThrow('no applied frames');
  });
});
