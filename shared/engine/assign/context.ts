/**
 * The assignment's context: the caller's peaks and input checked and turned into what the search
 * works on — peak trust (edge and saturated lines), the priors (priors.ts) as the model's nominal
 * vector and walls, pins matched to peaks, known lines as fixed-wavelength points.
 */
import type { Peak } from '../types.ts';
import { P_DISTANCE, type ModelContext, type ModelPoint } from './model.ts';
import { allowedHarmonic, opaqueTransmission, type SearchContext, type SearchPeak } from './search.ts';
import { stackTransmission } from './filters.ts';
import { buildPriors, DEFAULT_BLUE_SHIFT_PCT, DEFAULT_DRIVER_SIGMA_PCT, DEFAULT_RANGES } from './priors.ts';
import type { AssignInput } from './types.ts';

/** Smallest centroid uncertainty believed, px (sub-0.005 px claims are numerical, not physical). */
const SIGMA_FLOOR_PX = 0.005;
/** A peak whose centre lies within this many FWHM of the detector edge counts as an edge peak. */
export const EDGE_FWHM = 1.5;
/** Position uncertainty of an edge peak, in FWHM (a truncated line's centre can be off by a fair part of its width). */
const EDGE_SIGMA_FWHM = 0.15;
/** Position uncertainty floor of a saturated peak, in FWHM. */
const SATURATED_SIGMA_FWHM = 0.01;

export interface Prepared {
  ctx: SearchContext;
  /** usable index → index in the caller's peak array. */
  original: number[];
  notes: string[];
}

export function prepare(peaks: Peak[], input: AssignInput): Prepared | string {
  const { profile, pixelCount, driverNm, parity } = input;
  const sigmaPct = input.driverTolerancePct ?? DEFAULT_DRIVER_SIGMA_PCT;
  const blueShiftPct = input.blueShiftPct ?? DEFAULT_BLUE_SHIFT_PCT;
  if (!Number.isFinite(driverNm) || driverNm <= 0) return 'The driver wavelength must be a positive number of nm.';
  if (!Number.isFinite(sigmaPct) || sigmaPct < 0 || sigmaPct >= 10) return 'The driver tolerance (1σ) must be a percentage from 0 to 10.';
  if (!Number.isFinite(blueShiftPct) || blueShiftPct < 0 || blueShiftPct >= 10) return 'The blue-shift allowance must be a percentage from 0 to 10.';
  if (!Number.isInteger(pixelCount) || pixelCount < 8) return 'The spectral pixel count must be an integer of at least 8.';
  if (parity !== 'odd' && parity !== 'all') return "Parity must be 'odd' or 'all'.";
  for (const key of ['grooveDensityPerMm', 'detectorDistanceMm', 'pixelPitchUm'] as const) {
    if (!(Number.isFinite(profile[key]) && profile[key] > 0)) return `The instrument profile's ${key} must be a positive number.`;
  }
  if (!(Number.isFinite(profile.incidenceAngleDeg) && Math.abs(profile.incidenceAngleDeg) < 90)) return "The instrument profile's incidenceAngleDeg must lie between −90° and 90°.";
  if (profile.detectorTiltDeg !== undefined && !(Number.isFinite(profile.detectorTiltDeg) && Math.abs(profile.detectorTiltDeg) < 45)) return "The instrument profile's detectorTiltDeg must lie between −45° and 45°.";
  const ranges = { ...DEFAULT_RANGES, ...(input.ranges ?? {}) };
  const driver = { nominalNm: driverNm, sigmaRelative: sigmaPct / 100, blueShiftRelative: blueShiftPct / 100 };
  const priors = buildPriors(profile, pixelCount, driver, ranges);
  const centralAngleKnown = priors.centralAngleKnown;
  let transmission: (e: number) => number;
  try {
    transmission = input.transmission ?? stackTransmission(input.filters ?? []);
  } catch (error) {
    return error instanceof Error ? error.message : String(error);
  }

  const usable: { peak: Peak; index: number }[] = [];
  peaks.forEach((peak, index) => {
    if (Number.isFinite(peak.pixel) && peak.pixel > -0.5 && peak.pixel < pixelCount - 0.5) usable.push({ peak, index });
  });
  usable.sort((a, b) => a.peak.pixel - b.peak.pixel);
  const searchPeaks: SearchPeak[] = usable.map(({ peak }) => {
    const fwhmPx = Number.isFinite(peak.fwhmPx) && peak.fwhmPx > 0 ? peak.fwhmPx : 3;
    const edgeDistancePx = Math.min(peak.pixel + 0.5, pixelCount - 0.5 - peak.pixel);
    // A line within EDGE_FWHM widths of the detector edge is cut by it: its fitted centre is pulled
    // inward and its area is short, so its position is trusted only to a fraction of its width.
    const edge = edgeDistancePx < EDGE_FWHM * fwhmPx;
    let sigmaPx = Math.max(Number.isFinite(peak.pixelSigma) && peak.pixelSigma > 0 ? peak.pixelSigma : 0.5, SIGMA_FLOOR_PX);
    if (edge) sigmaPx = Math.max(sigmaPx, EDGE_SIGMA_FWHM * fwhmPx);
    // A clipped (saturated) line's centre is fitted on its flanks only; its area is a lower bound.
    if (peak.saturated) sigmaPx = Math.max(sigmaPx, SATURATED_SIGMA_FWHM * fwhmPx);
    return {
      pixel: peak.pixel,
      sigmaPx,
      snr: Number.isFinite(peak.snr) ? peak.snr : 1,
      area: Number.isFinite(peak.area) && peak.area > 0 ? peak.area : Math.max(peak.amplitude * peak.fwhmPx, 1e-12),
      spatialWidthPx: peak.spatialWidthPx,
      fwhmPx,
      edge,
      saturated: peak.saturated === true,
    };
  });

  const { nominal, walls } = priors;
  const L = nominal[P_DISTANCE];
  const steps = Float64Array.from([1e-3, 1e-6, 1e-6, 1e-5 * L, 1e-7 * driverNm, 1e-5]);
  const model: ModelContext = {
    grooveDensityPerMm: profile.grooveDensityPerMm,
    pixelPitchUm: profile.pixelPitchUm,
    wavelengthIncreasesWithPixel: profile.wavelengthIncreasesWithPixel,
    pixelCount,
    nominal,
    walls,
    steps,
  };

  const knownPoints: ModelPoint[] = [];
  // Peaks that are known lines: in the fit as fixed-wavelength points, kept out of the harmonic search.
  const knownPeaks = new Map<number, { label: string; wavelengthNm: number; point: number }>();
  for (const k of input.knownLines ?? []) {
    if (!(Number.isFinite(k.wavelengthNm) && k.wavelengthNm > 0)) return 'A known line needs a positive wavelength in nm.';
    if (k.pixel !== undefined && Number.isFinite(k.pixel)) {
      knownPoints.push({ pixel: k.pixel, sigmaPx: Math.max(k.pixelSigma ?? 0.5, SIGMA_FLOOR_PX), scale: 0, fixedNm: k.wavelengthNm });
      let nearest = -1;
      searchPeaks.forEach((pk, i) => {
        if (Math.abs(pk.pixel - (k.pixel as number)) <= Math.max(1.5, pk.fwhmPx) && (nearest < 0 || Math.abs(pk.pixel - (k.pixel as number)) < Math.abs(searchPeaks[nearest].pixel - (k.pixel as number)))) nearest = i;
      });
      if (nearest >= 0) knownPeaks.set(nearest, { label: k.label ?? `known line ${k.wavelengthNm.toFixed(4)} nm`, wavelengthNm: k.wavelengthNm, point: knownPoints.length - 1 });
    }
  }
  const pins = new Map<number, number>();
  for (const pin of input.pins ?? []) {
    if (!Number.isInteger(pin.harmonic) || pin.harmonic < 1) return `A pin needs a positive integer harmonic (got ${pin.harmonic}).`;
    if (!allowedHarmonic(parity, pin.harmonic)) return `Pin harmonic ${pin.harmonic} is even, but parity is 'odd'; set parity 'all' or correct the pin.`;
    let bestIndex = -1;
    let bestDistance = Infinity;
    searchPeaks.forEach((pk, i) => {
      const d = Math.abs(pk.pixel - pin.pixel);
      if (d < bestDistance) {
        bestDistance = d;
        bestIndex = i;
      }
    });
    if (bestIndex < 0 || bestDistance > Math.max(3, 3 * (peaks[usable[bestIndex].index].fwhmPx || 0))) {
      return `No peak near the pinned pixel ${pin.pixel}.`;
    }
    if (pins.has(bestIndex) && pins.get(bestIndex) !== pin.harmonic) return `Two pins disagree about the peak at pixel ${searchPeaks[bestIndex].pixel.toFixed(2)}.`;
    pins.set(bestIndex, pin.harmonic);
  }
  const notes: string[] = [...priors.notes];
  const ctx: SearchContext = {
    driver,
    model,
    peaks: searchPeaks,
    parity,
    angleKnown: centralAngleKnown,
    anchored: knownPoints.length > 0,
    knownPoints,
    knownPeaks,
    transmission,
    filtered: input.transmission !== undefined || (input.filters ?? []).length > 0,
    pins,
    opaqueTransmission: opaqueTransmission(searchPeaks.reduce((m, p) => Math.max(m, p.snr), 0)),
  };
  return { ctx, original: usable.map((u) => u.index), notes };
}

