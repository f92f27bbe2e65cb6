/**
 * The sentence that says what fixed a calibration's scale. The map below is an invented straight
 * line, λ(p) = 50 nm − 10 nm·u with u = (p − 500)/500, whose band is worked out by hand:
 * σλ(p = 500) = √(0.001² + (50 nm · 1e-5)²) nm = 1.118e-3 nm, so at E = hc/50 nm = 24.797 eV
 * (hc = 1239.841984 eV·nm, CODATA 2018) σE = E·σλ/λ = 5.54e-4 eV.
 */
import { describe, expect, it } from 'vitest';
import { anchorEnergySigmasEv, describeAbsoluteScale } from '../../../shared/engine/scale-note.ts';
import type { Calibration, ScaleAnchor } from '../../../shared/engine/types.ts';

const base: Calibration = {
  format: 'orderly-calibration/1',
  model: 'polynomial',
  spectralAxis: 'x',
  pixelCount: 1001,
  polynomial: { degree: 1, domainPx: [0, 1000], coefficients: [50, -10], covariance: [[1e-6, 0], [0, 0]], degreeCriterion: 'test' },
  driverNm: 800,
  driverSigmaNm: 0.008,
  parity: 'odd',
  absoluteScale: 'anchored',
  scaleSigmaRelative: 1e-5,
  unanchoredScaleSigmaRelative: 0.0104,
  residualRmsNm: 0,
  reducedChiSquare: 1,
  points: [],
  filters: [],
  notes: [],
};
const line: ScaleAnchor = { kind: 'known-line', label: 'Ar II', pixel: 500, pixelSigma: 0.01, energyEv: 24.797, energySigmaEv: 0 };

describe('describeAbsoluteScale', () => {
  it('works out the energy band at the anchor by hand', () => {
    expect(anchorEnergySigmasEv(base, [line])[0]).toBeCloseTo(((1239.841984 / 50) * Math.sqrt(1e-6 + (50 * 1e-5) ** 2)) / 50, 9);
  });

  it('one known line', () => {
    expect(describeAbsoluteScale({ ...base, anchors: [line] })).toBe(
      'Scale anchored by 1 known line (Ar II at px 500.0): ±0.00055 eV at the line, ±0.0010 % of the scale (1σ); the driver tolerance alone would leave ±1.0 %.',
    );
  });

  it('two lines and an edge', () => {
    const edge: ScaleAnchor = { ...line, kind: 'filter-edge', label: 'Al L2,3 edge', pixel: 250 };
    expect(describeAbsoluteScale({ ...base, anchors: [line, { ...line, label: 'Ne', pixel: 750 }, edge], unanchoredScaleSigmaRelative: undefined })).toMatch(
      /^Scale anchored by 2 known lines and 1 filter edge \(Ar II at px 500\.0; Ne at px 750\.0; Al L2,3 edge at px 250\.0\): ±0\.00055 eV, ±[0-9.]+ eV, ±[0-9.]+ eV at them, ±0\.0010 % of the scale \(1σ\)\.$/,
    );
  });

  it('not anchored', () => {
    expect(describeAbsoluteScale({ ...base, absoluteScale: 'driver-tolerance', scaleSigmaRelative: 0.0104 })).toBe(
      'Scale not anchored: known only to the driver tolerance (±1.0 %, 1σ). A known line, or a filter edge on a continuum, would pin it.',
    );
  });

  it('an anchored file that does not say by what', () => {
    expect(describeAbsoluteScale(base)).toBe('Scale anchored (±0.0010 % of the scale, 1σ); this calibration does not list what anchored it.');
  });
});
