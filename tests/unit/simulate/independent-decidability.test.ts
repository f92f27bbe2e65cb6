// The evaluation's independent decidability check and its bounded least squares: known problems
// with known answers, a comb that cannot decide, one that clearly can, and the filter exclusion.
import { describe, expect, it } from 'vitest';
import { HC_EV_NM } from '../../../shared/engine/constants.ts';
import { wavelengthToPixel } from '../../../shared/engine/grating.ts';
import type { SimLine } from '../../../shared/engine/simulate/index.ts';
import { boundedLeastSquares, solveLeastSquares } from '../../eval/bounded-least-squares.ts';
import { independentDecidability, INDEPENDENT_MARGIN, matchPeaksToLines, type DecidabilityTruth } from '../../eval/independent-decidability.ts';
import { fieldPeakList, type FieldPeakListOptions } from '../assign/field-peaks.ts';

describe('boundedLeastSquares', () => {
  it('solves an overdetermined linear system by QR: the exact line through exact data (contrived problem)', () => {
    // y = 2 + 3x at x = 0..4, design [1, x].
    const a = new Float64Array([1, 0, 1, 1, 1, 2, 1, 3, 1, 4]);
    const b = new Float64Array([2, 5, 8, 11, 14]);
    const x = solveLeastSquares(a, b, 5, 2);
    expect(x[0]).toBeCloseTo(2, 10);
    expect(x[1]).toBeCloseTo(3, 10);
  });

  it('finds the Rosenbrock minimum (1, 1) from the classic start (−1.2, 1) inside wide bounds (common practice test problem)', () => {
    const fit = boundedLeastSquares((p) => [1 - p[0], 10 * (p[1] - p[0] * p[0])], [-1.2, 1], [-3, -3], [3, 3]);
    expect(fit.parameters[0]).toBeCloseTo(1, 5);
    expect(fit.parameters[1]).toBeCloseTo(1, 5);
    expect(fit.chiSquare).toBeLessThan(1e-10);
  });

  it('stops at a bound when the free minimum lies outside it', () => {
    // Minimum of (p − 3)² + (q − 1)² with p ≤ 2: p = 2, q = 1, χ² = 1.
    const fit = boundedLeastSquares((p) => [p[0] - 3, p[1] - 1], [0.5, 0], [0, -5], [2, 5]);
    expect(fit.parameters[0]).toBeCloseTo(2, 4);
    expect(fit.parameters[0]).toBeLessThanOrEqual(2);
    expect(fit.parameters[1]).toBeCloseTo(1, 6);
    expect(fit.chiSquare).toBeCloseTo(1, 4);
  });
});

/** The truth of a field peak list in the check's terms (lines where grating.ts puts them). */
function truthOf(options: FieldPeakListOptions, extra: Partial<DecidabilityTruth> = {}) {
  const list = fieldPeakList(options);
  const lines: SimLine[] = list.truth.flatMap((t) => {
    if (t.harmonic === null || t.diffractionOrder === null) return [];
    const wavelengthNm = list.effectiveDriverNm / t.harmonic;
    return [{ harmonic: t.harmonic, diffractionOrder: t.diffractionOrder, pixel: wavelengthToPixel(list.geometry, wavelengthNm, t.diffractionOrder), wavelengthNm, firstOrderWavelengthNm: t.diffractionOrder * wavelengthNm, energyEv: HC_EV_NM / wavelengthNm, photons: 1, filterTransmission: 1, spatialFwhmPx: 10, snr: 100, visible: true }];
  });
  const truth: DecidabilityTruth = { lines, geometry: list.geometry, effectiveDriverNm: list.effectiveDriverNm, parity: options.parity ?? 'odd', ...extra };
  return { list, truth };
}

describe('independentDecidability', () => {
  it('a 19-line comb (odd q 23-59, 0.03 px centroids) on a 12°-tilted flat field is decidable by a wide margin', () => {
    const { list, truth } = truthOf({ tiltDeg: 12, seed: 3 });
    const d = independentDecidability(list.peaks, truth);
    expect(d.firstOrderLines).toBeGreaterThanOrEqual(15);
    expect(d.decidable, d.reason).toBe(true);
    expect(d.margin).toBeGreaterThan(10 * INDEPENDENT_MARGIN);
    // The true labelling fits to its noise: χ²/ν near 1 for centroids drawn with the stated σ.
    expect(d.truthChiSquare / (d.firstOrderLines - 5)).toBeLessThan(3);
  });

  it('three high orders (41, 43, 45) cannot decide: a one-step slip fits within the margin', () => {
    const { list, truth } = truthOf({ harmonicRange: [41, 45], seed: 4 });
    const d = independentDecidability(list.peaks, truth);
    expect(d.firstOrderLines).toBe(3);
    expect(d.decidable, d.reason).toBe(false);
    expect(d.margin).toBeLessThan(INDEPENDENT_MARGIN);
  });

  it('two lines decide nothing without an anchor', () => {
    const { list, truth } = truthOf({ harmonicRange: [25, 27] });
    const d = independentDecidability(list.peaks, truth);
    expect(d.firstOrderLines).toBe(2);
    expect(d.decidable).toBe(false);
    expect(d.reason).toMatch(/fewer than 3/);
  });

  it('peaks on stray light or m = 2 lines are not counted as first-order lines', () => {
    const { list, truth } = truthOf({ harmonicRange: [41, 45], secondOrderRelativeStrength: 0.2, spurious: [300.4] });
    const matched = matchPeaksToLines(list.peaks, truth.lines);
    expect(matched.filter((l) => l?.diffractionOrder === 2).length).toBeGreaterThan(0);
    expect(independentDecidability(list.peaks, truth).firstOrderLines).toBe(3);
  });

  it('a filter passband that the slipped energies would leave excludes every slip (a step filter, invented)', () => {
    // Truth q 41-45 of 800 nm lie at 63.6-69.8 eV; a slip moves them by ~1.5 eV either way
    // (λ0 held within 2.5 %), out of a 63.0-70.5 eV passband transmitting 1, 1e-4 outside.
    const passband = (_material: string, energyEv: number): number => (energyEv >= 63 && energyEv <= 70.5 ? 1 : 1e-4);
    const { list, truth } = truthOf({ harmonicRange: [41, 45], seed: 4 }, { filters: [{ material: 'passband', thicknessNm: 1 }] });
    const withFilter = independentDecidability(list.peaks, truth, { transmission: passband });
    expect(withFilter.slips.every((s) => s.excluded !== undefined), JSON.stringify(withFilter.slips)).toBe(true);
    expect(withFilter.decidable).toBe(true);
  });

  it('an edge seen on a continuum (an anchor) lets two lines decide', () => {
    const { list, truth } = truthOf({ harmonicRange: [25, 27] });
    const anchorNm = 800 / 29;
    const anchored = independentDecidability(list.peaks, { ...truth, anchors: [{ pixel: wavelengthToPixel(list.geometry, anchorNm, 1), pixelSigma: 0.5, wavelengthNm: anchorNm }] });
    expect(anchored.firstOrderLines).toBe(2);
    expect(anchored.decidable, anchored.reason).toBe(true);
  });
});
