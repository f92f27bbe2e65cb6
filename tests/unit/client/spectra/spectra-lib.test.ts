import { describe, expect, it } from 'vitest';
import { lineFwhm } from '@/features/spectra/lib/line-width';
import { atPixel, axisSeries, orderLabels, orderName } from '@/features/spectra/lib/spectrum-axis';
import { niceTicks, sinusoidAt } from '@/features/runs/lib/ticks';
import { formatYield } from '@/features/spectra/components/orders-table';

const gaussian = (n: number, centre: number, sigma: number, height: number) => Array.from({ length: n }, (_, i) => height * Math.exp(-((i - centre) ** 2) / (2 * sigma * sigma)));

describe('lineFwhm', () => {
  // FWHM of a Gaussian = 2·√(2 ln 2)·σ ≈ 2.35482·σ (standard result, e.g. Bevington & Robinson §2.3).
  // Linear interpolation between samples under-reads narrow lines: measured here, about 1 % at
  // σ = 3 px and 5 % at σ = 1.5 px (FWHM 3.5 px), which the table's "FWHM" column accepts.
  it.each([
    [3, 100.0, 0.01],
    [5, 100.3, 0.01],
    [1.5, 60.6, 0.05],
  ])('measures 2.3548·σ for σ = %s px at pixel %s (relative tolerance %s)', (sigma, centre, tolerance) => {
    const counts = gaussian(200, centre, sigma, 1000);
    const energy = Array.from({ length: 200 }, (_, i) => 80 - 0.05 * i);
    const w = lineFwhm(counts, energy, centre);
    expect(w).not.toBeNull();
    expect(Math.abs(w!.fwhmPx - 2.35482 * sigma)).toBeLessThan(tolerance * 2.35482 * sigma);
    expect(w!.fwhmEv).toBeCloseTo(w!.fwhmPx * 0.05, 10);
  });

  it('gives up when the line never falls to half maximum inside the window', () => {
    const flat = new Array(100).fill(10);
    expect(lineFwhm(flat, flat, 50)).toBeNull();
    expect(lineFwhm(gaussian(100, 50, 3, 1), flat, 150)).toBeNull();
  });
});

describe('axisSeries', () => {
  const s = {
    wavelengthNm: [10, 20, 30, 40],
    energyEv: [124, 62, 41.3, 31],
    intensity: [1, 2, 3, 4],
    intensitySigma: [0.1, 0.2, 0.3, 0.4],
    intensityPerEv: [5, 6, 7, 8],
    intensityPerEvSigma: [0.5, 0.6, 0.7, 0.8],
  };
  it('keeps pixel order on a rising wavelength axis, counts per pixel', () => {
    const a = axisSeries(s, 'wavelength');
    expect(a.x).toEqual([10, 20, 30, 40]);
    expect(a.y).toEqual([1, 2, 3, 4]);
    expect(a.yLabel).toContain('counts / pixel');
  });
  it('reverses to ascending energy and uses the per-eV intensity (the Jacobian-weighted one)', () => {
    const a = axisSeries(s, 'energy');
    expect(a.x).toEqual([31, 41.3, 62, 124]);
    expect(a.y).toEqual([8, 7, 6, 5]);
    expect(a.ySigma).toEqual([0.8, 0.7, 0.6, 0.5]);
    expect(a.indexOfPixel).toEqual([3, 2, 1, 0]);
    expect(a.yLabel).toContain('counts / eV');
  });
  it('labels detected orders at their pixel on the peak top and skips undetected ones', () => {
    const orders = [
      { harmonic: 21, diffractionOrder: 1, pixel: 1.5, detected: true },
      { harmonic: 11, diffractionOrder: 2, pixel: 2, detected: true },
      { harmonic: 23, diffractionOrder: 1, pixel: 0.5, detected: false },
    ] as never;
    const labels = orderLabels({ ...s, orders }, 'wavelength');
    expect(labels.map((l) => l.text)).toEqual(['H21', 'H11 (m=2)']);
    expect(labels[0].x).toBe(25);
    expect(labels[0].y).toBe(4);
    expect(atPixel([0, 10], 0.25)).toBe(2.5);
    expect(orderName({ harmonic: 5, diffractionOrder: 1 })).toBe('H5');
  });
});

describe('niceTicks and sinusoidAt', () => {
  it('steps by 1, 2 or 5 × 10^k (common practice)', () => {
    expect(niceTicks(0, 6.28, 6)).toEqual([0, 2, 4, 6]);
    expect(niceTicks(0, 6.28, 10)).toEqual([0, 1, 2, 3, 4, 5, 6]);
    expect(niceTicks(0.3, 2.1, 4)).toEqual([0.5, 1, 1.5, 2]);
    expect(niceTicks(3, 3)).toEqual([3]);
  });
  it('evaluates a + b·cos(2πx/P + φ)', () => {
    const fit = { offset: 10, amplitude: 2, phaseRad: Math.PI / 2, period: 4 };
    expect(sinusoidAt(0, fit)).toBeCloseTo(10, 12);
    expect(sinusoidAt(3, fit)).toBeCloseTo(12, 12);
  });
});

describe('formatYield', () => {
  it.each([
    [1234.4, 56.2, '1234 ± 56'],
    [745_123, 1_234, '(7.451 ± 0.012)·10⁵'],
    [1_070_000, 990, '(1.0700 ± 0.0010)·10⁶'],
    [2.5e7, 2e6, '(2.50 ± 0.20)·10⁷'],
  ])('%s ± %s → %s', (v, s, text) => {
    expect(formatYield(v, s)).toBe(text);
  });
});
