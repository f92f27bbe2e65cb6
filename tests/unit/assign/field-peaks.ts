/**
 * Peak lists for the assigner's regime tests, in the field regimes the classic scenarios never
 * draw (see shared/engine/simulate/field-ranges.ts): a flat-field focal plane tilted 12-14°, a
 * stated central angle off by tenths of a degree, a distance 8 % off, a laser at 805 nm entered
 * as "800 nm", a blue shift below the nameplate. No rendering: harmonic q sits where grating.ts
 * puts λ0_eff/q in order m (mλ = d(sin α − sin β)), plus centroid noise. Invented data.
 *
 * The instrument: the XUV test profile (1200 lines/mm, 87° incidence, 235 mm, 13.5 µm pixels,
 * 2048 spectral pixels, central angle 76°: harmonics ~23-59 of 800 nm land on it), a driver
 * given as "800 nm" ± 0.3 %, odd harmonics 15-61 generated (those off the detector are dropped).
 *
 *   const { peaks, truth, input } = fieldPeakList({ tiltDeg: 14, statedTiltDeg: 12.5, driverTrueNm: 805 });
 *   const result = assignOrders(peaks, input);   // compare result.best.harmonics with truth
 */
import type { AssignInput } from '../../../shared/engine/assign/index.ts';
import { HC_EV_NM } from '../../../shared/engine/constants.ts';
import { wavelengthToPixel } from '../../../shared/engine/grating.ts';
import type { GratingGeometry, InstrumentProfile, Parity, Peak } from '../../../shared/engine/types.ts';
import { rng } from './peak-sim.ts';

/** The nominal XUV test profile (invented): what the user types in. */
export const FIELD_XUV_PROFILE: InstrumentProfile = {
  name: 'invented XUV flat-field, field regime tests',
  spectralAxis: 'x',
  grooveDensityPerMm: 1200,
  incidenceAngleDeg: 87,
  detectorDistanceMm: 235,
  pixelPitchUm: 13.5,
  wavelengthIncreasesWithPixel: true,
  detectorCenterPixel: 1023.5,
  detectorAngleDeg: 76,
  pixelCount: 2048,
};

/** The driver as the user gives it. */
export const FIELD_DRIVER = { nominalNm: 800, tolerancePct: 0.3 } as const;

export interface FieldPeakListOptions {
  /** True detector tilt, degrees, in GratingGeometry's sign (positive: long-wavelength end farther). @default 12 */
  tiltDeg?: number;
  /** Nominal tilt the profile states; absent = the profile states none. @default absent */
  statedTiltDeg?: number;
  /** True central diffraction angle minus the profile's, degrees. @default 0 */
  angleOffsetDeg?: number;
  /** Whether the profile states its central diffraction angle. @default true */
  statesDetectorAngle?: boolean;
  /** True distance over the profile's, minus 1. @default 0 */
  distanceRelative?: number;
  /** True incidence minus the profile's, degrees. @default 0 */
  incidenceOffsetDeg?: number;
  /** True centre pixel minus the profile's, px. @default 0 */
  centreShiftPx?: number;
  /** The laser's true centre wavelength, nm (the user still enters "800 nm"). @default 800 */
  driverTrueNm?: number;
  /** Ionisation blue shift of the harmonics below the laser centre, relative. @default 0 */
  blueShiftRelative?: number;
  /** Harmonics generated (inclusive); those off the detector are dropped. @default [15, 61] */
  harmonicRange?: [number, number];
  /** @default 'odd' */
  parity?: Parity;
  /** Area of even orders relative to odd ones when parity is 'all'. @default 0.3 */
  evenRelativeStrength?: number;
  /** Area of every harmonic's m = 2 line relative to its m = 1 line (0: none). @default 0 */
  secondOrderRelativeStrength?: number;
  /** Harmonics left out (absent lines). @default [] */
  missing?: number[];
  /** Pixels of stray peaks that are no harmonic. @default [] */
  spurious?: number[];
  /** Centroid 1σ of a line of area 1e5, px (scales as 1/√area). @default 0.03 */
  centroidSigmaPx?: number;
  /** Line area (counts) by harmonic before filters. @default 1e5 on the plateau, a soft roll-off above q = 51 */
  area?: (harmonic: number) => number;
  /** Filter-stack transmission at a photon energy (eV). @default 1 */
  transmission?: (energyEv: number) => number;
  /** Lines with SNR (area / √area) below this are not detected. @default 5 */
  minSnr?: number;
  /** @default 1 */
  seed?: number;
}

export interface FieldPeakList {
  /** Detected peaks, sorted by pixel. */
  peaks: Peak[];
  /** Truth per peak: harmonic and diffraction order, null for stray peaks. */
  truth: { harmonic: number | null; diffractionOrder: number | null }[];
  /** The TRUE geometry. */
  geometry: GratingGeometry;
  /** The NOMINAL profile the assigner is given. */
  profile: InstrumentProfile;
  effectiveDriverNm: number;
  /** Ready-made assigner input: the nominal profile, "800 nm" ± 0.3 %, the parity. */
  input: AssignInput;
}

const FWHM_PX = 4;

function defaultArea(q: number): number {
  return 1e5 / (1 + Math.exp((q - 51) / 3));
}

/** A peak list in a field regime; see the module comment. */
export function fieldPeakList(o: FieldPeakListOptions = {}): FieldPeakList {
  const r = rng(o.seed ?? 1);
  const statesAngle = o.statesDetectorAngle ?? true;
  const nominal = FIELD_XUV_PROFILE;
  const profile: InstrumentProfile = { ...nominal, ...(o.statedTiltDeg !== undefined ? { detectorTiltDeg: o.statedTiltDeg } : {}) };
  if (!statesAngle) delete profile.detectorAngleDeg;
  const geometry: GratingGeometry = {
    grooveDensityPerMm: nominal.grooveDensityPerMm,
    incidenceAngleDeg: nominal.incidenceAngleDeg + (o.incidenceOffsetDeg ?? 0),
    detectorDistanceMm: nominal.detectorDistanceMm * (1 + (o.distanceRelative ?? 0)),
    pixelPitchUm: nominal.pixelPitchUm,
    wavelengthIncreasesWithPixel: nominal.wavelengthIncreasesWithPixel,
    detectorCenterPixel: (nominal.detectorCenterPixel as number) + (o.centreShiftPx ?? 0),
    detectorAngleDeg: (nominal.detectorAngleDeg as number) + (o.angleOffsetDeg ?? 0),
    detectorTiltDeg: o.tiltDeg ?? 12,
  };
  const effective = (o.driverTrueNm ?? FIELD_DRIVER.nominalNm) * (1 - (o.blueShiftRelative ?? 0));
  const parity = o.parity ?? 'odd';
  const n = nominal.pixelCount as number;
  const sigma1e5 = o.centroidSigmaPx ?? 0.03;
  const minSnr = o.minSnr ?? 5;
  const transmission = o.transmission ?? (() => 1);
  const area = o.area ?? defaultArea;
  const missing = new Set(o.missing ?? []);
  const peaks: Peak[] = [];
  const truth: FieldPeakList['truth'] = [];
  const push = (pixel: number, a: number, spatialWidthPx: number, label: FieldPeakList['truth'][number]): void => {
    if (!(pixel > 2 && pixel < n - 3) || !(a > 0) || Math.sqrt(a) < minSnr) return;
    const sigma = sigma1e5 * Math.sqrt(1e5 / a);
    peaks.push({
      pixel: pixel + sigma * r.normal(),
      pixelSigma: sigma,
      fwhmPx: FWHM_PX,
      amplitude: a / (1.0645 * FWHM_PX),
      area: a,
      areaSigma: Math.sqrt(a),
      snr: Math.sqrt(a),
      spatialWidthPx,
      saturated: false,
    });
    truth.push(label);
  };
  const [qa, qb] = o.harmonicRange ?? [15, 61];
  for (let q = qa; q <= qb; q += 1) {
    const even = q % 2 === 0;
    if (even && parity === 'odd') continue;
    if (missing.has(q)) continue;
    const a = area(q) * (even ? (o.evenRelativeStrength ?? 0.3) : 1) * transmission((q * HC_EV_NM) / effective);
    // Divergence falls with order (RMS width ∝ q^−1/2), so an m = 2 line is narrower than an m = 1 line beside it.
    const width = 20 * Math.sqrt(21 / q);
    push(wavelengthToPixel(geometry, effective / q, 1), a, width, { harmonic: q, diffractionOrder: 1 });
    const second = o.secondOrderRelativeStrength ?? 0;
    if (second > 0) push(wavelengthToPixel(geometry, effective / q, 2), a * second, width, { harmonic: q, diffractionOrder: 2 });
  }
  for (const px of o.spurious ?? []) push(px, 3e3, 15, { harmonic: null, diffractionOrder: null });
  const order = peaks.map((_, i) => i).sort((a, b) => peaks[a].pixel - peaks[b].pixel);
  return {
    peaks: order.map((i) => peaks[i]),
    truth: order.map((i) => truth[i]),
    geometry,
    profile,
    effectiveDriverNm: effective,
    input: { profile, pixelCount: n, driverNm: FIELD_DRIVER.nominalNm, driverTolerancePct: FIELD_DRIVER.tolerancePct, parity },
  };
}
