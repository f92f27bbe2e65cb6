// Test helpers for the simulator: a hand-made grazing-incidence scenario and a plain lineout and
// centroid written here, independent of the engine's reduce/peaks modules.
import type { Frame } from '../../../shared/engine/types.ts';
import type { SimScenario } from '../../../shared/engine/simulate/types.ts';

const DEG = Math.PI / 180;

/**
 * An invented 1200 l/mm flat-field geometry at 87° incidence, 235 mm, 13.5 µm pixels, centred on
 * harmonic `centreHarmonic` of 800 nm (grating equation solved here by hand: sin β0 = sin α − λ/d).
 */
export function baseScenario(overrides: Partial<SimScenario> = {}, centreHarmonic = 25): SimScenario {
  const width = overrides.width ?? 1024;
  const height = overrides.height ?? 256;
  const alpha = 87;
  const centreNm = 800 / centreHarmonic;
  const beta0 = Math.asin(Math.sin(alpha * DEG) - (centreNm * 1200) / 1e6) / DEG;
  const spectral = (overrides.spectralAxis ?? 'x') === 'x' ? width : height;
  const spatial = (overrides.spectralAxis ?? 'x') === 'x' ? height : width;
  return {
    id: 'test',
    class: 'test',
    decidable: true,
    description: 'hand-made test scenario (invented)',
    geometry: {
      grooveDensityPerMm: 1200,
      incidenceAngleDeg: alpha,
      detectorDistanceMm: 235,
      pixelPitchUm: 13.5,
      wavelengthIncreasesWithPixel: true,
      detectorCenterPixel: (spectral - 1) / 2,
      detectorAngleDeg: beta0,
      detectorTiltDeg: 4,
    },
    profile: { name: 'test', spectralAxis: 'x', grooveDensityPerMm: 1200, incidenceAngleDeg: alpha, detectorDistanceMm: 235, pixelPitchUm: 13.5, wavelengthIncreasesWithPixel: true },
    width,
    height,
    spectralAxis: 'x',
    driver: { nominalNm: 800, tolerancePercent: 1, effectiveNm: 796 },
    parity: 'odd',
    envelope: { plateauPhotons: 3e6, plateauStartHarmonic: 1, cutoffHarmonic: 80, jitterRelative: 0 },
    secondOrderRelativeStrength: 0,
    lineFwhmPx: 4,
    spatialFwhmPx: 30,
    spatialReferenceHarmonic: 21,
    spatialCentrePx: spatial / 2,
    pedestalCounts: 100,
    readNoiseCounts: 2,
    gainCountsPerPhoton: 1,
    bitDepth: 'float',
    ...overrides,
  };
}

/** Pixel value at (spectral p, spatial s) for either axis. */
export function at(frame: Frame, axis: 'x' | 'y', p: number, s: number): number {
  return axis === 'x' ? frame.data[s * frame.width + p] : frame.data[p * frame.width + s];
}

/** Sum over spatial rows [start, end) of (value − pedestal) at every spectral pixel. */
export function lineout(frame: Frame, axis: 'x' | 'y', start: number, end: number, pedestal: number): Float64Array {
  const spectral = axis === 'x' ? frame.width : frame.height;
  const out = new Float64Array(spectral);
  for (let p = 0; p < spectral; p += 1) for (let s = start; s < end; s += 1) out[p] += at(frame, axis, p, s) - pedestal;
  return out;
}

/** Intensity-weighted centroid of `values` over [lo, hi]. */
export function centroid(values: ArrayLike<number>, lo: number, hi: number): number {
  let sw = 0;
  let swx = 0;
  for (let p = Math.max(0, Math.floor(lo)); p <= Math.min(values.length - 1, Math.ceil(hi)); p += 1) {
    sw += values[p];
    swx += values[p] * p;
  }
  return swx / sw;
}

/** Sum of `values` over [lo, hi]. */
export function windowSum(values: ArrayLike<number>, lo: number, hi: number): number {
  let sum = 0;
  for (let p = Math.max(0, Math.floor(lo)); p <= Math.min(values.length - 1, Math.ceil(hi)); p += 1) sum += values[p];
  return sum;
}

/** Mean and (unbiased) variance. */
export function meanVariance(values: ArrayLike<number>): { mean: number; variance: number } {
  let mean = 0;
  for (let i = 0; i < values.length; i += 1) mean += values[i];
  mean /= values.length;
  let variance = 0;
  for (let i = 0; i < values.length; i += 1) variance += (values[i] - mean) ** 2;
  return { mean, variance: variance / (values.length - 1) };
}
