/**
 * Priors of the assignment: what the user knows about the instrument after a realignment and
 * about the driver, written as the nominal parameter vector and one soft wall per parameter
 * (zero cost inside, quadratic outside; model.ts).
 *
 * - Driver: "as measured ± σ" plus a one-sided ionisation blue shift. The effective λ0 lies in
 *   [λm·(1 − B), λm] with λm ~ N(nominal, σ): the wall is that band and its softness is σ, so
 *   the cost outside is Gaussian with the measurement's own σ (PRODUCT.md, domain notes).
 * - Detector tilt: the profile's nominal tilt ± a few degrees when it states one; otherwise a band
 *   from perpendicular to the flat-field value 90° − β0 (from memory: a flat-field spectrometer's
 *   focal plane, and so its camera, sits 10–15° off the central ray), with a margin.
 * - Diffraction angle and centre pixel: when the profile states the angle, both move in a
 *   realignment and both shift the spectrum, so the centre pixel (the one the search frees) gets
 *   the shift of the centre range and of the angle range together.
 * - Incidence and distance: the realignment ranges.
 */
import { nominalGeometry } from '../grating.ts';
import type { InstrumentProfile } from '../types.ts';
import { P_ANGLE, P_CENTER, P_DISTANCE, P_DRIVER, P_INCIDENCE, P_TILT, PARAMETER_COUNT, type Wall } from './model.ts';
import type { RealignmentRanges } from './types.ts';

const DEG = Math.PI / 180;

/** How far a realignment moves a spectrometer from its profile (common practice, from memory). */
export const DEFAULT_RANGES: RealignmentRanges = {
  incidenceDeg: 0.5,
  // A camera flange or bellows re-seated moves the distance by several percent (8 % seen).
  distanceRelative: 0.1,
  centerRelative: 0.06,
  // The diffraction angle on the camera moves by tenths of a degree.
  detectorAngleDeg: 0.5,
  // Around a stated nominal tilt.
  tiltDeg: 3,
};

/** Ionisation blue shift allowed below the measured driver wavelength, percent (PRODUCT.md: "a percent or so"). */
export const DEFAULT_BLUE_SHIFT_PCT = 1;
/** 1σ of the measured driver wavelength when the user gives none, percent. */
export const DEFAULT_DRIVER_SIGMA_PCT = 0.5;
/** Incidence from the normal above which a spectrometer counts as grazing-incidence flat-field, degrees. */
const GRAZING_INCIDENCE_DEG = 80;
/** Margin around the flat-field value in the unstated tilt band, degrees. */
const TILT_MARGIN_DEG = 6;
/** Flat-field tilt assumed when the profile gives neither the tilt nor β0, degrees (from memory: 10–15°). */
const TYPICAL_FLAT_FIELD_TILT_DEG = 15;
/** A plain camera behind a grazing-incidence grating may lean this far either way, degrees (from memory). */
const PLAIN_CAMERA_TILT_DEG = 16;
/** Half-width of the tilt band of a normal-incidence instrument that states no tilt, degrees. */
const NORMAL_INCIDENCE_TILT_DEG = 10;

export interface DriverPrior {
  nominalNm: number;
  /** 1σ of the measured wavelength, relative. */
  sigmaRelative: number;
  /** Largest blue shift below the measured wavelength, relative. */
  blueShiftRelative: number;
}

/** Mean and relative 1σ of the effective λ0 under the driver prior: λm ~ N(nominal, σ), shift ~ U[0, B]. */
export function driverPriorMoments(d: DriverPrior): { meanNm: number; sigmaRelative: number } {
  return {
    meanNm: d.nominalNm * (1 - d.blueShiftRelative / 2),
    sigmaRelative: Math.sqrt(d.sigmaRelative ** 2 + d.blueShiftRelative ** 2 / 12),
  };
}

/**
 * Relative 1σ of the whole wavelength scale when nothing but the driver prior fixes it (a real
 * 1σ of the prior above, not a window's half-width).
 */
export function unanchoredScaleSigma(driverSigmaPct: number, blueShiftPct = DEFAULT_BLUE_SHIFT_PCT): number {
  return driverPriorMoments({ nominalNm: 1, sigmaRelative: driverSigmaPct / 100, blueShiftRelative: blueShiftPct / 100 }).sigmaRelative;
}

/**
 * Signed tilt in the convention of grating.ts from the profile's physical one: a positive profile
 * tilt puts the long-wavelength end of the camera farther from the grating (as a flat focal plane
 * standing square to the grating surface does).
 */
export function modelTiltDeg(profileTiltDeg: number, wavelengthIncreasesWithPixel: boolean): number {
  return wavelengthIncreasesWithPixel ? profileTiltDeg : -profileTiltDeg;
}

/** The flat-field tilt 90° − β0 of a grazing-incidence profile that states its angle, in the profile's convention; null otherwise. */
export function flatFieldTiltDeg(profile: InstrumentProfile): number | null {
  if (!(Math.abs(profile.incidenceAngleDeg) >= GRAZING_INCIDENCE_DEG)) return null;
  if (profile.detectorAngleDeg === undefined || !Number.isFinite(profile.detectorAngleDeg)) return null;
  const beta = Math.abs(profile.detectorAngleDeg);
  return beta < 90 ? 90 - beta : null;
}

export interface Priors {
  nominal: Float64Array;
  walls: (Wall | null)[];
  centralAngleKnown: boolean;
  driver: DriverPrior;
  /** Plain-language statements of the assumptions, for the result's notes. */
  notes: string[];
}

function wall(lo: number, hi: number, softness: number): Wall {
  return { lo, hi, softness };
}

export function buildPriors(profile: InstrumentProfile, pixelCount: number, driver: DriverPrior, ranges: RealignmentRanges): Priors {
  const { geometry, centralAngleKnown } = nominalGeometry(profile, pixelCount);
  const notes: string[] = [];
  const L = geometry.detectorDistanceMm;
  const pitchMm = geometry.pixelPitchUm * 1e-3;
  const incr = geometry.wavelengthIncreasesWithPixel;

  // Tilt band, in the profile's convention first.
  let tiltLo: number;
  let tiltHi: number;
  let tiltNominal: number;
  if (profile.detectorTiltDeg !== undefined && Number.isFinite(profile.detectorTiltDeg)) {
    tiltNominal = profile.detectorTiltDeg;
    tiltLo = tiltNominal - ranges.tiltDeg;
    tiltHi = tiltNominal + ranges.tiltDeg;
  } else {
    const grazing = Math.abs(profile.incidenceAngleDeg) >= GRAZING_INCIDENCE_DEG;
    if (grazing) {
      // With the central angle stated, the flat-field value 90° − β0; without it, the common one.
      const flat = flatFieldTiltDeg(profile);
      const flatValue = flat ?? TYPICAL_FLAT_FIELD_TILT_DEG;
      tiltNominal = flat ?? 0;
      // A camera that is not on a flat focal plane may lean either way.
      tiltLo = Math.min(-PLAIN_CAMERA_TILT_DEG, flatValue - TILT_MARGIN_DEG);
      tiltHi = Math.max(PLAIN_CAMERA_TILT_DEG, flatValue + TILT_MARGIN_DEG);
      notes.push(
        `The profile states no detector tilt: it was searched from ${tiltLo.toFixed(0)}° to ${tiltHi.toFixed(0)}° (a camera leaning either way, through the flat-field value 90° − β0 ≈ ${flatValue.toFixed(1)}°${flat === null ? ', typical since the profile gives no β0' : ''}). Stating the tilt in the profile narrows the search.`,
      );
    } else {
      tiltNominal = 0;
      tiltLo = -NORMAL_INCIDENCE_TILT_DEG;
      tiltHi = NORMAL_INCIDENCE_TILT_DEG;
      notes.push(`The profile states no detector tilt: it was searched over ±${NORMAL_INCIDENCE_TILT_DEG}°.`);
    }
  }
  const tiltA = modelTiltDeg(tiltLo, incr);
  const tiltB = modelTiltDeg(tiltHi, incr);

  const centreHalf = ranges.centerRelative * pixelCount + (centralAngleKnown ? (L * Math.tan(ranges.detectorAngleDeg * DEG)) / pitchMm : 0);
  const { meanNm } = driverPriorMoments(driver);
  const nominal = new Float64Array(PARAMETER_COUNT);
  nominal[P_CENTER] = geometry.detectorCenterPixel;
  nominal[P_ANGLE] = centralAngleKnown ? geometry.detectorAngleDeg : 0;
  nominal[P_INCIDENCE] = geometry.incidenceAngleDeg;
  nominal[P_DISTANCE] = L;
  nominal[P_DRIVER] = meanNm;
  nominal[P_TILT] = modelTiltDeg(tiltNominal, incr);
  const driverLo = driver.nominalNm * (1 - driver.blueShiftRelative);
  const driverHi = driver.nominalNm;
  const walls: (Wall | null)[] = [
    wall(nominal[P_CENTER] - centreHalf, nominal[P_CENTER] + centreHalf, 0.02 * centreHalf),
    centralAngleKnown ? wall(nominal[P_ANGLE] - ranges.detectorAngleDeg, nominal[P_ANGLE] + ranges.detectorAngleDeg, 0.02 * ranges.detectorAngleDeg + 1e-4) : null,
    wall(nominal[P_INCIDENCE] - ranges.incidenceDeg, nominal[P_INCIDENCE] + ranges.incidenceDeg, 0.02 * ranges.incidenceDeg + 1e-4),
    wall(L * (1 - ranges.distanceRelative), L * (1 + ranges.distanceRelative), 0.02 * ranges.distanceRelative * L + 1e-6),
    // Gaussian tails with the measurement's own σ outside the blue-shift band.
    wall(driverLo, driverHi, Math.max(driver.sigmaRelative, 1e-6) * driver.nominalNm),
    wall(Math.min(tiltA, tiltB), Math.max(tiltA, tiltB), 0.02 * (tiltHi - tiltLo) + 1e-4),
  ];
  notes.unshift(
    `Assumed: the driver was measured at ${driver.nominalNm.toFixed(3)} nm ± ${(100 * driver.sigmaRelative).toFixed(2)} % (1σ) and ionisation may blue-shift the harmonics by up to ${(100 * driver.blueShiftRelative).toFixed(2)} % below it (an assumption, not a measurement).`,
  );
  return { nominal, walls, centralAngleKnown, driver, notes };
}

/** Lowest and highest effective λ0 the priors allow in earnest (3σ beyond the blue-shift band), nm. */
export function driverSpanNm(d: DriverPrior): [number, number] {
  return [d.nominalNm * (1 - d.blueShiftRelative - 3 * d.sigmaRelative), d.nominalNm * (1 + 3 * d.sigmaRelative)];
}
