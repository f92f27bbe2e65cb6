/**
 * Peak lists straight from the forward model (shared/engine/grating.ts), for assigner tests: a
 * TRUE geometry and effective driver place harmonic q at the pixel of λ0/q (m = 1) and of 2λ0/q
 * in first-order terms (m = 2, grating equation mλ = d(sin α − sin β)); the assigner is given a
 * perturbed NOMINAL profile. Invented data, no real instrument.
 */
import { wavelengthToPixel } from '../../../shared/engine/grating.ts';
import type { GratingGeometry, InstrumentProfile, Peak } from '../../../shared/engine/types.ts';

/** Small deterministic PRNG (mulberry32) and a Box–Muller normal. */
export function rng(seed: number): { uniform: () => number; normal: () => number } {
  let a = seed >>> 0;
  const uniform = (): number => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
  const normal = (): number => Math.sqrt(-2 * Math.log(uniform() + 1e-300)) * Math.cos(2 * Math.PI * uniform());
  return { uniform, normal };
}

/** A grazing-incidence flat-field spectrometer, 1200 lines/mm, 1024 px of 13.5 µm (invented). */
export const XUV_PROFILE: InstrumentProfile = {
  name: 'invented XUV flat-field',
  spectralAxis: 'x',
  grooveDensityPerMm: 1200,
  incidenceAngleDeg: 87,
  detectorDistanceMm: 235,
  pixelPitchUm: 13.5,
  wavelengthIncreasesWithPixel: true,
  detectorCenterPixel: 511.5,
  detectorAngleDeg: 76,
  // The camera stands square to the central ray (the truth's tilt is drawn within ±1° of it).
  detectorTiltDeg: 0,
  pixelCount: 1024,
};

export interface PeakSimOptions {
  profile?: InstrumentProfile;
  pixelCount?: number;
  nominalDriverNm?: number;
  tolerancePct?: number;
  /** Fraction of the tolerance the effective driver sits below nominal (0..1). @default random */
  blueShiftFraction?: number;
  parity?: 'odd' | 'all';
  /** Realignment: incidence (deg), distance (relative), centre shift (px), tilt (deg). @default random within ranges */
  perturb?: { incidenceDeg?: number; distanceRelative?: number; centerShiftPx?: number; tiltDeg?: number };
  centroidSigmaPx?: number;
  /** Harmonics to drop (absent lines). */
  missing?: number[];
  /** Harmonics whose m = 2 line is present. */
  secondOrder?: number[];
  /** Spurious peak pixels. */
  spurious?: number[];
  /** Only these harmonics are generated (plateau); default all on the detector. */
  harmonicRange?: [number, number];
  /** Line area (counts) by harmonic before filters. @default 1e5 */
  area?: (q: number) => number;
  transmission?: (energyEv: number) => number;
  seed?: number;
}

export interface SimPeaks {
  peaks: Peak[];
  /** Truth per peak: harmonic and m (null for spurious). */
  truth: { harmonic: number | null; diffractionOrder: number | null }[];
  geometry: GratingGeometry;
  effectiveDriverNm: number;
  profile: InstrumentProfile;
}

export function simulatePeaks(o: PeakSimOptions = {}): SimPeaks {
  const r = rng(o.seed ?? 1);
  const profile = o.profile ?? XUV_PROFILE;
  const n = o.pixelCount ?? profile.pixelCount ?? 1024;
  const nominal = o.nominalDriverNm ?? 800;
  const tol = (o.tolerancePct ?? 1) / 100;
  const effective = nominal * (1 - tol * (o.blueShiftFraction ?? r.uniform()));
  const pert = o.perturb ?? {};
  const geometry: GratingGeometry = {
    grooveDensityPerMm: profile.grooveDensityPerMm,
    incidenceAngleDeg: profile.incidenceAngleDeg + (pert.incidenceDeg ?? (r.uniform() - 0.5) * 0.8),
    detectorDistanceMm: profile.detectorDistanceMm * (1 + (pert.distanceRelative ?? (r.uniform() - 0.5) * 0.05)),
    pixelPitchUm: profile.pixelPitchUm,
    wavelengthIncreasesWithPixel: profile.wavelengthIncreasesWithPixel,
    detectorCenterPixel: (profile.detectorCenterPixel ?? (n - 1) / 2) + (pert.centerShiftPx ?? (r.uniform() - 0.5) * 0.08 * n),
    detectorAngleDeg: profile.detectorAngleDeg ?? 76,
    detectorTiltDeg: pert.tiltDeg ?? (r.uniform() - 0.5) * 2,
  };
  const sigma = o.centroidSigmaPx ?? 0.05;
  const parity = o.parity ?? 'odd';
  const T = o.transmission ?? (() => 1);
  const area = o.area ?? (() => 1e5);
  const peaks: Peak[] = [];
  const truth: SimPeaks['truth'] = [];
  const push = (pixel: number, a: number, width: number, label: SimPeaks['truth'][number]): void => {
    if (!(pixel > 1 && pixel < n - 2)) return;
    peaks.push({
      pixel: pixel + sigma * r.normal(),
      pixelSigma: sigma,
      fwhmPx: 4,
      amplitude: a / 4,
      area: a,
      areaSigma: Math.sqrt(a),
      snr: Math.sqrt(a),
      spatialWidthPx: width,
      saturated: false,
    });
    truth.push(label);
  };
  const [qa, qb] = o.harmonicRange ?? [1, 400];
  for (let q = qa; q <= qb; q++) {
    if (parity === 'odd' && q % 2 === 0) continue;
    const energy = (q * 1239.8419843320025) / effective;
    const t = T(energy);
    const width = 20 * Math.sqrt(21 / q);
    if (!(o.missing ?? []).includes(q) && t > 1e-3) push(wavelengthToPixel(geometry, effective / q, 1), area(q) * t, width, { harmonic: q, diffractionOrder: 1 });
    if ((o.secondOrder ?? []).includes(q) && t > 1e-3) push(wavelengthToPixel(geometry, effective / q, 2), 0.05 * area(q) * t, width, { harmonic: q, diffractionOrder: 2 });
  }
  for (const px of o.spurious ?? []) push(px, 2e3, 15, { harmonic: null, diffractionOrder: null });
  const order = peaks.map((_, i) => i).sort((a, b) => peaks[a].pixel - peaks[b].pixel);
  return { peaks: order.map((i) => peaks[i]), truth: order.map((i) => truth[i]), geometry, effectiveDriverNm: effective, profile };
}
