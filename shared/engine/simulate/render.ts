/**
 * Renders a simulated spectrometer frame from a scenario: the harmonic comb through the true
 * grating geometry (grating.ts is the only forward model), filters, m ≥ 2 lines, continuum,
 * Poisson photon noise through the gain, read noise, pedestal, hot pixels, cosmic rays,
 * saturation and the stored sample type.
 *
 * Speed: each line is drawn only inside ±5σ of its centre, row by row (the line moves with tilt
 * and curvature across rows), from pixel-integrated Gaussians (differences of the error
 * function at pixel edges), so the cost is the noise pass over the frame plus a few µs per line-row.
 */
import { wavelengthNmToEnergyEv } from '../constants.ts';
import { pixelToWavelengthNm, wavelengthToPixel } from '../grating.ts';
import type { Frame, SpatialBand } from '../types.ts';
import { filterStackTransmission, type FilterTransmissionFn } from './filters.ts';
import { resolveScenario, type ResolvedScenario } from './options.ts';
import { createRandom, mixSeed, type Random } from './random.ts';
import type { SimLine, SimResult, SimScenario, SimSpuriousPeak } from './types.ts';

const FWHM_PER_SIGMA = 2 * Math.sqrt(2 * Math.LN2);
/** Profiles are drawn out to this many sigma; the rest (< 6e-7 of the flux) is dropped. */
const PROFILE_HALF_WIDTH_SIGMA = 5;
/** Lines with fewer expected photons than this are not rendered or listed. */
const MIN_LINE_PHOTONS = 1e-3;

/** Random sub-streams, so that e.g. adding hot pixels does not change the photon noise. */
const STREAM = { jitter: 1, photons: 2, read: 3, hot: 4, cosmic: 5 } as const;

/** Options of `simulateFrame` beyond the scenario. */
export interface SimulateOptions {
  /** Filter transmission source. @default the engine's one transmission (filters/transmission.ts, via filters.ts) */
  filterTransmission?: FilterTransmissionFn;
}

/** erf(x), Abramowitz & Stegun 7.1.26 (|error| < 1.5e-7): ample for pixel-integrated profiles. */
function erf(x: number): number {
  const sign = x < 0 ? -1 : 1;
  const a = Math.abs(x);
  const t = 1 / (1 + 0.3275911 * a);
  const poly = t * (0.254829592 + t * (-0.284496736 + t * (1.421413741 + t * (-1.453152027 + t * 1.061405429))));
  return sign * (1 - poly * Math.exp(-a * a));
}

/** Standard normal CDF. */
function phi(z: number): number {
  return 0.5 * (1 + erf(z / Math.SQRT2));
}

/** Fraction of a Gaussian (centre, sigma) inside [lo, hi]. */
function gaussianFraction(centre: number, sigma: number, lo: number, hi: number): number {
  return phi((hi - centre) / sigma) - phi((lo - centre) / sigma);
}

interface PlannedLine {
  line: SimLine;
  /** Spectral sigma, px. */
  sigmaPx: number;
  spatialSigmaPx: number;
}

/** Envelope value for harmonic q before filters and jitter. */
function envelopePhotons(s: ResolvedScenario, q: number): number {
  const w = s.rollOffOrders;
  const cutoff = 1 / (1 + Math.exp((q - s.envelope.cutoffHarmonic) / w));
  const rise = 1 / (1 + Math.exp((s.plateauStartHarmonic - q) / w));
  let value = s.envelope.plateauPhotons * cutoff * rise;
  if (q % 2 === 0) value *= s.parity === 'all' ? s.evenRelativeStrength : 0;
  if (s.missingHarmonics.includes(q)) value *= s.missingRelativeStrength;
  return value * (s.harmonicWeights?.[q] ?? 1);
}

/** Photons of order m relative to m = 1: secondOrderRelativeStrength^(m − 1), with m = 3 set on its own when given. */
function diffractionOrderWeight(s: ResolvedScenario, m: number): number {
  if (m === 3) return s.thirdOrderRelativeStrength;
  return Math.pow(s.secondOrderRelativeStrength, m - 1);
}

/** The true first-order wavelength at every spectral pixel. */
function wavelengthMap(s: ResolvedScenario, spectralLength: number): Float64Array {
  const map = new Float64Array(spectralLength);
  for (let p = 0; p < spectralLength; p += 1) map[p] = pixelToWavelengthNm(s.geometry, p, 1);
  return map;
}

/** Lines (all diffraction orders) whose profiles reach the detector. */
function planLines(s: ResolvedScenario, spectralLength: number, wavelengths: Float64Array, random: Random, transmission: FilterTransmissionFn | undefined): PlannedLine[] {
  let minNm = Infinity;
  let maxNm = -Infinity;
  for (const value of wavelengths) {
    if (Number.isFinite(value)) {
      minNm = Math.min(minNm, value);
      maxNm = Math.max(maxNm, value);
    }
  }
  const planned: PlannedLine[] = [];
  if (!Number.isFinite(minNm)) return planned;
  const lambda0 = s.driver.effectiveNm;
  const maxHarmonic = Math.ceil((s.maxDiffractionOrder * lambda0) / minNm) + 1;
  const sigmaPx = s.lineFwhmPx / FWHM_PER_SIGMA;
  const margin = PROFILE_HALF_WIDTH_SIGMA * sigmaPx;
  for (let q = 1; q <= maxHarmonic; q += 1) {
    // One jitter draw per harmonic in order, shared by its diffraction orders (same source).
    const jitter = Math.exp(s.jitterRelative * random.normal() - (s.jitterRelative * s.jitterRelative) / 2);
    const base = envelopePhotons(s, q) * jitter;
    if (!(base > 0)) continue;
    const wavelengthNm = lambda0 / q;
    const energyEv = wavelengthNmToEnergyEv(wavelengthNm);
    const t = filterStackTransmission(s.filters, energyEv, transmission);
    const spatialFwhmPx = s.spatialFwhmPx * Math.pow(s.spatialReferenceHarmonic / q, s.divergenceExponent);
    for (let m = 1; m <= s.maxDiffractionOrder; m += 1) {
      const firstOrderWavelengthNm = m * wavelengthNm;
      if (firstOrderWavelengthNm < minNm * 0.9 || firstOrderWavelengthNm > maxNm * 1.1) continue;
      const photons = base * t * diffractionOrderWeight(s, m);
      if (photons < MIN_LINE_PHOTONS) continue;
      const pixel = wavelengthToPixel(s.geometry, wavelengthNm, m);
      if (!Number.isFinite(pixel) || pixel < -margin || pixel > spectralLength - 1 + margin) continue;
      planned.push({
        sigmaPx,
        spatialSigmaPx: spatialFwhmPx / FWHM_PER_SIGMA,
        line: { harmonic: q, diffractionOrder: m, pixel, wavelengthNm, firstOrderWavelengthNm, energyEv, photons, filterTransmission: t, spatialFwhmPx, snr: 0, visible: false },
      });
    }
  }
  return planned;
}

/** Geometry of the frame in spectral/spatial terms. */
interface Layout {
  spectralLength: number;
  spatialLength: number;
  spectralStride: number;
  spatialStride: number;
}

function layoutOf(s: ResolvedScenario): Layout {
  return s.spectralAxis === 'x'
    ? { spectralLength: s.width, spatialLength: s.height, spectralStride: 1, spatialStride: s.width }
    : { spectralLength: s.height, spatialLength: s.width, spectralStride: s.width, spatialStride: 1 };
}

/** Spectral shift of a line at spatial row `row` (tilt and curvature about the spatial centre). */
function shiftAt(s: ResolvedScenario, row: number): number {
  const d = row - s.spatialCentrePx;
  return s.lineShape.tiltPxPerPx * d + s.lineShape.curvaturePxPerPx2 * d * d;
}

/** Adds `photons` spread as a separable (per-row shifted) Gaussian into `expected`. */
function drawLine(expected: Float32Array, s: ResolvedScenario, layout: Layout, pixel: number, sigmaPx: number, spatialSigmaPx: number, photons: number): void {
  const c = s.spatialCentrePx;
  const rowLo = Math.max(0, Math.floor(c - PROFILE_HALF_WIDTH_SIGMA * spatialSigmaPx));
  const rowHi = Math.min(layout.spatialLength - 1, Math.ceil(c + PROFILE_HALF_WIDTH_SIGMA * spatialSigmaPx));
  const halfWidth = PROFILE_HALF_WIDTH_SIGMA * sigmaPx;
  for (let row = rowLo; row <= rowHi; row += 1) {
    const rowWeight = photons * gaussianFraction(c, spatialSigmaPx, row - 0.5, row + 0.5);
    if (rowWeight <= 0) continue;
    const centre = pixel + shiftAt(s, row);
    const colLo = Math.max(0, Math.floor(centre - halfWidth));
    const colHi = Math.min(layout.spectralLength - 1, Math.ceil(centre + halfWidth));
    if (colLo > colHi) continue;
    const rowBase = row * layout.spatialStride;
    let lower = phi((colLo - 0.5 - centre) / sigmaPx);
    for (let col = colLo; col <= colHi; col += 1) {
      const upper = phi((col + 0.5 - centre) / sigmaPx);
      expected[rowBase + col * layout.spectralStride] += rowWeight * (upper - lower);
      lower = upper;
    }
  }
}

/** Sub-samples per pixel of the continuum source: a filter edge sharper than a pixel is placed to 1/16 px. */
const CONTINUUM_SUBSAMPLES = 16;

/**
 * Continuum photons per spectral pixel at the spatial centre: photonsPerPixel × the filters'
 * transmission at the first-order energy, seen through the spectrometer's line profile and
 * integrated over each pixel. The continuum passes the same slit and grating as the lines, so it
 * is blurred by the same Gaussian (lineFwhmPx, the harmonics taken as narrower than the
 * resolution): a filter edge on it is a step of the instrument's width, not a one-pixel cliff.
 */
function continuumPerPixel(s: ResolvedScenario, wavelengths: Float64Array, transmission: FilterTransmissionFn | undefined): Float64Array {
  const n = wavelengths.length;
  const perPixel = new Float64Array(n);
  const continuum = s.continuum;
  if (!continuum || !(continuum.photonsPerPixel > 0)) return perPixel;
  const sigmaPx = s.lineFwhmPx / FWHM_PER_SIGMA;
  const reach = Math.ceil(PROFILE_HALF_WIDTH_SIGMA * sigmaPx) + 1;
  const sub = CONTINUUM_SUBSAMPLES;
  // The source on a sub-pixel grid from pixel −reach to n − 1 + reach; sample j sits at x(j).
  const x = (j: number): number => -reach - 0.5 + (j + 0.5) / sub;
  const source = new Float64Array((n + 2 * reach) * sub);
  for (let j = 0; j < source.length; j += 1) {
    const nm = pixelToWavelengthNm(s.geometry, x(j), 1);
    source[j] = Number.isFinite(nm) && nm > 0 ? continuum.photonsPerPixel * filterStackTransmission(s.filters, wavelengthNmToEnergyEv(nm), transmission) : 0;
  }
  // Weight of sample m of a pixel's window in that pixel: the part of its Gaussian image inside
  // the pixel. The window of pixel p starts at sample p·sub, so the weights are shared.
  const window = (2 * reach + 1) * sub;
  const weight = new Float64Array(window);
  for (let m = 0; m < window; m += 1) weight[m] = gaussianFraction(x(m), sigmaPx, -0.5, 0.5) / sub;
  for (let p = 0; p < n; p += 1) {
    let sum = 0;
    const start = p * sub;
    for (let m = 0; m < window; m += 1) sum += source[start + m] * weight[m];
    perPixel[p] = sum;
  }
  return perPixel;
}

/** Adds the continuum to `expected`, bent with the lines' tilt and curvature. */
function drawContinuum(expected: Float32Array, s: ResolvedScenario, layout: Layout, perPixel: Float64Array): void {
  const continuum = s.continuum;
  if (!continuum || !(continuum.photonsPerPixel > 0)) return;
  const sigma = continuum.spatialFwhmPx === undefined ? Infinity : continuum.spatialFwhmPx / FWHM_PER_SIGMA;
  const last = layout.spectralLength - 1;
  for (let row = 0; row < layout.spatialLength; row += 1) {
    const d = row - s.spatialCentrePx;
    const weight = Number.isFinite(sigma) ? Math.exp((-0.5 * d * d) / (sigma * sigma)) : 1;
    if (weight < 1e-9) continue;
    const shift = shiftAt(s, row);
    const rowBase = row * layout.spatialStride;
    for (let col = 0; col <= last; col += 1) {
      // Sample the continuum at this row's unshifted position, as for the lines.
      const x = Math.min(last, Math.max(0, col - shift));
      const i = Math.floor(x);
      const f = x - i;
      const value = i >= last ? perPixel[last] : perPixel[i] * (1 - f) + perPixel[i + 1] * f;
      expected[rowBase + col * layout.spectralStride] += weight * value;
    }
  }
}

/** The harmonic signal band: spatial centre ± 1.5 FWHM of the widest listed line. */
function signalBand(s: ResolvedScenario, layout: Layout, lines: PlannedLine[]): SpatialBand {
  let widest = 0;
  for (const p of lines) if (p.line.diffractionOrder === 1) widest = Math.max(widest, p.line.spatialFwhmPx);
  if (widest === 0) widest = s.spatialFwhmPx;
  const start = Math.max(0, Math.floor(s.spatialCentrePx - 1.5 * widest));
  const end = Math.min(layout.spatialLength, Math.ceil(s.spatialCentrePx + 1.5 * widest) + 1);
  return { start, end: Math.max(end, start + 1) };
}

/** Expected SNR of a line's area in the lineout summed over `band`, over a window ±1 FWHM. */
function lineSnr(s: ResolvedScenario, p: PlannedLine, band: SpatialBand, continuumPerPixel: Float64Array): number {
  const inBand = gaussianFraction(s.spatialCentrePx, p.spatialSigmaPx, band.start - 0.5, band.end - 0.5);
  const halfWindow = s.lineFwhmPx;
  const signalPhotons = p.line.photons * inBand * gaussianFraction(0, p.sigmaPx, -halfWindow, halfWindow);
  const columns = Math.max(1, Math.round(2 * halfWindow));
  const rows = band.end - band.start;
  const centre = Math.min(continuumPerPixel.length - 1, Math.max(0, Math.round(p.line.pixel)));
  const backgroundPhotons = continuumPerPixel[centre] * columns * rows;
  const g = s.gainCountsPerPhoton;
  const variance = g * g * (signalPhotons + backgroundPhotons) + columns * rows * s.readNoiseCounts * s.readNoiseCounts;
  return variance > 0 ? (g * signalPhotons) / Math.sqrt(variance) : 0;
}

/** The on-detector lines with their expected SNR, sorted by pixel, and the signal band. */
function listLines(s: ResolvedScenario, layout: Layout, planned: PlannedLine[], continuum: Float64Array): { band: SpatialBand; lines: SimLine[] } {
  const band = signalBand(s, layout, planned);
  const lines: SimLine[] = [];
  for (const p of planned) {
    if (p.line.pixel < 0 || p.line.pixel > layout.spectralLength - 1) continue;
    const snr = lineSnr(s, p, band, continuum);
    lines.push({ ...p.line, snr, visible: snr >= s.visibleSnr });
  }
  lines.sort((a, b) => a.pixel - b.pixel);
  return { band, lines };
}

/**
 * The lines a scenario puts on the detector without rendering a frame and without jitter (the
 * envelope's mean): positions, photons, expected SNR and visibility. Cheap (one pass over the
 * spectral pixels); the scenario generator uses it to accept or redraw a scenario.
 */
export function expectedLines(scenario: SimScenario, options: SimulateOptions = {}): { lines: SimLine[]; signal: SpatialBand; wavelengthNmAtPixel: Float64Array } {
  const s = { ...resolveScenario(scenario), jitterRelative: 0 };
  const layout = layoutOf(s);
  const wavelengths = wavelengthMap(s, layout.spectralLength);
  const planned = planLines(s, layout.spectralLength, wavelengths, createRandom(0), options.filterTransmission);
  const { band, lines } = listLines(s, layout, planned, continuumPerPixel(s, wavelengths, options.filterTransmission));
  return { lines, signal: band, wavelengthNmAtPixel: wavelengths };
}

/** A short straight track of deposited charge per cosmic ray. */
function addCosmics(values: Float32Array, s: ResolvedScenario, random: Random): Uint32Array {
  const hits: number[] = [];
  for (let k = 0; k < s.cosmicRayCount; k += 1) {
    const length = random.integer(1, 8);
    const angle = random.between(0, Math.PI);
    let x = random.between(0, s.width - 1);
    let y = random.between(0, s.height - 1);
    const deposit = random.between(800, 8000);
    for (let step = 0; step < length; step += 1) {
      const col = Math.round(x);
      const row = Math.round(y);
      if (col >= 0 && col < s.width && row >= 0 && row < s.height) {
        const index = row * s.width + col;
        values[index] += deposit * random.between(0.5, 1);
        hits.push(index);
      }
      x += Math.cos(angle);
      y += Math.sin(angle);
    }
  }
  return Uint32Array.from(new Set(hits)).sort();
}

/**
 * Renders one frame of `scenario`; `seed` drives the per-order jitter and every noise source, so
 * the same (scenario, seed) always gives the same frame. The frame is what `decodeFrame` returns
 * for the frame written as an uncompressed TIFF of the scenario's bit depth (format 'tiff').
 */
export function simulateFrame(scenario: SimScenario, seed: number, options: SimulateOptions = {}): SimResult {
  const s = resolveScenario(scenario);
  const layout = layoutOf(s);
  const transmission = options.filterTransmission;
  const wavelengths = wavelengthMap(s, layout.spectralLength);
  const planned = planLines(s, layout.spectralLength, wavelengths, createRandom(mixSeed(seed, STREAM.jitter)), transmission);

  const size = s.width * s.height;
  const expected = new Float32Array(size);
  const continuum = continuumPerPixel(s, wavelengths, transmission);
  drawContinuum(expected, s, layout, continuum);
  for (const p of planned) drawLine(expected, s, layout, p.line.pixel, p.sigmaPx, p.spatialSigmaPx, p.line.photons);
  const spurious: SimSpuriousPeak[] = s.spuriousPeaks.map((peak) => ({ ...peak }));
  for (const peak of spurious) {
    const spatialSigma = (peak.spatialFwhmPx ?? s.spatialFwhmPx) / FWHM_PER_SIGMA;
    drawLine(expected, s, layout, peak.pixel, peak.fwhmPx / FWHM_PER_SIGMA, spatialSigma, peak.photons);
  }

  // Counts = pedestal + gain · Poisson(photons) + read noise, then defects, then clipping.
  const photonRandom = createRandom(mixSeed(seed, STREAM.photons));
  const readRandom = createRandom(mixSeed(seed, STREAM.read));
  const values = new Float32Array(size);
  const gain = s.gainCountsPerPhoton;
  const read = s.readNoiseCounts;
  for (let i = 0; i < size; i += 1) {
    const mean = expected[i];
    const photons = mean > 0 ? photonRandom.poisson(mean) : 0;
    values[i] = s.pedestalCounts + gain * photons + (read > 0 ? read * readRandom.normal() : 0);
  }
  const hotRandom = createRandom(mixSeed(seed, STREAM.hot));
  const hotCount = Math.round(s.hotPixelFraction * size);
  const hot = new Set<number>();
  while (hot.size < hotCount) hot.add(hotRandom.integer(0, size - 1));
  const hotPixelIndices = Uint32Array.from(hot).sort();
  for (const index of hotPixelIndices) values[index] += s.hotPixelCounts * hotRandom.between(0.5, 1.5);
  const cosmicPixelIndices = addCosmics(values, s, createRandom(mixSeed(seed, STREAM.cosmic)));

  let saturatedPixels = 0;
  const top = s.fullScaleCounts;
  const integer = s.bitDepth === 16;
  for (let i = 0; i < size; i += 1) {
    let v = values[i];
    if (integer) v = Math.round(v);
    if (v >= top) {
      v = top;
      saturatedPixels += 1;
    } else if (integer && v < 0) v = 0;
    values[i] = v;
  }

  const { band, lines } = listLines(s, layout, planned, continuum);

  const frame: Frame = {
    width: s.width,
    height: s.height,
    data: values,
    bitsPerSample: integer ? 16 : 32,
    sampleFormat: integer ? 'uint' : 'float',
    fullScale: integer ? 65535 : Infinity,
    format: 'tiff',
    pageCount: 1,
    page: 0,
    ...(s.takenAt !== undefined ? { takenAt: s.takenAt } : {}),
    ...(s.exposureS !== undefined ? { exposureS: s.exposureS } : {}),
  };
  return {
    frame,
    truth: {
      lines,
      wavelengthNmAtPixel: wavelengths,
      effectiveDriverNm: s.driver.effectiveNm,
      signal: band,
      spuriousPeaks: spurious,
      hotPixelIndices,
      cosmicPixelIndices,
      saturatedPixels,
      visibleLineCount: lines.filter((line) => line.visible).length,
    },
  };
}
