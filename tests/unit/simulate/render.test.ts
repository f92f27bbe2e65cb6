// simulateFrame: rendered lines against the truth it reports, and the truth against the grating
// equation (shared/engine/grating.ts, itself m·λ = d(sin α − sin β): common practice).
import { describe, expect, it } from 'vitest';
import { pixelToWavelengthNm, wavelengthToPixel } from '../../../shared/engine/grating.ts';
import { simulateFrame } from '../../../shared/engine/simulate/index.ts';
import { EngineError } from '../../../shared/engine/errors.ts';
import { at, baseScenario, centroid, lineout, meanVariance, windowSum } from './helpers.ts';

describe('simulateFrame line positions', () => {
  it.each([
    ['x', 1024, 256],
    ['y', 256, 1024],
  ] as const)('rendered centroids match truth positions (spectral axis %s)', (axis, width, height) => {
    const scenario = baseScenario({ spectralAxis: axis, width, height, lineShape: { tiltPxPerPx: 0.02, curvaturePxPerPx2: 2e-5 } });
    const { frame, truth } = simulateFrame(scenario, 11);
    expect(frame.width).toBe(width);
    expect(frame.height).toBe(height);
    const first = truth.lines.filter((l) => l.diffractionOrder === 1 && l.pixel > 10 && l.pixel < 1013);
    expect(first.length).toBeGreaterThanOrEqual(5);
    // The row at the spatial centre carries the line at the truth position (tilt and curvature vanish there).
    const row = Math.round(scenario.spatialCentrePx);
    const one = lineout(frame, axis, row, row + 1, scenario.pedestalCounts ?? 0);
    for (const line of first) {
      const c = centroid(one, line.pixel - 8, line.pixel + 8);
      expect(Math.abs(c - line.pixel)).toBeLessThan(0.1);
    }
    // Away from the centre the line moves by tilt·d + curvature·d².
    const d = 15;
    const off = lineout(frame, axis, row + d, row + d + 1, scenario.pedestalCounts ?? 0);
    const expectedShift = 0.02 * d + 2e-5 * d * d;
    for (const line of first.slice(1, 4)) {
      const c = centroid(off, line.pixel + expectedShift - 8, line.pixel + expectedShift + 8);
      expect(Math.abs(c - (line.pixel + expectedShift))).toBeLessThan(0.25);
    }
  });

  it('truth positions follow the grating equation: λ at the pixel equals driver/q', () => {
    const scenario = baseScenario();
    const { truth } = simulateFrame(scenario, 1);
    for (const line of truth.lines) {
      expect(pixelToWavelengthNm(scenario.geometry, line.pixel, line.diffractionOrder)).toBeCloseTo(796 / line.harmonic, 9);
      expect(line.energyEv).toBeCloseTo(1239.841984 / (796 / line.harmonic), 5);
    }
    // wavelengthNmAtPixel is the first-order map at every pixel.
    expect(truth.wavelengthNmAtPixel[500]).toBe(pixelToWavelengthNm(scenario.geometry, 500, 1));
  });

  it('m = 2 lines land where 2λ lands in first order and are spatially narrower', () => {
    const scenario = baseScenario({ secondOrderRelativeStrength: 0.3, envelope: { plateauPhotons: 3e6, cutoffHarmonic: 80, jitterRelative: 0 } });
    const { frame, truth } = simulateFrame(scenario, 2);
    const second = truth.lines.filter((l) => l.diffractionOrder === 2);
    expect(second.length).toBeGreaterThan(3);
    const pedestal = scenario.pedestalCounts ?? 0;
    const band = lineout(frame, 'x', truth.signal.start, truth.signal.end, pedestal);
    let checked = 0;
    for (const line of second) {
      const firstOrderPixel = wavelengthToPixel(scenario.geometry, (2 * 796) / line.harmonic, 1);
      expect(line.pixel).toBeCloseTo(firstOrderPixel, 6);
      // Isolated from every other line by 15 px: measure it in the frame.
      const isolated = truth.lines.every((o) => o === line || Math.abs(o.pixel - line.pixel) > 15);
      if (!isolated || line.pixel < 10 || line.pixel > 1013) continue;
      expect(Math.abs(centroid(band, line.pixel - 7, line.pixel + 7) - firstOrderPixel)).toBeLessThan(0.15);
      checked += 1;
    }
    expect(checked).toBeGreaterThan(2);
    // Divergence falls with order: harmonic q in m = 2 is narrower than harmonic ~q/2 in m = 1 at about the same place.
    for (const line of second) {
      const neighbour = truth.lines.filter((l) => l.diffractionOrder === 1).sort((a, b) => Math.abs(a.pixel - line.pixel) - Math.abs(b.pixel - line.pixel))[0];
      expect(line.spatialFwhmPx).toBeLessThan(neighbour.spatialFwhmPx);
    }
    // Measured spatial RMS across the frame agrees: m = 2 line vs a first-order line.
    const rms = (pixel: number): number => {
      const column = Math.round(pixel);
      let sw = 0;
      let sws = 0;
      let swss = 0;
      for (let s = 0; s < frame.height; s += 1) {
        const w = at(frame, 'x', column, s) - pedestal;
        sw += w;
        sws += w * s;
        swss += w * s * s;
      }
      const mean = sws / sw;
      return Math.sqrt(swss / sw - mean * mean);
    };
    const strongSecond = second.filter((l) => l.pixel > 20 && l.pixel < 1003 && truth.lines.every((o) => o === l || Math.abs(o.pixel - l.pixel) > 15)).sort((a, b) => b.photons - a.photons)[0];
    const strongFirst = truth.lines.filter((l) => l.diffractionOrder === 1 && l.pixel > 20 && l.pixel < 1003).sort((a, b) => b.photons - a.photons)[0];
    expect(rms(strongSecond.pixel)).toBeLessThan(rms(strongFirst.pixel));
  });
});

describe('simulateFrame noise and camera', () => {
  it('is deterministic from its seed and differs between seeds', () => {
    const scenario = baseScenario({ hotPixelFraction: 1e-4, cosmicRayCount: 5, bitDepth: 16 });
    const a = simulateFrame(scenario, 5);
    const b = simulateFrame(scenario, 5);
    const c = simulateFrame(scenario, 6);
    const differing = (x: Float32Array, y: Float32Array): number => x.reduce((n, v, i) => n + (v === y[i] ? 0 : 1), 0);
    expect(differing(a.frame.data, b.frame.data)).toBe(0);
    expect(Array.from(a.truth.hotPixelIndices)).toEqual(Array.from(b.truth.hotPixelIndices));
    expect(differing(a.frame.data, c.frame.data)).toBeGreaterThan(a.frame.data.length / 2);
  });

  it.each([
    [200, 2, 5],
    [5, 1.5, 3],
  ])('flat field of %d photons/px, gain %d, read %d: variance ≈ gain·(mean − pedestal) + read²', (photons, gain, read) => {
    // Poisson shot noise through a gain plus Gaussian read noise (common practice): the
    // photon-transfer relation var = g·S + σ_read², S = signal above pedestal in counts.
    const scenario = baseScenario({
      width: 256,
      height: 256,
      envelope: { plateauPhotons: 0, cutoffHarmonic: 80 },
      continuum: { photonsPerPixel: photons },
      gainCountsPerPhoton: gain,
      readNoiseCounts: read,
      pedestalCounts: 100,
    });
    const { frame } = simulateFrame(scenario, 21);
    const { mean, variance } = meanVariance(frame.data);
    expect(mean - 100).toBeCloseTo(gain * photons, -Math.log10(gain * photons * 0.01));
    const expected = gain * (mean - 100) + read * read;
    expect(Math.abs(variance / expected - 1)).toBeLessThan(0.03);
  });

  it('16-bit frames are whole numbers clipped at 65535, with the clipped pixels counted', () => {
    const scenario = baseScenario({ bitDepth: 16, envelope: { plateauPhotons: 2e8, cutoffHarmonic: 80, jitterRelative: 0 } });
    const { frame, truth } = simulateFrame(scenario, 3);
    let clipped = 0;
    let bad = 0;
    for (const v of frame.data) {
      if (!Number.isInteger(v) || v < 0 || v > 65535) bad += 1;
      if (v === 65535) clipped += 1;
    }
    expect(bad).toBe(0);
    expect(clipped).toBeGreaterThan(0);
    expect(truth.saturatedPixels).toBe(clipped);
    expect(frame.fullScale).toBe(65535);
    expect(frame.bitsPerSample).toBe(16);
  });

  it('line photons are conserved: the band sum of a line is close to its photons times gain', () => {
    const scenario = baseScenario({ gainCountsPerPhoton: 2 });
    const { frame, truth } = simulateFrame(scenario, 4);
    const all = lineout(frame, 'x', 0, frame.height, scenario.pedestalCounts ?? 0);
    const line = truth.lines.filter((l) => l.pixel > 50 && l.pixel < 970).sort((a, b) => b.photons - a.photons)[0];
    const measured = windowSum(all, line.pixel - 10, line.pixel + 10);
    // Poisson spread of 3e6 photons is 0.06 %; read noise over 21·256 px adds ~150 counts.
    expect(Math.abs(measured / (2 * line.photons) - 1)).toBeLessThan(0.01);
  });

  it('hot pixels and cosmic rays sit where the truth says', () => {
    const scenario = baseScenario({ hotPixelFraction: 2e-4, hotPixelCounts: 5000, cosmicRayCount: 10, envelope: { plateauPhotons: 0, cutoffHarmonic: 80 } });
    const { frame, truth } = simulateFrame(scenario, 8);
    expect(truth.hotPixelIndices.length).toBe(Math.round(2e-4 * 1024 * 256));
    for (const i of truth.hotPixelIndices) expect(frame.data[i]).toBeGreaterThan(100 + 2000);
    expect(truth.cosmicPixelIndices.length).toBeGreaterThanOrEqual(10);
    for (const i of truth.cosmicPixelIndices) expect(frame.data[i]).toBeGreaterThan(100 + 300);
  });

  it('weak lines are marked not visible, strong ones visible', () => {
    const scenario = baseScenario({ envelope: { plateauPhotons: 3e4, cutoffHarmonic: 29, rollOffOrders: 0.5, jitterRelative: 0 }, readNoiseCounts: 10 });
    const { truth } = simulateFrame(scenario, 9);
    const below = truth.lines.filter((l) => l.harmonic <= 25);
    const above = truth.lines.filter((l) => l.harmonic >= 35);
    expect(below.every((l) => l.visible)).toBe(true);
    expect(above.every((l) => !l.visible)).toBe(true);
    expect(truth.visibleLineCount).toBe(truth.lines.filter((l) => l.visible).length);
  });

  it('refuses a malformed scenario with a plain message', () => {
    expect(() => simulateFrame(baseScenario({ width: 0 }), 1)).toThrow(EngineError);
    expect(() => simulateFrame(baseScenario({ lineFwhmPx: -1 }), 1)).toThrow(/lineFwhmPx/);
  });
});
