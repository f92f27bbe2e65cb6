/**
 * A deterministic generator of simulation scenarios for tests, the evaluation, the benchmark and
 * the demo: grazing-incidence flat-field XUV spectrometers and normal-incidence VUV ones, drivers
 * from 400 nm to 3.2 µm, filters whose edges cut the comb, noise, m = 2 lines, missing orders and
 * spurious peaks, plus deliberately undecidable cases. All instruments and numbers are invented.
 *
 * Each scenario is drawn from its own seed and accepted only when the lines it puts on the
 * detector (expectedLines, no rendering) meet its class's conditions; otherwise it is redrawn
 * from the same stream, so the result is still a function of the seed alone.
 */
import { firstAccepted, photonsForPeak, resolvable, scenarioList, visibleFirstOrder, type Draft } from './drafts.ts';
import { betaDeg, detectorRangeEv } from './field-ranges.ts';
import { FILTER_EDGE_WINDOWS_EV } from './filter-windows.ts';
import { HC_EV_NM } from '../constants.ts';
import { EngineError } from '../errors.ts';
import type { GratingGeometry, InstrumentProfile, Parity } from '../types.ts';
import { steepestEdgeEv, type FilterTransmissionFn } from './filters.ts';
import { createRandom, mixSeed, type Random } from './random.ts';
import type { SimFilter, SimLine, SimScenario } from './types.ts';

const DEG = Math.PI / 180;

/** The scenario classes, decidable first. */
export const SCENARIO_CLASSES = [
  'gi-odd-clean',
  'gi-odd-filter-edge',
  'gi-odd-continuum-edge',
  'gi-all-weak-even',
  'gi-odd-strong-second-order',
  'gi-odd-missing-outliers',
  'gi-odd-low-signal',
  'gi-odd-saturated',
  'gi-mid-ir-high-orders',
  'ni-vuv-low-orders',
  'undecidable-two-lines',
  'undecidable-all-parity-comb',
  'undecidable-wide-tolerance',
] as const;

export type ScenarioClass = (typeof SCENARIO_CLASSES)[number];

/** Options of `generateScenarios`. */
export interface GenerateScenariosOptions {
  /** Classes to draw, in turn (scenario i has class classes[i mod n]). @default SCENARIO_CLASSES */
  classes?: readonly ScenarioClass[];
  /** [spectral, spatial] detector sizes in px to draw from. @default [[1024, 256], [2048, 512], [1024, 1024]] */
  sizes?: readonly [number, number][];
  /** Spectral axis of the frames; 'random' draws x or y. @default 'random' */
  spectralAxis?: 'x' | 'y' | 'random';
  /** Sample type; 'random' gives float frames one time in five. @default 16 */
  bitDepth?: 16 | 'float' | 'random';
  /** Filter transmission source passed to expectedLines. @default the simulator's table */
  filterTransmission?: FilterTransmissionFn;
}

/** The classic scenarios draw from the filters they always drew from (Ti came later, with the field scenarios). */
const FILTER_MATERIALS = Object.keys(FILTER_EDGE_WINDOWS_EV).filter((m) => m !== 'Ti');

/** Highest photon energy a driver's harmonics plausibly reach here, eV (cutoff grows ~λ²; capped by the 300 eV tables). */
function maxEnergyEv(driverNm: number): number {
  return Math.min(300, 50 + 110 * Math.pow(driverNm / 800, 1.5));
}

const MAX_ATTEMPTS = 400;
/** Adjacent visible first-order lines of a decidable classic class lie at least this many line widths apart. */
const CLASSIC_RESOLVABLE_WIDTHS = 4;

interface Context {
  random: Random;
  spectralLength: number;
  spatialLength: number;
  spectralAxis: 'x' | 'y';
  bitDepth: 16 | 'float';
  index: number;
  className: ScenarioClass;
}

/** Sign of the harmonic step the labelling could slip by: 2 for odd combs, 1 for all orders. */
function orderStep(parity: Parity): number {
  return parity === 'odd' ? 2 : 1;
}

/** The realigned nominal profile: incidence ± 0.5°, distance ± 3 %, detector centre ± 3 % of the width. */
function nominalProfile(c: Context, g: GratingGeometry, name: string): InstrumentProfile {
  const r = c.random;
  return {
    name,
    spectralAxis: c.spectralAxis,
    grooveDensityPerMm: g.grooveDensityPerMm,
    incidenceAngleDeg: g.incidenceAngleDeg + r.between(-0.5, 0.5),
    detectorDistanceMm: g.detectorDistanceMm * (1 + r.between(-0.03, 0.03)),
    pixelPitchUm: g.pixelPitchUm,
    wavelengthIncreasesWithPixel: g.wavelengthIncreasesWithPixel,
    detectorCenterPixel: g.detectorCenterPixel + r.between(-0.03, 0.03) * c.spectralLength,
    detectorAngleDeg: g.detectorAngleDeg,
    pixelCount: c.spectralLength,
    notes: 'Invented instrument of a simulated scenario; the values are nominal (before a realignment).',
  };
}

/** A grazing-incidence flat-field geometry whose central ray carries first-order wavelength `centreNm`. */
function grazingGeometry(c: Context, centreNm: number, long = false): GratingGeometry | null {
  const r = c.random;
  const grooveDensityPerMm = long ? r.pick([1200, 2400]) : r.pick([1200, 1200, 2400]);
  const incidenceAngleDeg = r.between(85, 88);
  const beta0 = betaDeg(incidenceAngleDeg, grooveDensityPerMm, centreNm);
  if (!Number.isFinite(beta0) || beta0 < 40 || beta0 > incidenceAngleDeg - 0.3) return null;
  return {
    grooveDensityPerMm,
    incidenceAngleDeg,
    detectorDistanceMm: long ? r.between(350, 470) : r.between(235, 470),
    pixelPitchUm: r.pick([13, 13.5, 15]),
    wavelengthIncreasesWithPixel: r.uniform() < 0.5,
    detectorCenterPixel: (c.spectralLength - 1) / 2 + r.between(-0.05, 0.05) * c.spectralLength,
    detectorAngleDeg: beta0,
    detectorTiltDeg: r.between(-8, 8),
  };
}

/** Noise, shape and camera settings shared by the classes; the class then overrides. */
function commonFields(c: Context, spatialReferenceHarmonic: number): Omit<SimScenario, 'id' | 'class' | 'decidable' | 'description' | 'geometry' | 'profile' | 'driver' | 'parity' | 'envelope'> {
  const r = c.random;
  const width = c.spectralAxis === 'x' ? c.spectralLength : c.spatialLength;
  const height = c.spectralAxis === 'x' ? c.spatialLength : c.spectralLength;
  return {
    width,
    height,
    spectralAxis: c.spectralAxis,
    lineFwhmPx: r.between(2.5, 5),
    spatialFwhmPx: Math.max(6, c.spatialLength * r.between(0.06, 0.14)),
    spatialReferenceHarmonic,
    divergenceExponent: r.between(0.5, 1),
    spatialCentrePx: c.spatialLength * r.between(0.38, 0.62),
    lineShape: { tiltPxPerPx: r.between(-0.01, 0.01), curvaturePxPerPx2: r.between(-1e-5, 1e-5) },
    pedestalCounts: r.between(50, 500),
    readNoiseCounts: r.between(2, 8),
    gainCountsPerPhoton: r.between(0.5, 3),
    secondOrderRelativeStrength: r.between(0.02, 0.08),
    hotPixelFraction: r.uniform() < 0.5 ? 0 : 1e-5,
    cosmicRayCount: r.integer(0, 3),
    bitDepth: c.bitDepth,
    takenAt: new Date(Date.UTC(2026, 0, 1) + c.index * 60_000).toISOString(),
    exposureS: r.pick([0.1, 0.5, 1, 2]),
  };
}

function driverOf(r: Random, nominalNm: number, tolerancePercent: number): SimScenario['driver'] {
  return { nominalNm, tolerancePercent, effectiveNm: nominalNm * (1 - r.uniform() * (tolerancePercent / 100)) };
}

/** The driver tolerance a decidable comb allows: half the relative change of a one-step slip of the labelling. */
function safeTolerancePercent(r: Random, parity: Parity, highestHarmonic: number): number {
  return Math.min(r.between(0.3, 1), (50 * orderStep(parity)) / highestHarmonic);
}

/** A grazing-incidence scenario of class `c.className`, or null to redraw. */
function grazingDraft(c: Context): Draft | null {
  const r = c.random;
  const k = c.className;
  const midIr = k === 'gi-mid-ir-high-orders';
  const nominalNm = midIr ? r.pick([1800, 2100, 3200]) : r.pick([400, 800, 800, 1030, 1300]);
  const photonEv = HC_EV_NM / nominalNm;
  const topEv = maxEnergyEv(nominalNm);

  // Where the detector's centre sits in energy, and the filter whose edge must cut the comb.
  let filters: SimFilter[] = [];
  let edgeEv = Number.NaN;
  let centreEv: number;
  if (k === 'gi-odd-filter-edge' || k === 'gi-odd-continuum-edge') {
    const material = r.pick(FILTER_MATERIALS);
    const [lo, hi] = FILTER_EDGE_WINDOWS_EV[material];
    if (hi > topEv) return null;
    filters = [{ material, thicknessNm: r.pick([100, 150, 200, 300]) }];
    edgeEv = steepestEdgeEv(filters, lo, hi);
    if (!Number.isFinite(edgeEv) || edgeEv < 4 * photonEv) return null;
    centreEv = edgeEv * r.between(0.85, 1.1);
  } else if (k === 'undecidable-two-lines' || k === 'undecidable-all-parity-comb' || k === 'undecidable-wide-tolerance') {
    // High orders, where one slip of the labelling is a small relative change of the driver.
    const lowEv = Math.max(40 * photonEv, 20);
    if (lowEv >= topEv) return null;
    centreEv = r.between(lowEv, topEv);
  } else {
    centreEv = r.between(Math.max(15, 7 * photonEv), topEv * 0.8);
  }
  const g = grazingGeometry(c, HC_EV_NM / centreEv, midIr);
  if (!g) return null;
  const [loEv, hiEv] = detectorRangeEv(g, c.spectralLength);
  if (!Number.isFinite(loEv) || hiEv > topEv * 1.1) return null;
  const qLo = Math.ceil(loEv / photonEv);
  const qHi = Math.floor(hiEv / photonEv);
  if (qHi - qLo < 2) return null;

  const parity: Parity = k === 'gi-all-weak-even' || k === 'undecidable-all-parity-comb' ? 'all' : 'odd';
  const base = commonFields(c, qLo);
  const fields: Partial<SimScenario> = {};
  let peakCounts = r.between(2000, 30000);
  const span = qHi - qLo;
  let envelope: SimScenario['envelope'] = {
    plateauPhotons: 0,
    plateauStartHarmonic: qLo - r.between(0, 0.4) * span,
    cutoffHarmonic: qLo + r.between(0.6, 1.4) * span,
    rollOffOrders: Math.max(1, r.between(0.05, 0.15) * span),
    jitterRelative: r.between(0.05, 0.25),
  };
  let tolerancePercent = safeTolerancePercent(r, parity, qHi);
  let decidable = true;
  let minVisible = 5;
  let accept: (lines: SimLine[]) => boolean = () => true;
  let description = '';

  switch (k) {
    case 'gi-odd-clean':
      description = 'odd comb, moderate noise, no filter';
      break;
    case 'gi-odd-filter-edge':
    case 'gi-odd-continuum-edge': {
      const qEdge = edgeEv / photonEv;
      envelope = { ...envelope, cutoffHarmonic: Math.max(envelope.cutoffHarmonic, qEdge * r.between(1.15, 1.5)) };
      minVisible = 4;
      if (k === 'gi-odd-continuum-edge') {
        fields.continuum = { photonsPerPixel: 0, spatialFwhmPx: base.spatialFwhmPx * 2 };
      }
      description = `odd comb cut by the ${filters[0].material} edge near ${edgeEv.toFixed(1)} eV${k === 'gi-odd-continuum-edge' ? ', on a continuum that shows the edge' : ''}`;
      accept = (lines) => {
        const first = lines.filter((l) => l.diffractionOrder === 1);
        const below = first.filter((l) => l.energyEv < edgeEv - 1 && l.visible).length;
        const above = first.filter((l) => l.energyEv > edgeEv + 1).length;
        return below >= 2 && above >= 1;
      };
      break;
    }
    case 'gi-all-weak-even':
      fields.evenRelativeStrength = r.between(0.05, 0.4);
      description = 'all orders, even orders weaker';
      break;
    case 'gi-odd-strong-second-order':
      fields.secondOrderRelativeStrength = r.between(0.15, 0.4);
      description = 'odd comb with strong second-diffraction-order lines';
      accept = (lines) => lines.some((l) => l.diffractionOrder === 2 && l.visible);
      break;
    case 'gi-odd-missing-outliers': {
      const inside: number[] = [];
      for (let q = qLo + 2; q <= qHi - 2; q += 1) if (q % 2 === 1) inside.push(q);
      if (inside.length < 3) return null;
      fields.missingHarmonics = [r.pick(inside)];
      fields.spuriousPeaks = Array.from({ length: r.integer(1, 3) }, () => ({
        pixel: r.between(0.05, 0.95) * (c.spectralLength - 1),
        photons: 0,
        fwhmPx: base.lineFwhmPx * r.between(0.4, 0.7),
      }));
      fields.hotPixelFraction = r.between(5e-5, 3e-4);
      fields.cosmicRayCount = r.integer(5, 30);
      minVisible = 6;
      description = 'odd comb with a missing order, spurious narrow peaks, hot pixels and cosmic rays';
      break;
    }
    case 'gi-odd-low-signal':
      peakCounts = r.between(40, 150);
      fields.readNoiseCounts = r.between(5, 12);
      description = 'odd comb at low signal';
      break;
    case 'gi-odd-saturated':
      peakCounts = r.between(80000, 200000);
      description = 'odd comb whose strongest lines saturate';
      break;
    case 'gi-mid-ir-high-orders':
      description = 'mid-infrared driver, dense comb of high orders';
      break;
    case 'undecidable-two-lines': {
      const q0 = Math.floor(r.between(qLo, qHi - 2)) | 1;
      envelope = { ...envelope, plateauStartHarmonic: q0 - 1, cutoffHarmonic: q0 + 3, rollOffOrders: 0.12, jitterRelative: 0 };
      fields.secondOrderRelativeStrength = 0;
      peakCounts = r.between(500, 3000);
      tolerancePercent = r.between(0.5, 2);
      decidable = false;
      minVisible = 2;
      description = 'only two lines visible and no anchor';
      accept = (lines) => lines.filter((l) => l.visible).length === 2 && lines.filter((l) => l.snr > 1).length === 2;
      break;
    }
    case 'undecidable-all-parity-comb':
    case 'undecidable-wide-tolerance': {
      const q0 = Math.floor(r.between(qLo, qHi - 3));
      const step = orderStep(parity);
      if (q0 < 35) return null;
      const count = r.integer(3, 4);
      envelope = { ...envelope, plateauStartHarmonic: q0 - 0.5, cutoffHarmonic: q0 + step * (count - 1) + 0.5, rollOffOrders: 0.1, jitterRelative: 0 };
      fields.secondOrderRelativeStrength = 0;
      // Wide enough that a labelling slipped by one step (λ0 scaled by (q ± step)/q) lies inside
      // [nominal·(1 − tol), nominal] wherever the true λ0 sits in it: tol > 2·step/q.
      tolerancePercent = ((100 * step) / q0) * r.between(2.2, 3);
      decidable = false;
      minVisible = 3;
      description = parity === 'all' ? 'a few consecutive orders of an all-order comb, tolerance wider than one order' : 'a few high odd orders, driver tolerance wider than two orders';
      accept = (lines) => {
        const v = lines.filter((l) => l.visible);
        return v.length >= 3 && v.length <= 4 && lines.filter((l) => l.snr > 1).length === v.length;
      };
      break;
    }
    default:
      return null;
  }
  const lineFwhmPx = base.lineFwhmPx;
  const spatialFwhmPx = base.spatialFwhmPx;
  const gain = fields.gainCountsPerPhoton ?? base.gainCountsPerPhoton ?? 1;
  envelope.plateauPhotons = photonsForPeak(peakCounts, gain, lineFwhmPx, spatialFwhmPx);
  if (fields.continuum) fields.continuum.photonsPerPixel = (peakCounts / gain) * r.between(0.05, 0.2);
  if (fields.spuriousPeaks) for (const p of fields.spuriousPeaks) p.photons = envelope.plateauPhotons * r.between(0.3, 1);
  const driver = driverOf(r, nominalNm, tolerancePercent);
  const id = `${c.className}-${String(c.index).padStart(4, '0')}`;
  const scenario: SimScenario = {
    ...base,
    ...fields,
    id,
    class: c.className,
    decidable,
    description: `${description}; ${nominalNm} nm driver, ${g.grooveDensityPerMm} l/mm grazing incidence at ${g.incidenceAngleDeg.toFixed(2)}° (invented)`,
    geometry: g,
    profile: nominalProfile(c, g, `Simulated flat-field XUV spectrometer ${id}`),
    driver,
    parity,
    envelope,
    filters,
  };
  return {
    scenario,
    accept: (lines) => {
      const v = visibleFirstOrder(lines);
      if (v.length < minVisible || v.length > 45) return false;
      if (decidable && !resolvable(lines, lineFwhmPx, CLASSIC_RESOLVABLE_WIDTHS)) return false;
      return accept(lines);
    },
  };
}

/** A normal-incidence VUV scenario: low orders (3..9) of an 800 or 1030 nm driver over 100-400 nm. */
function normalIncidenceDraft(c: Context): Draft | null {
  const r = c.random;
  const nominalNm = r.pick([800, 1030]);
  const qTop = r.pick([7, 9]);
  const longNm = (nominalNm / 3) * 1.06;
  const shortNm = (nominalNm / qTop) * 0.94;
  if (shortNm < 80 || longNm > 400) return null;
  const grooveDensityPerMm = r.pick([300, 600, 1200]);
  const incidenceAngleDeg = r.between(5, 15);
  const bLong = betaDeg(incidenceAngleDeg, grooveDensityPerMm, longNm);
  const bShort = betaDeg(incidenceAngleDeg, grooveDensityPerMm, shortNm);
  if (!Number.isFinite(bLong) || !Number.isFinite(bShort)) return null;
  const widthMm = (c.spectralLength * 13.5) / 1000;
  // Distance such that the band fills 80-95 % of the detector's angular width.
  const spanRad = Math.abs(bShort - bLong) * DEG;
  const detectorDistanceMm = (widthMm / spanRad) * r.between(0.8, 0.95);
  if (detectorDistanceMm < 100 || detectorDistanceMm > 2000) return null;
  const g: GratingGeometry = {
    grooveDensityPerMm,
    incidenceAngleDeg,
    detectorDistanceMm,
    pixelPitchUm: 13.5,
    wavelengthIncreasesWithPixel: r.uniform() < 0.5,
    detectorCenterPixel: (c.spectralLength - 1) / 2,
    detectorAngleDeg: (bLong + bShort) / 2,
    detectorTiltDeg: r.between(-5, 5),
  };
  const base = commonFields(c, 3);
  const peakCounts = r.between(2000, 30000);
  const gain = base.gainCountsPerPhoton ?? 1;
  const envelope = { plateauPhotons: photonsForPeak(peakCounts, gain, base.lineFwhmPx, base.spatialFwhmPx), plateauStartHarmonic: 1, cutoffHarmonic: qTop + r.between(1, 6), rollOffOrders: r.between(1, 3), jitterRelative: r.between(0.05, 0.2) };
  const id = `${c.className}-${String(c.index).padStart(4, '0')}`;
  const scenario: SimScenario = {
    ...base,
    id,
    class: c.className,
    decidable: true,
    description: `low odd orders 3-${qTop} of a ${nominalNm} nm driver, ${grooveDensityPerMm} l/mm normal incidence at ${incidenceAngleDeg.toFixed(1)}° (invented)`,
    geometry: g,
    profile: nominalProfile(c, g, `Simulated normal-incidence VUV spectrometer ${id}`),
    driver: driverOf(r, nominalNm, safeTolerancePercent(r, 'odd', qTop)),
    parity: 'odd',
    envelope,
  };
  return { scenario, accept: (lines) => visibleFirstOrder(lines).length >= 3 && resolvable(lines, base.lineFwhmPx, CLASSIC_RESOLVABLE_WIDTHS) };
}

/**
 * One scenario of class `className`, a function of (`className`, `seed`, `index`, options) only.
 * Throws EngineError 'invalid_input' for an unknown class, or when no draw was accepted.
 */
export function generateScenario(className: ScenarioClass, seed: number, index = 0, options: GenerateScenariosOptions = {}): SimScenario {
  if (!(SCENARIO_CLASSES as readonly string[]).includes(className)) {
    throw new EngineError('invalid_input', `Unknown scenario class "${className}"; known: ${SCENARIO_CLASSES.join(', ')}.`);
  }
  const random = createRandom(mixSeed(seed, 7919 + index));
  const sizes = options.sizes ?? [[1024, 256], [2048, 512], [1024, 1024]];
  const draw = (): Draft | null => {
    const [spectralLength, spatialLength] = random.pick(sizes);
    const axisOption = options.spectralAxis ?? 'random';
    const spectralAxis = axisOption === 'random' ? (random.uniform() < 0.7 ? 'x' : 'y') : axisOption;
    const depthOption = options.bitDepth ?? 16;
    const bitDepth = depthOption === 'random' ? (random.uniform() < 0.2 ? 'float' : 16) : depthOption;
    const context: Context = { random, spectralLength, spatialLength, spectralAxis, bitDepth, index, className };
    return className === 'ni-vuv-low-orders' ? normalIncidenceDraft(context) : grazingDraft(context);
  };
  return firstAccepted(MAX_ATTEMPTS, draw, options.filterTransmission, `${className} scenario (seed ${seed}, index ${index})`);
}

/**
 * `count` scenarios from `seed`: scenario i has class classes[i mod n] and its own sub-seed, so
 * the list is reproducible and a prefix of a longer list with the same seed.
 */
export function generateScenarios(count: number, seed: number, options: GenerateScenariosOptions = {}): SimScenario[] {
  return scenarioList(count, options.classes ?? SCENARIO_CLASSES, (className, i) => generateScenario(className, seed, i, options), 'scenario');
}
