/**
 * The demo lab's story as data: which frames the fictional Lindqvist Attosecond Lab took, when,
 * with which (true) spectrometer geometry, and which calibration versions were made from them.
 * EVERYTHING HERE IS INVENTED DEMO DATA, rendered by our own simulator; no real lab, person or
 * measurement. The seed (server/scripts/seed.ts) turns this into stored frames and versions.
 *
 * Story on the XUV flat-field spectrometer (nominal profile in seed.ts):
 *   v1 2026-09-01 commissioning            → approved, superseded by v2
 *   v2 2026-10-05 grating re-seated         → approved, superseded by v3
 *   v3 2026-11-02 realigned after a vent    → approved (valid now for frames before the move)
 *   2026-11-18 a two-colour delay scan of 24 frames (parity all), calibrated by v3
 *   2026-11-24 the camera mount was replaced: the detector moved by 14 pixels
 *   v4 2026-11-24 recalibration after the move → in review (waiting for the owner)
 * On the VUV normal-incidence spectrometer: one approved version from a low-order frame.
 */
import type { SimScenario } from '../../../shared/engine/simulate/index.ts';
import type { GratingGeometry, InstrumentProfile, Parity } from '../../../shared/engine/types.ts';
import { demoInstruments } from './instruments.ts';

/** Metadata a frame is stored with (the upload route's fields). */
export interface DemoFrameMeta {
  takenAt: string;
  kind: 'signal' | 'dark';
  exposureS: number;
  accumulations: number;
  target: string;
  pressureMbar: number;
  filters: string[];
  driverNm: number;
  parity: Parity;
  scanVariable?: string;
  scanValue?: number;
  tags: string[];
  notes: string;
}

export interface DemoFrame {
  /** Stable name, also the stored file's original name without extension. */
  name: string;
  scenario: SimScenario;
  seed: number;
  meta: DemoFrameMeta;
}

export interface DemoVersion {
  number: number;
  /** Name of the frame the version is calibrated from. */
  frameName: string;
  validFrom: string;
  note: string;
  /** Where the story leaves it; earlier approved versions end up superseded by later ones. */
  finalState: 'approved' | 'in_review';
}

export interface DemoInstrumentStory {
  instrumentName: string;
  frames: DemoFrame[];
  versions: DemoVersion[];
}

/** Camera and beam settings shared by every demo frame (a 2048 × 512 back-illuminated CCD). */
const CAMERA = {
  width: 2048,
  height: 512,
  spectralAxis: 'x' as const,
  lineFwhmPx: 3.2,
  spatialFwhmPx: 46,
  divergenceExponent: 0.7,
  spatialCentrePx: 248,
  lineShape: { tiltPxPerPx: 0.004, curvaturePxPerPx2: 2e-6 },
  pedestalCounts: 210,
  readNoiseCounts: 4.5,
  gainCountsPerPhoton: 1.6,
  secondOrderRelativeStrength: 0.04,
  hotPixelFraction: 1e-5,
  cosmicRayCount: 1,
  bitDepth: 16 as const,
};

/** The engine's view of a demo instrument: its stored nominal profile with the instrument's name. */
function nominalProfile(index: number): InstrumentProfile & { detectorAngleDeg: number; detectorCenterPixel: number } {
  const demo = demoInstruments[index]!;
  const p = demo.profile;
  if (p.detectorAngleDeg === undefined || p.detectorCenterPixel === undefined) throw new Error(`demo instrument ${demo.name} needs its detector angle and centre`);
  return { ...p, name: demo.name, detectorAngleDeg: p.detectorAngleDeg, detectorCenterPixel: p.detectorCenterPixel };
}

const XUV_NOMINAL = nominalProfile(0);

/** The true geometry in each epoch: small realignment offsets from the nominal profile. */
const XUV_TRUE: Record<'v1' | 'v2' | 'v3' | 'moved', GratingGeometry> = {
  v1: { ...XUV_NOMINAL, incidenceAngleDeg: 87.14, detectorDistanceMm: 236.2, detectorCenterPixel: 1018.0, detectorTiltDeg: 1.2 },
  v2: { ...XUV_NOMINAL, incidenceAngleDeg: 86.91, detectorDistanceMm: 236.2, detectorCenterPixel: 1018.0, detectorTiltDeg: 1.2 },
  v3: { ...XUV_NOMINAL, incidenceAngleDeg: 87.05, detectorDistanceMm: 234.1, detectorCenterPixel: 1027.5, detectorTiltDeg: 0.8 },
  // The new camera mount sits 14 px (189 µm) further along the dispersion direction.
  moved: { ...XUV_NOMINAL, incidenceAngleDeg: 87.05, detectorDistanceMm: 234.1, detectorCenterPixel: 1041.5, detectorTiltDeg: 0.8 },
};

const TI_SAPPHIRE_NM = 800;

/** A neon-gas, aluminium-filtered 800 nm frame: odd harmonics 25–45 and the Al L edge (72.7 eV). */
function neonFrame(name: string, epoch: keyof typeof XUV_TRUE, takenAt: string, seed: number, notes: string, tags: string[]): DemoFrame {
  const scenario: SimScenario = {
    ...CAMERA,
    id: name,
    class: 'demo',
    decidable: true,
    description: `Invented demo frame: neon, 800 nm, Al 200 nm, ${epoch} geometry`,
    geometry: XUV_TRUE[epoch],
    profile: XUV_NOMINAL,
    driver: { nominalNm: TI_SAPPHIRE_NM, tolerancePercent: 0.5, effectiveNm: 798.6 },
    parity: 'odd',
    envelope: { plateauPhotons: 9e5, plateauStartHarmonic: 21, cutoffHarmonic: 61, rollOffOrders: 3, jitterRelative: 0.12 },
    filters: [{ material: 'Al', thicknessNm: 200 }],
    spatialReferenceHarmonic: 25,
    takenAt,
    exposureS: 0.5,
  };
  return {
    name,
    scenario,
    seed,
    meta: {
      takenAt,
      kind: 'signal',
      exposureS: 0.5,
      accumulations: 10,
      target: 'Ne',
      pressureMbar: 45,
      filters: ['Al'],
      driverNm: TI_SAPPHIRE_NM,
      parity: 'odd',
      tags,
      notes: `${notes} (invented demo data)`,
    },
  };
}

/**
 * Period of the yield modulation in the relative phase, rad: π, because shifting the 2ω phase by π
 * gives the field −E(t + T/2), whose harmonic intensities are the same (common practice for ω–2ω).
 */
export const DELAY_SCAN_PERIOD_RAD = Math.PI;

/** The relative phase delay of the 400 nm field in the delay scan, rad: 24 steps over 2π. */
export const DELAY_SCAN_PHASES_RAD = Array.from({ length: 24 }, (_, k) => (2 * Math.PI * k) / 24);

/**
 * Two-colour (800 + 400 nm) frames: even harmonics appear and their yield follows the relative
 * phase φ as 1 + 0.8 cos(2φ − φq) (the 2ω field breaks the half-cycle symmetry twice per 2π of
 * phase, with an order-dependent offset); odd orders dip weakly. Invented modulation depths.
 */
function delayScanFrame(k: number): DemoFrame {
  const phase = DELAY_SCAN_PHASES_RAD[k]!;
  const harmonicWeights: Record<number, number> = {};
  for (let q = 20; q <= 50; q += 1) {
    const offsetRad = 0.12 * (q - 30);
    harmonicWeights[q] = q % 2 === 0 ? 0.5 * (1 + 0.8 * Math.cos(2 * phase - offsetRad)) : 1 - 0.15 * Math.cos(2 * phase - offsetRad);
  }
  const takenAt = new Date(Date.UTC(2026, 10, 18, 14, 0, 0) + k * 90_000).toISOString();
  const base = neonFrame(`delay-scan-${String(k + 1).padStart(2, '0')}`, 'v3', takenAt, 5000 + k, `Two-colour delay scan step ${k + 1}/24`, ['delay-scan', 'two-colour']);
  base.scenario = { ...base.scenario, parity: 'all', evenRelativeStrength: 1, harmonicWeights, description: `Invented demo frame: two-colour delay scan, φ = ${phase.toFixed(3)} rad` };
  base.meta = { ...base.meta, parity: 'all', scanVariable: 'phaseDelayRad', scanValue: phase };
  return base;
}

/** VUV normal-incidence story: low harmonics of 800 nm in argon (7th–15th), no filter. */
function vuvStory(): DemoInstrumentStory {
  const nominal = nominalProfile(1);

  const takenAt = '2026-10-12T10:30:00.000Z';
  const scenario: SimScenario = {
    ...CAMERA,
    id: 'vuv-commissioning',
    class: 'demo',
    decidable: true,
    description: 'Invented demo frame: argon, 800 nm, low orders on the normal-incidence spectrometer',
    geometry: { ...nominal, incidenceAngleDeg: 10.2, detectorDistanceMm: 1004, detectorCenterPixel: 1016, detectorTiltDeg: 0.5 },
    profile: nominal,
    driver: { nominalNm: TI_SAPPHIRE_NM, tolerancePercent: 0.5, effectiveNm: 799.2 },
    parity: 'odd',
    envelope: { plateauPhotons: 6e5, plateauStartHarmonic: 5, cutoffHarmonic: 15, rollOffOrders: 1.5, jitterRelative: 0.1 },
    spatialReferenceHarmonic: 7,
    takenAt,
    exposureS: 1,
  };
  return {
    instrumentName: nominal.name,
    frames: [
      {
        name: 'vuv-commissioning',
        scenario,
        seed: 9001,
        meta: {
          takenAt,
          kind: 'signal',
          exposureS: 1,
          accumulations: 5,
          target: 'Ar',
          pressureMbar: 20,
          filters: [],
          driverNm: TI_SAPPHIRE_NM,
          parity: 'odd',
          tags: ['commissioning'],
          notes: 'Low orders in argon (invented demo data)',
        },
      },
    ],
    versions: [{ number: 1, frameName: 'vuv-commissioning', validFrom: '2026-10-12T09:00:00.000Z', note: 'Commissioning calibration (invented demo).', finalState: 'approved' }],
  };
}

/** The XUV story: calibration frames, daily frames, the delay scan and the frames after the camera move. */
function xuvStory(): DemoInstrumentStory {
  const frames: DemoFrame[] = [
    neonFrame('cal-2026-09-01', 'v1', '2026-09-01T11:00:00.000Z', 101, 'Commissioning calibration frame', ['calibration']),
    neonFrame('cal-2026-10-05', 'v2', '2026-10-05T10:15:00.000Z', 102, 'Calibration after the grating was re-seated', ['calibration']),
    neonFrame('cal-2026-11-02', 'v3', '2026-11-02T09:40:00.000Z', 103, 'Calibration after the vent and realignment', ['calibration']),
    neonFrame('daily-2026-11-10', 'v3', '2026-11-10T15:20:00.000Z', 201, 'Daily check, neon', ['daily']),
    neonFrame('daily-2026-11-16', 'v3', '2026-11-16T16:05:00.000Z', 202, 'Daily check, neon', ['daily']),
    ...DELAY_SCAN_PHASES_RAD.map((_, k) => delayScanFrame(k)),
    neonFrame('cal-2026-11-24', 'moved', '2026-11-24T10:30:00.000Z', 104, 'Calibration after the camera mount was replaced', ['calibration', 'camera-move']),
    neonFrame('daily-2026-11-25', 'moved', '2026-11-25T14:45:00.000Z', 203, 'First daily check after the camera move', ['daily', 'camera-move']),
  ];
  const versions: DemoVersion[] = [
    { number: 1, frameName: 'cal-2026-09-01', validFrom: '2026-09-01T08:00:00.000Z', note: 'Commissioning (invented demo).', finalState: 'approved' },
    { number: 2, frameName: 'cal-2026-10-05', validFrom: '2026-10-05T08:00:00.000Z', note: 'Grating re-seated (invented demo).', finalState: 'approved' },
    { number: 3, frameName: 'cal-2026-11-02', validFrom: '2026-11-02T08:00:00.000Z', note: 'Realigned after the vent (invented demo).', finalState: 'approved' },
    { number: 4, frameName: 'cal-2026-11-24', validFrom: '2026-11-24T09:00:00.000Z', note: 'Camera mount replaced; detector moved by about 14 px (invented demo).', finalState: 'in_review' },
  ];
  return { instrumentName: XUV_NOMINAL.name, frames, versions };
}

/** Both instruments' stories, XUV first. */
export function demoStories(): DemoInstrumentStory[] {
  return [xuvStory(), vuvStory()];
}
