/**
 * Field scenarios: frames drawn from the ranges real instruments, lasers and labs have
 * (field-ranges.ts), not from the assigner's priors. Tilted flat-field focal planes (10-15°),
 * profiles a realignment away (distance ± 8 %, centre ± 100 px, a stated central angle off by up
 * to 0.3°), drivers off their nameplate either way and blue-shifted by up to 1 %, filters that
 * shape the envelope, stray and unrelated lines, m = 2 and m = 3 lines, missing orders, two-colour
 * combs, few-line frames, and frames whose right answer is "ambiguous" or a refusal (two lines,
 * a comb whose slips fit as well, a wrong profile, no comb at all). All invented.
 *
 * The truth travels with the scenario (true geometry, driver.effectiveNm, laserCentreNm,
 * blueShiftRelative) and with the rendered frame (simulateFrame's truth.lines: every line with
 * its harmonic, diffraction order, pixel and expected visibility). Each scenario is a function of
 * (class, seed, index) alone: drawn from its own stream, accepted on its expected lines
 * (expectedLines, no rendering) or redrawn from the same stream.
 */
import { firstAccepted, photonsForPeak, resolvable, scenarioList, visibleFirstOrder, type Draft } from './drafts.ts';
import { FILTER_EDGE_WINDOWS_EV } from './filter-windows.ts';
import { HC_EV_NM } from '../constants.ts';
import { EngineError } from '../errors.ts';
import type { GratingGeometry, InstrumentProfile, Parity } from '../types.ts';
import {
  betaDeg,
  centralWavelengthNm,
  detectorRangeEv,
  drawFieldDriver,
  drawGrazingGeometry,
  drawNominalProfile,
  FIELD_RANGES,
  maxHarmonicEnergyEv,
} from './field-ranges.ts';
import { filterStackTransmission, steepestEdgeEv, type FilterTransmissionFn } from './filters.ts';
import { createRandom, mixSeed, type Random } from './random.ts';
import type { SimFilter, SimLine, SimScenario, SimSpuriousPeak } from './types.ts';

/** The field classes: those meant to be answerable first, then those whose right answer is ambiguous or a refusal. */
export const FIELD_SCENARIO_CLASSES = [
  'field-ff-odd-clean',
  'field-ff-odd-filter',
  'field-ff-odd-higher-orders',
  'field-ff-odd-missing-stray',
  'field-ff-all-two-colour',
  'field-ff-odd-low-signal',
  'field-ff-few-lines',
  'field-gi-tilted-camera',
  'field-ni-vuv-low-orders',
  'field-two-lines',
  'field-slip-comb',
  'field-wrong-profile',
  'field-no-comb',
] as const;

export type FieldScenarioClass = (typeof FIELD_SCENARIO_CLASSES)[number];

/** Options of `generateFieldScenarios`. */
export interface GenerateFieldScenariosOptions {
  /** Classes to draw, in turn (scenario i has class classes[i mod n]). @default FIELD_SCENARIO_CLASSES */
  classes?: readonly FieldScenarioClass[];
  /** Spectral axis of the frames; 'random' draws x (70 %) or y. @default 'random' */
  spectralAxis?: 'x' | 'y' | 'random';
  /** Filter transmission source for the acceptance test. @default the simulator's table */
  filterTransmission?: FilterTransmissionFn;
}

const FILTER_MATERIALS = Object.keys(FILTER_EDGE_WINDOWS_EV);

const MAX_ATTEMPTS = 600;
/** Adjacent visible first-order lines of a decidable field class lie at least this many line widths apart. */
const FIELD_RESOLVABLE_WIDTHS = 3;
/** Stream label of the field scenarios (the classic generator uses 7919 + index). */
const FIELD_STREAM = 104_729;

interface Context {
  random: Random;
  spectralLength: number;
  spatialLength: number;
  spectralAxis: 'x' | 'y';
  index: number;
  className: FieldScenarioClass;
  filterTransmission?: FilterTransmissionFn;
}

/** Camera, noise and line-shape fields every class shares; classes override. */
function commonFields(c: Context, spatialReferenceHarmonic: number): Omit<SimScenario, 'id' | 'class' | 'decidable' | 'description' | 'geometry' | 'profile' | 'driver' | 'parity' | 'envelope'> {
  const r = c.random;
  return {
    width: c.spectralAxis === 'x' ? c.spectralLength : c.spatialLength,
    height: c.spectralAxis === 'x' ? c.spatialLength : c.spectralLength,
    spectralAxis: c.spectralAxis,
    lineFwhmPx: r.between(2, 6),
    spatialFwhmPx: Math.max(6, c.spatialLength * r.between(0.06, 0.16)),
    spatialReferenceHarmonic,
    divergenceExponent: r.between(0.5, 1),
    spatialCentrePx: c.spatialLength * r.between(0.35, 0.65),
    lineShape: { tiltPxPerPx: r.between(-0.01, 0.01), curvaturePxPerPx2: r.between(-1e-5, 1e-5) },
    pedestalCounts: r.between(50, 600),
    readNoiseCounts: r.between(2, 10),
    gainCountsPerPhoton: r.between(0.5, 3),
    secondOrderRelativeStrength: r.between(0.01, 0.1),
    thirdOrderRelativeStrength: r.between(0.002, 0.02),
    maxDiffractionOrder: 3,
    hotPixelFraction: r.uniform() < 0.5 ? 0 : 1e-5,
    cosmicRayCount: r.integer(0, 4),
    bitDepth: r.uniform() < 0.15 ? 'float' : 16,
    takenAt: new Date(Date.UTC(2026, 5, 1) + c.index * 60_000).toISOString(),
    exposureS: r.pick([0.05, 0.1, 0.5, 1, 2]),
  };
}

/** A filter a lab would put in front of this comb: one that transmits over much of the detector's range. */
function blockingFilter(c: Context, loEv: number, hiEv: number): SimFilter[] {
  const r = c.random;
  const thicknessNm = r.pick([100, 150, 200, 300]);
  const usable = FILTER_MATERIALS.filter((material) => {
    let passing = 0;
    for (let k = 0; k <= 10; k += 1) {
      const e = loEv + ((hiEv - loEv) * k) / 10;
      if (filterStackTransmission([{ material, thicknessNm }], e, c.filterTransmission) > 0.05) passing += 1;
    }
    return passing >= 6;
  });
  return usable.length ? [{ material: r.pick(usable), thicknessNm }] : [];
}

/** Stray and unrelated lines: narrow ghosts and broad plasma/fluorescence lines, anywhere on the detector. */
function strayLines(c: Context, count: number, lineFwhmPx: number, spatialFwhmPx: number, photons: number): SimSpuriousPeak[] {
  const r = c.random;
  return Array.from({ length: count }, () => {
    const plasma = r.uniform() < 0.5;
    return {
      pixel: r.between(0.04, 0.96) * (c.spectralLength - 1),
      photons: photons * r.between(0.15, 1),
      fwhmPx: lineFwhmPx * (plasma ? r.between(0.8, 1.5) : r.between(0.4, 0.8)),
      spatialFwhmPx: spatialFwhmPx * (plasma ? r.between(1, 2.5) : r.between(0.3, 1)),
      origin: plasma ? 'unrelated line (plasma or fluorescence)' : 'stray light / ghost',
    };
  });
}

/**
 * A profile of the wrong configuration, off the truth by more than any realignment: the turret's
 * other grating, a distance off by 20-50 %, or an incidence off by 2-3°.
 */
function wrongProfile(r: Random, p: InstrumentProfile, g: GratingGeometry): { profile: InstrumentProfile; why: string } {
  const kind = r.integer(0, 2);
  if (kind === 0) {
    const density = g.grooveDensityPerMm * r.pick([0.5, 2]);
    return { profile: { ...p, grooveDensityPerMm: density }, why: `profile of the other grating (${density} l/mm)` };
  }
  if (kind === 1) {
    const factor = r.uniform() < 0.5 ? r.between(0.5, 0.8) : r.between(1.25, 1.5);
    return { profile: { ...p, detectorDistanceMm: g.detectorDistanceMm * factor }, why: `profile distance ×${factor.toFixed(2)} the true one` };
  }
  const off = (r.uniform() < 0.5 ? -1 : 1) * r.between(2, 3);
  return { profile: { ...p, incidenceAngleDeg: g.incidenceAngleDeg + off }, why: `profile incidence off the true one by ${off.toFixed(2)}°` };
}

/** The field classes on a grazing-incidence instrument. */
function grazingDraft(c: Context): Draft | null {
  const r = c.random;
  const k = c.className;
  const nominalNm = r.pick(FIELD_RANGES.driver.nominalsNm);
  const driver = drawFieldDriver(r, nominalNm);
  const photonEv = HC_EV_NM / driver.effectiveNm;
  const topEv = maxHarmonicEnergyEv(nominalNm);
  const family = k === 'field-gi-tilted-camera' ? 'camera' : 'flat-field';
  const [minEv] = FIELD_RANGES.grazing.energyEv;
  const centreEv = r.between(Math.max(minEv, 7 * photonEv), topEv * 0.85);
  const g = drawGrazingGeometry(r, family, c.spectralLength, HC_EV_NM / centreEv);
  if (!g) return null;
  const [loEv, hiEv] = detectorRangeEv(g, c.spectralLength);
  if (!Number.isFinite(loEv) || loEv < minEv || hiEv > topEv * 1.15) return null;
  const qLo = Math.ceil(loEv / photonEv);
  const qHi = Math.floor(hiEv / photonEv);
  if (qHi - qLo < 2) return null;

  const parity: Parity = k === 'field-ff-all-two-colour' || (k === 'field-slip-comb' && r.uniform() < 0.3) ? 'all' : 'odd';
  const base = commonFields(c, qLo);
  const fields: Partial<SimScenario> = {};
  const span = qHi - qLo;
  let peakCounts = r.between(1500, 30000);
  let envelope: SimScenario['envelope'] = {
    plateauPhotons: 0,
    plateauStartHarmonic: qLo - r.between(0, 0.4) * span,
    cutoffHarmonic: qLo + r.between(0.6, 1.5) * span,
    rollOffOrders: Math.max(1, r.between(0.05, 0.15) * span),
    jitterRelative: r.between(0.05, 0.3),
  };
  let filters: SimFilter[] = r.uniform() < 0.5 ? blockingFilter(c, loEv, hiEv) : [];
  let decidable = true;
  let refusalExpected = false;
  let minVisible = 5;
  let maxVisible = 60;
  let needResolvable = true;
  let accept: (lines: SimLine[]) => boolean = () => true;
  let description = '';
  let profileNote = '';
  let strayCount = 0;

  switch (k) {
    case 'field-ff-odd-clean':
      description = 'odd comb on a tilted flat field';
      break;
    case 'field-ff-odd-filter': {
      const material = r.pick(FILTER_MATERIALS);
      filters = [{ material, thicknessNm: r.pick([100, 150, 200, 300, 400]) }];
      const [lo, hi] = FILTER_EDGE_WINDOWS_EV[material];
      const edgeEv = steepestEdgeEv(filters, Math.max(lo, loEv), Math.min(hi, hiEv), c.filterTransmission);
      if (!Number.isFinite(edgeEv)) return null;
      minVisible = 4;
      description = `odd comb shaped by a ${filters[0].thicknessNm} nm ${material} filter, its edge near ${edgeEv.toFixed(0)} eV on the detector`;
      break;
    }
    case 'field-ff-odd-higher-orders':
      fields.secondOrderRelativeStrength = r.between(0.15, 0.45);
      fields.thirdOrderRelativeStrength = r.between(0.02, 0.08);
      description = 'odd comb with strong m = 2 lines and m = 3 contributions';
      accept = (lines) => unblendedSecondOrder(lines, base.lineFwhmPx).length >= 1;
      break;
    case 'field-ff-odd-missing-stray': {
      const inside: number[] = [];
      for (let q = qLo + 2; q <= qHi - 2; q += 1) if (q % 2 === 1) inside.push(q);
      if (inside.length < 4) return null;
      const missing = new Set<number>([r.pick(inside)]);
      if (r.uniform() < 0.5) missing.add(r.pick(inside));
      fields.missingHarmonics = [...missing];
      fields.missingRelativeStrength = r.between(0, 0.003);
      strayCount = r.integer(2, 4);
      fields.hotPixelFraction = r.between(5e-5, 3e-4);
      fields.cosmicRayCount = r.integer(5, 30);
      minVisible = 6;
      description = `odd comb with missing order(s) ${[...missing].join(', ')}, ${strayCount} stray/unrelated lines, hot pixels and cosmic rays`;
      accept = (lines) => !lines.some((l) => l.visible && l.diffractionOrder === 1 && missing.has(l.harmonic));
      break;
    }
    case 'field-ff-all-two-colour':
      fields.evenRelativeStrength = r.between(0.05, 0.5);
      description = 'two-colour comb: all orders, even ones weaker';
      break;
    case 'field-ff-odd-low-signal':
      peakCounts = r.between(30, 150);
      fields.readNoiseCounts = r.between(5, 12);
      minVisible = 4;
      description = 'odd comb at low signal';
      break;
    case 'field-ff-few-lines': {
      const count = r.integer(3, 4);
      const q0 = (Math.floor(r.between(qLo, Math.max(qLo, qHi - 2 * (count - 1)))) | 1);
      envelope = { ...envelope, plateauStartHarmonic: q0 - 0.6, cutoffHarmonic: q0 + 2 * (count - 1) + 0.6, rollOffOrders: 0.15, jitterRelative: r.between(0, 0.1) };
      fields.secondOrderRelativeStrength = r.between(0, 0.03);
      fields.thirdOrderRelativeStrength = 0;
      minVisible = 3;
      maxVisible = 4;
      description = `only ${count} lines (odd orders from ${q0})`;
      break;
    }
    case 'field-gi-tilted-camera':
      description = `odd comb on a plain camera tilted ${g.detectorTiltDeg.toFixed(1)}°`;
      break;
    case 'field-two-lines': {
      const q0 = Math.floor(r.between(qLo, Math.max(qLo, qHi - 2))) | 1;
      envelope = { ...envelope, plateauStartHarmonic: q0 - 1, cutoffHarmonic: q0 + 3, rollOffOrders: 0.12, jitterRelative: 0 };
      fields.secondOrderRelativeStrength = 0;
      fields.thirdOrderRelativeStrength = 0;
      peakCounts = r.between(500, 5000);
      decidable = false;
      minVisible = 2;
      maxVisible = 2;
      needResolvable = false;
      description = 'only two lines visible and no anchor';
      accept = (lines) => lines.filter((l) => l.visible).length === 2 && lines.filter((l) => l.snr > 1).length === 2;
      break;
    }
    case 'field-slip-comb': {
      const step = parity === 'odd' ? 2 : 1;
      const count = r.integer(3, 5);
      const drawn = Math.floor(r.between(qLo, Math.max(qLo, qHi - step * (count - 1))));
      const q0 = parity === 'odd' ? drawn | 1 : drawn;
      if (q0 < 35) return null;
      envelope = { ...envelope, plateauStartHarmonic: q0 - 0.5, cutoffHarmonic: q0 + step * (count - 1) + 0.5, rollOffOrders: 0.1, jitterRelative: 0 };
      fields.secondOrderRelativeStrength = 0;
      fields.thirdOrderRelativeStrength = 0;
      decidable = false;
      minVisible = 3;
      maxVisible = 5;
      description = `${count} consecutive high orders from ${q0}${parity === 'all' ? ' of an all-order comb' : ''}: a slip of the labelling fits as well`;
      accept = (lines) => lines.filter((l) => l.snr > 1).length === visibleFirstOrder(lines).length;
      break;
    }
    case 'field-wrong-profile':
      decidable = false;
      refusalExpected = true;
      description = 'clean odd comb, but the profile describes another configuration';
      break;
    case 'field-no-comb':
      decidable = false;
      refusalExpected = true;
      strayCount = r.integer(2, 5);
      minVisible = 0;
      maxVisible = 0;
      needResolvable = false;
      description = `no harmonic comb: ${strayCount} unrelated lines only`;
      break;
    default:
      return null;
  }

  const gain = fields.gainCountsPerPhoton ?? base.gainCountsPerPhoton ?? 1;
  const plateauPhotons = photonsForPeak(peakCounts, gain, base.lineFwhmPx, base.spatialFwhmPx);
  envelope.plateauPhotons = k === 'field-no-comb' ? 0 : plateauPhotons;
  if (strayCount > 0) fields.spuriousPeaks = strayLines(c, strayCount, base.lineFwhmPx, base.spatialFwhmPx, plateauPhotons);
  const id = `${k}-${String(c.index).padStart(4, '0')}`;
  const truthProfile = drawNominalProfile(r, g, c.spectralAxis, c.spectralLength, `Simulated flat-field XUV spectrometer ${id}`);
  let profile = truthProfile;
  if (k === 'field-wrong-profile') {
    const wrong = wrongProfile(r, truthProfile, g);
    profile = wrong.profile;
    profileNote = `; ${wrong.why}`;
  }
  const scenario: SimScenario = {
    ...base,
    ...fields,
    id,
    class: k,
    decidable,
    ...(refusalExpected ? { refusalExpected } : {}),
    description: `${description}${profileNote}; "${nominalNm} nm" driver really ${driver.effectiveNm.toFixed(1)} nm effective, ${g.grooveDensityPerMm} l/mm at ${g.incidenceAngleDeg.toFixed(2)}°, tilt ${g.detectorTiltDeg.toFixed(1)}° (invented)`,
    geometry: g,
    profile,
    driver,
    parity,
    envelope,
    filters,
  };
  return {
    scenario,
    accept: (lines) => {
      const v = visibleFirstOrder(lines);
      if (v.length < minVisible || v.length > maxVisible) return false;
      if (needResolvable && !resolvable(lines, base.lineFwhmPx, FIELD_RESOLVABLE_WIDTHS)) return false;
      return accept(lines);
    },
  };
}

/**
 * True m = 2 lines that position can tell apart: more than one line width from every m = 1 line
 * and from every other line at least as bright (m = 2 of 2k sits exactly on m = 1 of k).
 * `visibleOnly` keeps only lines of expected SNR ≥ the scenario's visibility threshold.
 */
export function unblendedSecondOrder(lines: readonly SimLine[], lineFwhmPx: number, visibleOnly = true): SimLine[] {
  return lines.filter(
    (l) =>
      l.diffractionOrder === 2 &&
      (!visibleOnly || l.visible) &&
      lines.every((o) => o === l || Math.abs(o.pixel - l.pixel) > lineFwhmPx || (o.diffractionOrder !== 1 && o.photons < l.photons)),
  );
}

/** A normal-incidence VUV instrument: low odd orders (3-9) of an 800 or 1030 nm driver over 80-400 nm, small tilt. */
function normalIncidenceDraft(c: Context): Draft | null {
  const r = c.random;
  const N = FIELD_RANGES.normalIncidence;
  const nominalNm = r.pick([800, 800, 1030]);
  const driver = drawFieldDriver(r, nominalNm);
  const qTop = r.pick([7, 9]);
  const longNm = (driver.effectiveNm / 3) * 1.06;
  const shortNm = (driver.effectiveNm / qTop) * 0.94;
  if (shortNm < N.bandNm[0] || longNm > N.bandNm[1]) return null;
  const grooveDensityPerMm = r.pick(N.grooveDensitiesPerMm);
  const incidenceAngleDeg = r.between(N.incidenceDeg[0], N.incidenceDeg[1]);
  const bLong = betaDeg(incidenceAngleDeg, grooveDensityPerMm, longNm);
  const bShort = betaDeg(incidenceAngleDeg, grooveDensityPerMm, shortNm);
  if (!Number.isFinite(bLong) || !Number.isFinite(bShort)) return null;
  const pixelPitchUm = r.pick(FIELD_RANGES.camera.pixelPitchesUm);
  const widthMm = (c.spectralLength * pixelPitchUm) / 1000;
  const spanRad = (Math.abs(bShort - bLong) * Math.PI) / 180;
  const detectorDistanceMm = (widthMm / spanRad) * r.between(0.8, 0.95);
  if (detectorDistanceMm < N.distanceMm[0] || detectorDistanceMm > N.distanceMm[1]) return null;
  const beta0 = (bLong + bShort) / 2;
  const g: GratingGeometry = {
    grooveDensityPerMm,
    incidenceAngleDeg,
    detectorDistanceMm,
    pixelPitchUm,
    wavelengthIncreasesWithPixel: r.uniform() < 0.5,
    detectorCenterPixel: (c.spectralLength - 1) / 2 + r.between(-40, 40),
    detectorAngleDeg: beta0,
    detectorTiltDeg: (r.uniform() < 0.5 ? -1 : 1) * r.between(N.tiltDeg[0], N.tiltDeg[1]),
  };
  if (!(centralWavelengthNm(incidenceAngleDeg, grooveDensityPerMm, beta0) > 0)) return null;
  // The whole detector inside the instrument's band, not only the comb.
  const [loEv, hiEv] = detectorRangeEv(g, c.spectralLength);
  if (!(HC_EV_NM / hiEv >= N.bandNm[0] && HC_EV_NM / loEv <= N.bandNm[1])) return null;
  const base = commonFields(c, 3);
  const gain = base.gainCountsPerPhoton ?? 1;
  const envelope = {
    plateauPhotons: photonsForPeak(r.between(1500, 30000), gain, base.lineFwhmPx, base.spatialFwhmPx),
    plateauStartHarmonic: 1,
    cutoffHarmonic: qTop + r.between(1, 6),
    rollOffOrders: r.between(1, 3),
    jitterRelative: r.between(0.05, 0.25),
  };
  const id = `${c.className}-${String(c.index).padStart(4, '0')}`;
  const scenario: SimScenario = {
    ...base,
    id,
    class: c.className,
    decidable: true,
    description: `low odd orders 3-${qTop} of a "${nominalNm} nm" driver (really ${driver.effectiveNm.toFixed(1)} nm effective), ${grooveDensityPerMm} l/mm normal incidence at ${incidenceAngleDeg.toFixed(1)}° (invented)`,
    geometry: g,
    profile: drawNominalProfile(r, g, c.spectralAxis, c.spectralLength, `Simulated normal-incidence VUV spectrometer ${id}`),
    driver,
    parity: 'odd',
    envelope,
  };
  return { scenario, accept: (lines) => visibleFirstOrder(lines).length >= 3 && resolvable(lines, base.lineFwhmPx, FIELD_RESOLVABLE_WIDTHS) };
}

/**
 * One field scenario of class `className`, a function of (`className`, `seed`, `index`) only.
 * Throws EngineError 'invalid_input' for an unknown class, or when no draw was accepted.
 */
export function generateFieldScenario(className: FieldScenarioClass, seed: number, index = 0, options: GenerateFieldScenariosOptions = {}): SimScenario {
  if (!(FIELD_SCENARIO_CLASSES as readonly string[]).includes(className)) {
    throw new EngineError('invalid_input', `Unknown field scenario class "${className}"; known: ${FIELD_SCENARIO_CLASSES.join(', ')}.`);
  }
  const random = createRandom(mixSeed(seed, FIELD_STREAM + index));
  const cam = FIELD_RANGES.camera;
  const draw = (): Draft | null => {
    const spectralLength = random.pick(cam.spectralPixels);
    const spatialLength = random.pick(cam.spatialPixels);
    const axisOption = options.spectralAxis ?? 'random';
    const spectralAxis = axisOption === 'random' ? (random.uniform() < 0.7 ? 'x' : 'y') : axisOption;
    const context: Context = { random, spectralLength, spatialLength, spectralAxis, index, className, filterTransmission: options.filterTransmission };
    return className === 'field-ni-vuv-low-orders' ? normalIncidenceDraft(context) : grazingDraft(context);
  };
  return firstAccepted(MAX_ATTEMPTS, draw, options.filterTransmission, `${className} scenario (seed ${seed}, index ${index})`);
}

/** `count` field scenarios from `seed`: scenario i has class classes[i mod n]; a prefix of a longer list with the same seed. */
export function generateFieldScenarios(count: number, seed: number, options: GenerateFieldScenariosOptions = {}): SimScenario[] {
  return scenarioList(count, options.classes ?? FIELD_SCENARIO_CLASSES, (className, i) => generateFieldScenario(className, seed, i, options), 'field scenario');
}
