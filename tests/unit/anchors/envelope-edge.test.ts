/**
 * An edge between two harmonics. Invented combs of an 800 nm driver (hc = 1239.841984 eV·nm,
 * CODATA 2018 exact: 1.5498 eV photons, gap 3.0996 eV for an odd comb); line areas = a plateau
 * times the filter's transmission from the Henke-based table (Al 200 nm: 0.735 at 72 eV, 0.029
 * at 73 eV, /work/shared/reference/README.md) with the Al L2,3 edge at its Henke step, 72.7 eV
 * (calibration-data/edges.json). PRODUCT.md (domain notes): an edge between two harmonics fixes
 * labels, not the scale.
 */
import { describe, expect, it } from 'vitest';
import { reportEnvelopeEdges, type EnvelopeLine } from '../../../shared/engine/anchors/index.ts';
import { foilTransmission } from '../../../shared/engine/filters/transmission.ts';

const HC = 1239.841984;
const DRIVER_NM = 800;
const photon = HC / DRIVER_NM;

/** Odd harmonics qFrom..qTo with area plateau × T_Al200(E). */
function comb(qFrom: number, qTo: number, plateau = 10_000): EnvelopeLine[] {
  const lines: EnvelopeLine[] = [];
  for (let q = qFrom; q <= qTo; q += 2) lines.push({ harmonic: q, energyEv: q * photon, area: plateau * foilTransmission('Al', q * photon, 200) });
  return lines;
}

describe('an edge between two harmonics fixes labels, not the scale', () => {
  it('Al L2,3 lies between q = 45 (69.7 eV) and 47 (72.8 eV); the strengths follow the step; the gap is 3.1 eV', () => {
    const [r] = reportEnvelopeEdges({ lines: comb(39, 55), filters: ['Al 200nm'], parity: 'odd', driverNm: DRIVER_NM });
    expect(r.edgeLabel).toBe('Al L2,3');
    expect([r.below.harmonic, r.above.harmonic]).toEqual([45, 47]);
    expect(r.gapEv).toBeCloseTo(2 * photon, 6);
    expect(r.verdict).toBe('consistent');
    expect(r.expectedLogDrop).toBeCloseTo(Math.log(foilTransmission('Al', 45 * photon) / foilTransmission('Al', 47 * photon)), 6);
    expect(r.message).toMatch(/^Al L2,3 edge lies between q = 45 and 47: fixes labels, not the scale \(the gap is 3\.1 eV\); the line strengths follow the step/);
  });

  it('the driver wavelength defaults to the lines’ own (median q·hc/E)', () => {
    const [r] = reportEnvelopeEdges({ lines: comb(39, 55), filters: ['Al'], parity: 'odd' });
    expect(r.gapEv).toBeCloseTo(2 * photon, 6);
  });

  it('a labelling slipped by one order puts the edge between lines whose strengths do not follow it', () => {
    // The same lines labelled q − 2: the hypothesis's energies scale by (q − 2)/q, its λ0 by q/(q − 2).
    const slipped = comb(39, 55).map((l) => ({ harmonic: l.harmonic - 2, energyEv: (l.energyEv * (l.harmonic - 2)) / l.harmonic, area: l.area }));
    const [r] = reportEnvelopeEdges({ lines: slipped, filters: ['Al'], parity: 'odd' });
    expect(r.verdict).toBe('inconsistent');
    expect(r.message).toContain('do not follow the step');
  });

  it('lines absent above an opaque edge agree with it when the table predicts them too weak to be seen (< 5σ)', () => {
    const lines = comb(39, 45).map((l) => ({ ...l, areaSigma: 100 }));
    const [r] = reportEnvelopeEdges({ lines, filters: ['Al'], parity: 'odd', driverNm: DRIVER_NM, detectorRangeEv: [55, 85] });
    expect(r.above.area).toBeNull();
    expect(r.verdict).toBe('consistent');
    expect(r.message).toContain('q = 47 is absent, as the filter');
  });

  it('a line missing above an edge that passes enough to see it is not consistent', () => {
    // 100 nm Al passes ~0.2 of the pre-edge above the edge: q = 47 should have ~2000 counts, 20σ.
    const lines = comb(39, 45).map((l) => ({ ...l, area: 10_000, areaSigma: 100 }));
    const [r] = reportEnvelopeEdges({ lines, filters: ['Al 100nm'], parity: 'odd', driverNm: DRIVER_NM, detectorRangeEv: [55, 85] });
    expect(r.verdict).toBe('inconsistent');
  });

  it('a step smaller than the envelope scatter cannot be tested (Zr M5: 12 % between q = 57 and 59 of 400 nm)', () => {
    const p = HC / 400;
    const lines: EnvelopeLine[] = [53, 55, 57, 59, 61].map((q) => ({ harmonic: q, energyEv: q * p, area: 5000 * foilTransmission('Zr', q * p) }));
    const [r] = reportEnvelopeEdges({ lines, filters: ['Zr'], parity: 'odd', driverNm: 400 });
    expect(r.edgeLabel).toBe('Zr M5');
    expect([r.below.harmonic, r.above.harmonic]).toEqual([57, 59]);
    expect(r.verdict).toBe('untestable');
    expect(r.gapEv).toBeCloseTo(2 * p, 6);
  });

  it('all orders (parity "all"): the gap is one photon', () => {
    const lines: EnvelopeLine[] = [];
    for (let q = 42; q <= 50; q++) lines.push({ harmonic: q, energyEv: q * photon, area: 1000 * foilTransmission('Al', q * photon) });
    const [r] = reportEnvelopeEdges({ lines, filters: ['Al'], parity: 'all', driverNm: DRIVER_NM });
    expect([r.below.harmonic, r.above.harmonic]).toEqual([46, 47]);
    expect(r.gapEv).toBeCloseTo(photon, 6);
  });

  it('edges outside the orders seen are not reported', () => {
    expect(reportEnvelopeEdges({ lines: comb(21, 31), filters: ['Al'], parity: 'odd', driverNm: DRIVER_NM })).toEqual([]);
  });

  it('refuses no lines and unknown filters by name', () => {
    expect(() => reportEnvelopeEdges({ lines: [], filters: ['Al'], parity: 'odd' })).toThrow('The envelope check needs at least one labelled first-order line (harmonic, photon energy, area).');
    expect(() => reportEnvelopeEdges({ lines: comb(41, 49), filters: ['Xx'], parity: 'odd' })).toThrow(/No transmission table for filter material "Xx"/);
  });
});
