/**
 * applyCalibration on an invented synthetic lineout (Gaussian lines of a 1800 nm driver's odd
 * harmonics placed by the grating equation, grating.ts) under a known calibration. Checks:
 * wavelength axis = forward model, photon energy = hc/λ (CODATA hc), conservation of counts
 * through the Jacobian (∫ intensityPerEv dE = Σ intensity, trapezoid rule), order labels,
 * yields, filter correction against the Henke-based table, and speed.
 */
import { describe, expect, it } from 'vitest';
import { applyCalibration } from '../../../shared/engine/apply.ts';
import { HC_EV_NM } from '../../../shared/engine/constants.ts';
import { fitPolynomialMap } from '../../../shared/engine/dispersion/polynomial-map.ts';
import { pixelToWavelengthNm, wavelengthToPixel } from '../../../shared/engine/grating.ts';
import { foilTransmission as filterTransmission } from '../../../shared/engine/filters/transmission.ts';
import type { Calibration, GratingGeometry, Lineout, Peak } from '../../../shared/engine/types.ts';

const N = 2048;
const DRIVER_NM = 1800;
const geometry: GratingGeometry = {
  grooveDensityPerMm: 1200,
  incidenceAngleDeg: 87,
  detectorDistanceMm: 470,
  pixelPitchUm: 13.5,
  wavelengthIncreasesWithPixel: true,
  detectorCenterPixel: 1023.5,
  detectorAngleDeg: 72,
  detectorTiltDeg: 5,
};

const cal: Calibration = {
  format: 'orderly-calibration/1',
  model: 'grating',
  spectralAxis: 'x',
  pixelCount: N,
  grating: { geometry, parameterNames: ['detectorAngleDeg'], parameters: [72], covariance: [[1e-8]] },
  driverNm: DRIVER_NM,
  driverSigmaNm: 2,
  parity: 'odd',
  absoluteScale: 'anchored',
  scaleSigmaRelative: 1e-4,
  residualRmsNm: 0.001,
  reducedChiSquare: 1,
  points: [],
  filters: [],
  notes: [],
};

interface Line {
  harmonic: number;
  order: number;
  pixel: number;
  area: number;
}

/** Invented demo spectrum: odd harmonics in first order, one second-order image, Gaussian σ = 2 px. */
function synthetic(): { lineout: Lineout; lines: Line[] } {
  const lines: Line[] = [];
  for (let q = 1; q < 200; q += 2) {
    const p = wavelengthToPixel(geometry, DRIVER_NM / q, 1);
    if (p > 20 && p < N - 20) lines.push({ harmonic: q, order: 1, pixel: p, area: 1000 + 37 * q });
  }
  const q2 = lines[lines.length - 1].harmonic * 2 + 1; // an odd harmonic whose m = 2 image falls on the detector
  const p2 = wavelengthToPixel(geometry, DRIVER_NM / q2, 2);
  lines.push({ harmonic: q2, order: 2, pixel: p2, area: 400 });
  const counts = new Float64Array(N);
  const s = 2;
  for (const line of lines) {
    for (let i = 0; i < N; i++) counts[i] += (line.area / (s * Math.sqrt(2 * Math.PI))) * Math.exp(-(((i - line.pixel) / s) ** 2) / 2);
  }
  const lineout: Lineout = {
    counts,
    variance: counts.map((c) => c + 4),
    saturated: new Uint8Array(N),
    band: new Float32Array(0),
    bandRows: 0,
    signal: { start: 0, end: 10 },
    background: [],
    lineShape: { tiltPxPerPx: 0, curvaturePxPerPx2: 0 },
    rejectedPixels: 0,
  };
  return { lineout, lines };
}

function peakOf(line: Line, offset = 0.03): Peak {
  return { pixel: line.pixel + offset, pixelSigma: 0.05, fwhmPx: 4.71, amplitude: line.area / 5, area: line.area, areaSigma: Math.sqrt(line.area), snr: 50, spatialWidthPx: Number.NaN, saturated: false };
}

describe('applyCalibration', () => {
  const { lineout, lines } = synthetic();
  const firstOrder = lines.filter((l) => l.order === 1);
  const second = lines.find((l) => l.order === 2)!;
  const missing = firstOrder[2]; // a line left out of the peak list: its yield comes from the counts
  const spurious: Peak = { ...peakOf(firstOrder[0]), pixel: (firstOrder[0].pixel + firstOrder[1].pixel) / 2 };
  const peaks = [...lines.filter((l) => l !== missing).map((l) => peakOf(l)), spurious].sort((a, b) => a.pixel - b.pixel);

  it('axes: λ from the grating equation, E = hc/λ, σ includes the scale term', () => {
    const out = applyCalibration(lineout, peaks, cal);
    expect(out.pixel).toHaveLength(N);
    for (const p of [0, 700, 2047]) {
      expect(out.wavelengthNm[p]).toBeCloseTo(pixelToWavelengthNm(geometry, p), 10);
      expect(out.energyEv[p]).toBeCloseTo(HC_EV_NM / out.wavelengthNm[p], 10);
      expect(out.wavelengthSigmaNm[p]).toBeGreaterThanOrEqual(out.wavelengthNm[p] * 1e-4);
    }
    expect(out.intensity).toEqual(Array.from(lineout.counts));
    expect(out.intensitySigma[100]).toBeCloseTo(Math.sqrt(lineout.variance[100]), 12);
  });

  it('conserves counts through the Jacobian: ∫ intensityPerEv dE = Σ intensity within 0.5 %', () => {
    const out = applyCalibration(lineout, peaks, cal);
    let integral = 0;
    for (let i = 1; i < N; i++) integral += 0.5 * (out.intensityPerEv[i] + out.intensityPerEv[i - 1]) * Math.abs(out.energyEv[i] - out.energyEv[i - 1]);
    const total = out.intensity.reduce((a, b) => a + b, 0);
    expect(Math.abs(integral / total - 1)).toBeLessThan(0.005);
  });

  it('labels every first-order harmonic and the second-order image; yields from areas or counts', () => {
    const out = applyCalibration(lineout, peaks, cal);
    for (const line of firstOrder) {
      const order = out.orders.find((o) => o.harmonic === line.harmonic && o.diffractionOrder === 1);
      expect(order, `H${line.harmonic}`).toBeDefined();
      expect(order!.predictedPixel).toBeCloseTo(line.pixel, 6);
      expect(order!.wavelengthNm).toBeCloseTo(DRIVER_NM / line.harmonic, 12);
      expect(order!.energyEv).toBeCloseTo((HC_EV_NM * line.harmonic) / DRIVER_NM, 10);
      if (line === missing) {
        expect(order!.detected).toBe(false);
        // ±¼ spacing window of a σ = 2 px Gaussian holds nearly all its counts.
        expect(order!.yield / line.area).toBeGreaterThan(0.98);
        expect(order!.yield / line.area).toBeLessThan(1.02);
      } else {
        expect(order!.detected).toBe(true);
        expect(order!.yield).toBe(line.area);
        expect(order!.pixel).toBeCloseTo(line.pixel + 0.03, 9);
      }
    }
    const image = out.orders.find((o) => o.diffractionOrder === 2);
    expect(image).toMatchObject({ harmonic: second.harmonic, diffractionOrder: 2, detected: true, yield: 400 });
    expect(out.notes).toContain('1 detected peak(s) match no predicted harmonic.');
    expect(out.cutoffEv).toBeCloseTo((HC_EV_NM * firstOrder[firstOrder.length - 1].harmonic) / DRIVER_NM, 9);
    // The output is plain JSON.
    expect(JSON.parse(JSON.stringify(out)).orders).toHaveLength(out.orders.length);
  });

  it('labels with a fitted polynomial calibration too (end to end)', () => {
    const points = firstOrder.map((l) => ({ pixel: l.pixel, pixelSigma: 0.05, wavelengthNm: DRIVER_NM / l.harmonic }));
    const fit = fitPolynomialMap(points, { pixelCount: N });
    const polyCal: Calibration = { ...cal, model: 'polynomial', grating: undefined, polynomial: fit.polynomial };
    const out = applyCalibration(lineout, peaks, polyCal);
    expect(out.orders.filter((o) => o.detected && o.diffractionOrder === 1)).toHaveLength(firstOrder.length - 1);
    for (const p of [100, 1000, 1900]) expect(Math.abs(out.wavelengthNm[p] - pixelToWavelengthNm(geometry, p))).toBeLessThan(0.005);
  });

  it('filter correction divides by the Henke transmission at each energy (Al 200 nm)', () => {
    const out = applyCalibration(lineout, peaks, { ...cal, filters: ['Al'] }, { filterCorrection: true });
    for (const p of [300, 1000, 1700]) {
      const t = filterTransmission('Al', out.energyEv[p]);
      expect(out.filterTransmission![p]).toBeCloseTo(t, 12);
      if (t > 1e-3) expect(out.intensity[p] * t).toBeCloseTo(lineout.counts[p], 9);
    }
    const h = out.orders.find((o) => o.detected && o.diffractionOrder === 1)!;
    expect(h.yield * filterTransmission('Al', h.energyEv)).toBeCloseTo(firstOrder.find((l) => l.harmonic === h.harmonic)!.area, 6);
  });

  it('clips the correction where T < 1e-3 and says so (In 200 nm is opaque here)', () => {
    const out = applyCalibration(lineout, peaks, { ...cal, filters: ['In'] }, { filterCorrection: true });
    expect(out.notes.some((n) => /^Filter transmission below 0.001 at \d+ pixels: the correction there is clipped at ×1000/.test(n))).toBe(true);
    const p = out.filterTransmission!.findIndex((t) => t < 1e-3);
    expect(out.intensity[p]).toBeCloseTo(lineout.counts[p] * 1000, 6);
  });

  it('outside the 15-300 eV tables the correction holds the nearest tabulated value and says so (filters/transmission.ts)', () => {
    // The same invented spectrometer turned to β = 60°, where it sees 9-13 eV: below every table.
    const low: Calibration = { ...cal, filters: ['Al'], grating: { geometry: { ...geometry, detectorAngleDeg: 60 }, parameterNames: ['detectorAngleDeg'], parameters: [60], covariance: [[1e-8]] } };
    const out = applyCalibration(lineout, [], low, { filterCorrection: true });
    expect(Math.max(...out.energyEv)).toBeLessThan(15);
    expect(out.notes).toContain(`${N} pixels lie outside the filter tables (15-300 eV): their correction holds the nearest tabulated transmission, so it is indicative only there.`);
    for (const p of [0, 1000, 2047]) {
      expect(out.filterTransmission![p]).toBe(filterTransmission('Al', 15));
      expect(out.intensity[p] * Math.max(out.filterTransmission![p], 1e-3)).toBeCloseTo(lineout.counts[p], 9);
    }
  });

  it('refuses a lineout of the wrong length', () => {
    expect(() => applyCalibration({ ...lineout, counts: new Float64Array(100), variance: new Float64Array(100) }, [], cal)).toThrow(
      'The lineout has 100 spectral pixels but the calibration was made for 2048.',
    );
  });
});
