/**
 * The ranges real instruments and lasers cover, for the field scenarios (field-scenarios.ts), and
 * the draws of a true geometry, the user's nominal profile and the true driver from them. These
 * come from the trade (PRODUCT.md's domain notes, from memory unless said), never from the
 * assigner's priors or walls: the field scenarios exist to test those.
 *
 * Tilt sign (GratingGeometry.detectorTiltDeg, grating.ts): positive tilt puts pixels above the
 * centre farther from the grating. A flat-field focal plane stands roughly perpendicular to the
 * grating surface, so its long-wavelength end (smaller β, rays leaving the surface more steeply)
 * is the far end: the tilt is +|tilt| when wavelength increases with pixel, −|tilt| otherwise,
 * with |tilt| ≈ 90° − β0 (from memory).
 */
import { HC_EV_NM } from '../constants.ts';
import { pixelToWavelengthNm } from '../grating.ts';
import type { GratingGeometry, InstrumentProfile } from '../types.ts';
import type { Random } from './random.ts';
import type { SimDriver } from './types.ts';

const DEG = Math.PI / 180;

/** Ranges of the field scenarios (see the module comment for where they come from). */
export const FIELD_RANGES = {
  grazing: {
    /** Groove densities drawn, lines/mm (300-2400 covers the flat-field gratings in use; from memory). */
    grooveDensitiesPerMm: [300, 600, 1200, 1200, 2400] as const,
    incidenceDeg: [85, 88] as const,
    distanceMm: [200, 500] as const,
    /** |tilt| of a plain camera behind a grazing-incidence grating, degrees. */
    cameraTiltDeg: [0, 16] as const,
    /** |tilt| of a flat-field focal plane: normal(centre, sigma) clipped to [lo, hi], degrees. */
    flatFieldTiltDeg: { centre: 12.5, sigma: 1.5, lo: 8, hi: 16 } as const,
    /** Scatter of the central diffraction angle about 90° − |tilt| on a flat field, degrees. */
    flatFieldBetaScatterDeg: 1.5,
    /** Photon energies the comb may occupy, eV (lowest useful grazing-incidence energy; the filter tables end at 300 eV). */
    energyEv: [12, 300] as const,
  },
  normalIncidence: {
    grooveDensitiesPerMm: [300, 600, 1200] as const,
    incidenceDeg: [2, 15] as const,
    /** |tilt|, degrees: a camera square to the beam, give or take its mount. */
    tiltDeg: [0, 3] as const,
    distanceMm: [150, 2000] as const,
    /** The VUV band of these instruments, nm. */
    bandNm: [80, 400] as const,
  },
  camera: {
    pixelPitchesUm: [13, 13.5, 15, 16, 20] as const,
    spectralPixels: [1024, 1340, 2048] as const,
    spatialPixels: [128, 256, 512] as const,
  },
  /** How a realignment moves the truth away from the profile the user gives. */
  realignment: {
    incidenceDeg: 0.5,
    distanceRelative: 0.08,
    centrePx: 100,
    /** True central diffraction angle off the profile's, when the profile states one, degrees. */
    detectorAngleDeg: 0.3,
    /** A stated nominal tilt lies within this of the true tilt, degrees. */
    statedTiltDeg: 2,
    /** Chance the profile states detectorAngleDeg / detectorTiltDeg. */
    statesAngleProbability: 0.6,
    statesTiltProbability: 0.5,
  },
  driver: {
    /** Nameplates drawn, nm (Ti:sapphire three times as often; calibration-data/drivers.json presets). */
    nominalsNm: [800, 800, 800, 1030, 400, 1300, 1800] as const,
    /** The user's stated tolerance, percent: a 1σ-ish spread of the real centre. */
    tolerancePercent: [0.3, 1] as const,
    /** The real centre sits at nominal·(1 + tol·z), z ~ N(0, 1) clipped to ±this. */
    centreSpreadSigmas: 2.5,
    /** Ionisation blue shift of the harmonics, relative. */
    blueShiftRelative: [0, 0.01] as const,
  },
} as const;

/** Normal(centre, sigma) clipped to [lo, hi]. */
export function clippedNormal(r: Random, centre: number, sigma: number, lo: number, hi: number): number {
  return Math.min(hi, Math.max(lo, centre + sigma * r.normal()));
}

/** Diffraction angle β (deg) of first-order wavelength λ; NaN when no real angle exists. */
export function betaDeg(incidenceAngleDeg: number, grooveDensityPerMm: number, wavelengthNm: number): number {
  const sinBeta = Math.sin(incidenceAngleDeg * DEG) - (wavelengthNm * grooveDensityPerMm) / 1e6;
  return Math.abs(sinBeta) < 1 ? Math.asin(sinBeta) / DEG : Number.NaN;
}

/** First-order wavelength (nm) on the central ray of incidence α and diffraction angle β. */
export function centralWavelengthNm(incidenceAngleDeg: number, grooveDensityPerMm: number, betaDegrees: number): number {
  return (1e6 / grooveDensityPerMm) * (Math.sin(incidenceAngleDeg * DEG) - Math.sin(betaDegrees * DEG));
}

/** Photon-energy range (eV) the detector sees in first order; NaNs when an end receives no real wavelength. */
export function detectorRangeEv(g: GratingGeometry, spectralLength: number): [number, number] {
  const a = pixelToWavelengthNm(g, 0);
  const b = pixelToWavelengthNm(g, spectralLength - 1);
  if (!Number.isFinite(a) || !Number.isFinite(b)) return [Number.NaN, Number.NaN];
  return [HC_EV_NM / Math.max(a, b), HC_EV_NM / Math.min(a, b)];
}

/**
 * A true grazing-incidence geometry. 'flat-field': |tilt| from the flat-field spread, β0 about
 * 90° − |tilt|, tilt sign from the focal plane (module comment). 'camera': a plain camera, |tilt|
 * uniform in 0-16° of either sign, β0 chosen so the central ray carries `centreNm`. Null when
 * the draw gives no usable geometry (the caller redraws).
 */
export function drawGrazingGeometry(r: Random, family: 'flat-field' | 'camera', spectralLength: number, centreNm?: number): GratingGeometry | null {
  const R = FIELD_RANGES.grazing;
  const grooveDensityPerMm = r.pick(R.grooveDensitiesPerMm);
  const incidenceAngleDeg = r.between(R.incidenceDeg[0], R.incidenceDeg[1]);
  const wavelengthIncreasesWithPixel = r.uniform() < 0.5;
  let tiltMagnitude: number;
  let beta0: number;
  let tiltSign: number;
  if (family === 'flat-field') {
    const t = R.flatFieldTiltDeg;
    tiltMagnitude = clippedNormal(r, t.centre, t.sigma, t.lo, t.hi);
    beta0 = 90 - tiltMagnitude + R.flatFieldBetaScatterDeg * r.normal();
    tiltSign = wavelengthIncreasesWithPixel ? 1 : -1;
  } else {
    tiltMagnitude = r.between(R.cameraTiltDeg[0], R.cameraTiltDeg[1]);
    if (centreNm === undefined) return null;
    beta0 = betaDeg(incidenceAngleDeg, grooveDensityPerMm, centreNm);
    tiltSign = r.uniform() < 0.5 ? 1 : -1;
  }
  // The diffracted central ray leaves less grazing than the incident one (first inside order).
  if (!Number.isFinite(beta0) || beta0 < 55 || beta0 > incidenceAngleDeg - 0.5) return null;
  return {
    grooveDensityPerMm,
    incidenceAngleDeg,
    detectorDistanceMm: r.between(R.distanceMm[0], R.distanceMm[1]),
    pixelPitchUm: r.pick(FIELD_RANGES.camera.pixelPitchesUm),
    wavelengthIncreasesWithPixel,
    detectorCenterPixel: (spectralLength - 1) / 2 + r.between(-40, 40),
    detectorAngleDeg: beta0,
    detectorTiltDeg: tiltSign * tiltMagnitude,
  };
}

/**
 * The profile the user gives: the truth a realignment ago (incidence ± 0.5°, distance ± 8 %,
 * centre pixel ± 100 px), stating the central diffraction angle (off the truth by ≤ 0.3°) and a
 * nominal tilt (within 2° of the truth) only sometimes.
 */
export function drawNominalProfile(r: Random, g: GratingGeometry, spectralAxis: 'x' | 'y', spectralLength: number, name: string): InstrumentProfile {
  const R = FIELD_RANGES.realignment;
  const statesAngle = r.uniform() < R.statesAngleProbability;
  const statesTilt = r.uniform() < R.statesTiltProbability;
  const angle = g.detectorAngleDeg + r.between(-R.detectorAngleDeg, R.detectorAngleDeg);
  // A profile states its tilt in the product's convention (types.ts InstrumentProfile): positive when
  // the long-wavelength end is farther from the grating, whichever way the pixels run.
  const physicalTiltDeg = (g.wavelengthIncreasesWithPixel ? 1 : -1) * g.detectorTiltDeg;
  const tilt = physicalTiltDeg + r.between(-R.statedTiltDeg, R.statedTiltDeg);
  return {
    name,
    spectralAxis,
    grooveDensityPerMm: g.grooveDensityPerMm,
    incidenceAngleDeg: g.incidenceAngleDeg + r.between(-R.incidenceDeg, R.incidenceDeg),
    detectorDistanceMm: g.detectorDistanceMm * (1 + r.between(-R.distanceRelative, R.distanceRelative)),
    pixelPitchUm: g.pixelPitchUm,
    wavelengthIncreasesWithPixel: g.wavelengthIncreasesWithPixel,
    detectorCenterPixel: g.detectorCenterPixel + r.between(-R.centrePx, R.centrePx),
    ...(statesAngle ? { detectorAngleDeg: angle } : {}),
    ...(statesTilt ? { detectorTiltDeg: tilt } : {}),
    pixelCount: spectralLength,
    notes: 'Invented instrument of a simulated field scenario; the values are nominal (before a realignment).',
  };
}

/**
 * The driver as stated and as it was: the real centre a symmetric spread about the nameplate
 * (the stated tolerance as ~1σ), the harmonics' effective λ0 blue-shifted below it by 0-1 %.
 */
export function drawFieldDriver(r: Random, nominalNm: number, tolerancePercent?: number): SimDriver {
  const D = FIELD_RANGES.driver;
  const tol = tolerancePercent ?? r.between(D.tolerancePercent[0], D.tolerancePercent[1]);
  const z = clippedNormal(r, 0, 1, -D.centreSpreadSigmas, D.centreSpreadSigmas);
  const laserCentreNm = nominalNm * (1 + (tol / 100) * z);
  const blueShiftRelative = r.between(D.blueShiftRelative[0], D.blueShiftRelative[1]);
  return { nominalNm, tolerancePercent: tol, effectiveNm: laserCentreNm * (1 - blueShiftRelative), laserCentreNm, blueShiftRelative };
}

/** Highest photon energy a driver's harmonics plausibly reach, eV (cutoff grows ~λ², capped by the 300 eV filter tables; from memory). */
export function maxHarmonicEnergyEv(driverNm: number): number {
  return Math.min(FIELD_RANGES.grazing.energyEv[1], 50 + 110 * Math.pow(driverNm / 800, 1.5));
}
