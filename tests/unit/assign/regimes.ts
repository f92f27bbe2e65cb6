/**
 * Realignment regimes of a flat-field XUV spectrometer that real instruments show and that once
 * made the assigner confidently wrong (issue 14). Each regime draws a true geometry away from
 * the nominal profile as a realignment moves it, from ranges of real instruments, not from the
 * assigner's priors: a flat focal plane tilted 10–15° off the central ray (from memory: roughly
 * 90° − β0), the diffraction angle moved by tenths of a degree, the distance by several percent,
 * a laser whose nameplate says 800 nm. Invented instrument, no real data.
 */
import type { AssignInput } from '../../../shared/engine/assign/index.ts';
import type { InstrumentProfile } from '../../../shared/engine/types.ts';
import { rng, simulatePeaks, XUV_PROFILE, type SimPeaks } from './peak-sim.ts';

/** The XUV test profile: 1200 l/mm, 87°, 235 mm, 13.5 µm pixels, 2048 px (invented). */
export const FLAT_FIELD_PROFILE: InstrumentProfile = {
  ...XUV_PROFILE,
  name: 'invented XUV flat-field (regime tests)',
  detectorTiltDeg: undefined,
  detectorCenterPixel: 1023.5,
  detectorAngleDeg: 74,
  pixelCount: 2048,
};

export interface Regime {
  name: string;
  /** True tilt (deg), angle offset of the truth from the profile (deg), distance (relative), centre shift (px), true driver centre (nm). */
  draw: (u: () => number) => { tiltDeg: number; angleOffsetDeg: number; distanceRelative: number; centerShiftPx: number; incidenceDeg: number; driverTrueNm: number };
  /** Whether the profile states its tilt (at the flat-field value). */
  profileTiltDeg?: number;
  tolerancePct: number;
}

const around = (u: () => number, centre: number, half: number): number => centre + (2 * u() - 1) * half;

export const REGIMES: Regime[] = [
  {
    name: 'tilt 12 ± 2°',
    tolerancePct: 0.3,
    draw: (u) => ({ tiltDeg: around(u, 12, 2), angleOffsetDeg: around(u, 0, 0.1), distanceRelative: around(u, 0, 0.02), centerShiftPx: around(u, 0, 40), incidenceDeg: around(u, 0, 0.3), driverTrueNm: around(u, 800, 1.5) }),
  },
  {
    name: 'tilt 14 ± 2°',
    tolerancePct: 0.3,
    draw: (u) => ({ tiltDeg: around(u, 14, 2), angleOffsetDeg: around(u, 0, 0.1), distanceRelative: around(u, 0, 0.02), centerShiftPx: around(u, 0, 40), incidenceDeg: around(u, 0, 0.3), driverTrueNm: around(u, 800, 1.5) }),
  },
  {
    name: 'angle off ±0.3°',
    tolerancePct: 0.3,
    draw: (u) => ({ tiltDeg: around(u, 0, 3), angleOffsetDeg: around(u, 0, 0.3), distanceRelative: around(u, 0, 0.02), centerShiftPx: around(u, 0, 40), incidenceDeg: around(u, 0, 0.3), driverTrueNm: around(u, 800, 1.5) }),
  },
  {
    name: 'distance off 8 %',
    tolerancePct: 0.3,
    draw: (u) => ({ tiltDeg: around(u, 0, 3), angleOffsetDeg: around(u, 0, 0.1), distanceRelative: (u() < 0.5 ? -1 : 1) * around(u, 0.08, 0.005), centerShiftPx: around(u, 0, 40), incidenceDeg: around(u, 0, 0.3), driverTrueNm: around(u, 800, 1.5) }),
  },
  {
    name: 'laser 805 nm as "800"',
    tolerancePct: 0.3,
    draw: (u) => ({ tiltDeg: around(u, 0, 3), angleOffsetDeg: around(u, 0, 0.1), distanceRelative: around(u, 0, 0.02), centerShiftPx: around(u, 0, 40), incidenceDeg: around(u, 0, 0.3), driverTrueNm: 805 }),
  },
  {
    name: 'flat field, tilt stated 12°',
    tolerancePct: 0.3,
    profileTiltDeg: 12,
    draw: (u) => ({ tiltDeg: around(u, 12, 2), angleOffsetDeg: around(u, 0, 0.3), distanceRelative: around(u, 0, 0.06), centerShiftPx: around(u, 0, 60), incidenceDeg: around(u, 0, 0.4), driverTrueNm: around(u, 800, 2) }),
  },
];

export interface RegimeCase {
  sim: SimPeaks;
  input: AssignInput;
}

/** One random realignment of a regime: peaks (with m = 2 lines, a stray line, a missing order) and the assigner's input. */
export function regimeCase(regime: Regime, seed: number): RegimeCase {
  const r = rng(seed * 7919 + regime.name.length * 104729);
  const d = regime.draw(r.uniform);
  const blueShift = 0.01 * r.uniform();
  const nominalDriverNm = 800;
  // The truth: profile moved by the realignment; the nominal profile keeps the angle it states.
  const trueProfile: InstrumentProfile = { ...FLAT_FIELD_PROFILE, detectorAngleDeg: (FLAT_FIELD_PROFILE.detectorAngleDeg as number) + d.angleOffsetDeg };
  const effective = d.driverTrueNm * (1 - blueShift);
  // peak-sim puts the effective driver at nominal·(1 − tol·fraction); solve for the fraction.
  const fraction = (1 - effective / nominalDriverNm) / 0.01;
  const secondOrder = [33, 35, 37, 39, 41, 43].filter(() => r.uniform() < 0.5);
  const missing = [15 + 2 * Math.floor(r.uniform() * 20)];
  const sim = simulatePeaks({
    profile: trueProfile,
    pixelCount: 2048,
    nominalDriverNm,
    tolerancePct: 1,
    blueShiftFraction: fraction,
    parity: 'odd',
    harmonicRange: [15, 61],
    perturb: { incidenceDeg: d.incidenceDeg, distanceRelative: d.distanceRelative, centerShiftPx: d.centerShiftPx, tiltDeg: d.tiltDeg },
    centroidSigmaPx: 0.05,
    area: (q) => 2e5 * Math.exp(-((q - 35) ** 2) / 300),
    secondOrder,
    missing,
    spurious: [200 + r.uniform() * 1600],
    seed,
  });
  const profile: InstrumentProfile = { ...FLAT_FIELD_PROFILE };
  if (regime.profileTiltDeg !== undefined) profile.detectorTiltDeg = regime.profileTiltDeg;
  return { sim, input: { profile, pixelCount: 2048, driverNm: nominalDriverNm, driverTolerancePct: regime.tolerancePct, parity: 'odd' } };
}
