// The field scenario generator: ranges respected, a function of the seed, truth where the grating
// equation puts it, and the class conditions it claims.
import { describe, expect, it } from 'vitest';
import { HC_EV_NM } from '../../../shared/engine/constants.ts';
import { EngineError } from '../../../shared/engine/errors.ts';
import { wavelengthToPixel } from '../../../shared/engine/grating.ts';
import { expectedLines, FIELD_RANGES, FIELD_SCENARIO_CLASSES, generateFieldScenario, generateFieldScenarios, simulateFrame, steepestEdgeEv } from '../../../shared/engine/simulate/index.ts';
import type { SimScenario } from '../../../shared/engine/simulate/index.ts';

const DEG = Math.PI / 180;
const PER_CLASS = 4;
const list = generateFieldScenarios(FIELD_SCENARIO_CLASSES.length * PER_CLASS, 2026);
const grazing = list.filter((s) => !s.class.startsWith('field-ni-'));
const flatField = grazing.filter((s) => s.class !== 'field-gi-tilted-camera');
const spectralLength = (s: SimScenario): number => (s.spectralAxis === 'x' ? s.width : s.height);
const spatialLength = (s: SimScenario): number => (s.spectralAxis === 'x' ? s.height : s.width);
const firstOrderVisible = (s: SimScenario) => expectedLines(s).lines.filter((l) => l.visible && l.diffractionOrder === 1);

describe('generateFieldScenarios: the draw', () => {
  it('produces every class in turn, ids unique, all invented', () => {
    expect(list.map((s) => s.class)).toEqual(Array.from({ length: list.length }, (_, i) => FIELD_SCENARIO_CLASSES[i % FIELD_SCENARIO_CLASSES.length]));
    expect(new Set(list.map((s) => s.id)).size).toBe(list.length);
    for (const s of list) expect(s.description).toMatch(/invented/);
  });

  it('is a function of the seed; a longer list starts with the shorter one; another seed differs', () => {
    expect(JSON.stringify(generateFieldScenarios(list.length, 2026))).toBe(JSON.stringify(list));
    expect(JSON.stringify(generateFieldScenarios(list.length + 5, 2026).slice(0, list.length))).toBe(JSON.stringify(list));
    expect(JSON.stringify(generateFieldScenarios(list.length, 2027))).not.toBe(JSON.stringify(list));
    expect(JSON.stringify(generateFieldScenario('field-ff-odd-clean', 5, 3))).toBe(JSON.stringify(generateFieldScenario('field-ff-odd-clean', 5, 3)));
  });

  it('refuses an unknown class and a bad count with an EngineError', () => {
    expect(() => generateFieldScenario('field-nothing' as never, 1)).toThrow(EngineError);
    expect(() => generateFieldScenarios(-1, 1)).toThrow(/non-negative integer/);
  });
});

describe('generateFieldScenarios: ranges of real instruments (PRODUCT.md domain notes, from memory)', () => {
  it('grazing incidence: 300-2400 l/mm, 85-88°, 200-500 mm, 13-20 µm pixels, 1024-2048 spectral pixels, |tilt| ≤ 16°', () => {
    for (const s of grazing) {
      const g = s.geometry;
      expect(FIELD_RANGES.grazing.grooveDensitiesPerMm).toContain(g.grooveDensityPerMm);
      expect(g.incidenceAngleDeg).toBeGreaterThanOrEqual(85);
      expect(g.incidenceAngleDeg).toBeLessThanOrEqual(88);
      expect(g.detectorDistanceMm).toBeGreaterThanOrEqual(200);
      expect(g.detectorDistanceMm).toBeLessThanOrEqual(500);
      expect(g.pixelPitchUm).toBeGreaterThanOrEqual(13);
      expect(g.pixelPitchUm).toBeLessThanOrEqual(20);
      expect(spectralLength(s)).toBeGreaterThanOrEqual(1024);
      expect(spectralLength(s)).toBeLessThanOrEqual(2048);
      expect(Math.abs(g.detectorTiltDeg)).toBeLessThanOrEqual(16);
    }
  });

  it('flat fields: |tilt| 8-16° centred in 10-15°, roughly 90° − β0, long-wavelength end farther from the grating', () => {
    const tilts = flatField.map((s) => Math.abs(s.geometry.detectorTiltDeg));
    for (const s of flatField) {
      const g = s.geometry;
      expect(Math.abs(g.detectorTiltDeg)).toBeGreaterThanOrEqual(8);
      // A focal plane square to the grating surface: tilt sign follows the wavelength direction.
      expect(Math.sign(g.detectorTiltDeg)).toBe(g.wavelengthIncreasesWithPixel ? 1 : -1);
      expect(Math.abs(90 - g.detectorAngleDeg - Math.abs(g.detectorTiltDeg))).toBeLessThan(6);
    }
    const mean = tilts.reduce((a, b) => a + b, 0) / tilts.length;
    expect(mean).toBeGreaterThan(10);
    expect(mean).toBeLessThan(15);
  });

  it('normal incidence: 2-15° incidence, |tilt| ≤ 3°, the detector inside 80-400 nm', () => {
    const ni = list.filter((s) => s.class === 'field-ni-vuv-low-orders');
    expect(ni.length).toBe(PER_CLASS);
    for (const s of ni) {
      expect(s.geometry.incidenceAngleDeg).toBeGreaterThanOrEqual(2);
      expect(s.geometry.incidenceAngleDeg).toBeLessThanOrEqual(15);
      expect(Math.abs(s.geometry.detectorTiltDeg)).toBeLessThanOrEqual(3);
      const nm = Array.from(expectedLines(s).wavelengthNmAtPixel);
      expect(Math.min(...nm)).toBeGreaterThan(80);
      expect(Math.max(...nm)).toBeLessThan(400);
    }
  });

  it('the profile is a realignment away: incidence ± 0.5°, distance ± 8 %, centre ± 100 px; angle ± 0.3° and tilt ± 2° when stated, each sometimes absent', () => {
    const honest = list.filter((s) => s.class !== 'field-wrong-profile');
    for (const s of honest) {
      const p = s.profile;
      const g = s.geometry;
      expect(p.grooveDensityPerMm).toBe(g.grooveDensityPerMm);
      expect(Math.abs(p.incidenceAngleDeg - g.incidenceAngleDeg)).toBeLessThanOrEqual(0.5);
      expect(Math.abs(p.detectorDistanceMm / g.detectorDistanceMm - 1)).toBeLessThanOrEqual(0.08 + 1e-12);
      expect(Math.abs((p.detectorCenterPixel as number) - g.detectorCenterPixel)).toBeLessThanOrEqual(100);
      if (p.detectorAngleDeg !== undefined) expect(Math.abs(p.detectorAngleDeg - g.detectorAngleDeg)).toBeLessThanOrEqual(0.3);
      // Stated in the profile's convention (types.ts): positive when the long-wavelength end is farther from the grating.
      if (p.detectorTiltDeg !== undefined) expect(Math.abs(p.detectorTiltDeg - (g.wavelengthIncreasesWithPixel ? 1 : -1) * g.detectorTiltDeg)).toBeLessThanOrEqual(2);
      expect(p.pixelCount).toBe(spectralLength(s));
      expect(p.notes).toMatch(/Invented/);
    }
    expect(honest.some((s) => s.profile.detectorAngleDeg === undefined)).toBe(true);
    expect(honest.some((s) => s.profile.detectorAngleDeg !== undefined)).toBe(true);
    expect(honest.some((s) => s.profile.detectorTiltDeg === undefined)).toBe(true);
    expect(honest.some((s) => s.profile.detectorTiltDeg !== undefined)).toBe(true);
    // Realignments that matter: some angles off by more than 0.15°, some distances by more than 4 %.
    expect(honest.some((s) => s.profile.detectorAngleDeg !== undefined && Math.abs(s.profile.detectorAngleDeg - s.geometry.detectorAngleDeg) > 0.15)).toBe(true);
    expect(honest.some((s) => Math.abs(s.profile.detectorDistanceMm / s.geometry.detectorDistanceMm - 1) > 0.04)).toBe(true);
  });

  it('a wrong profile is outside every realignment range: the other grating, a distance off by ≥ 20 %, or an incidence off by ≥ 2°', () => {
    const wrong = generateFieldScenarios(24, 11, { classes: ['field-wrong-profile'] });
    for (const s of wrong) {
      const p = s.profile;
      const g = s.geometry;
      const otherGrating = p.grooveDensityPerMm !== g.grooveDensityPerMm;
      const distanceOff = Math.abs(p.detectorDistanceMm / g.detectorDistanceMm - 1) >= 0.2 - 1e-12;
      const incidenceOff = Math.abs(p.incidenceAngleDeg - g.incidenceAngleDeg) >= 2 - 1e-12;
      expect(otherGrating || distanceOff || incidenceOff, s.id).toBe(true);
      expect(s.refusalExpected).toBe(true);
      expect(s.decidable).toBe(false);
    }
  });

  it('the driver: real centre on both sides of the nameplate within 2.5 σ of the stated tolerance, blue-shifted by 0-1 %', () => {
    const drivers = generateFieldScenarios(80, 3, { classes: ['field-ff-odd-clean', 'field-ni-vuv-low-orders'] }).map((s) => s.driver);
    for (const d of drivers) {
      const centre = d.laserCentreNm as number;
      const shift = d.blueShiftRelative as number;
      expect(d.tolerancePercent).toBeGreaterThanOrEqual(0.3);
      expect(d.tolerancePercent).toBeLessThanOrEqual(1);
      expect(Math.abs(centre / d.nominalNm - 1)).toBeLessThanOrEqual((2.5 * d.tolerancePercent) / 100 + 1e-12);
      expect(shift).toBeGreaterThanOrEqual(0);
      expect(shift).toBeLessThanOrEqual(0.01);
      expect(d.effectiveNm).toBeCloseTo(centre * (1 - shift), 9);
    }
    // Outside the engine's old one-sided window [nominal·(1 − tol), nominal] both ways.
    expect(drivers.some((d) => d.effectiveNm > d.nominalNm)).toBe(true);
    expect(drivers.some((d) => d.effectiveNm < d.nominalNm * (1 - d.tolerancePercent / 100))).toBe(true);
  });
});

describe('generateFieldScenarios: truth', () => {
  it('every listed line sits where grating.ts puts λ0_eff/q in order m, and the grating equation written out here agrees', () => {
    for (const s of list.slice(0, FIELD_SCENARIO_CLASSES.length)) {
      const { lines } = expectedLines(s);
      const g = s.geometry;
      const d = 1e6 / g.grooveDensityPerMm;
      for (const line of lines) {
        expect(line.wavelengthNm).toBeCloseTo(s.driver.effectiveNm / line.harmonic, 9);
        expect(line.pixel).toBeCloseTo(wavelengthToPixel(g, line.wavelengthNm, line.diffractionOrder), 6);
        // m·λ = d·(sin α − sin β) with β from the flat-detector geometry (grating.ts header), by hand.
        const sMm = (line.pixel - g.detectorCenterPixel) * g.pixelPitchUm * 1e-3;
        const t = g.detectorTiltDeg * DEG;
        const beta = g.detectorAngleDeg * DEG + (g.wavelengthIncreasesWithPixel ? -1 : 1) * Math.atan2(sMm * Math.cos(t), g.detectorDistanceMm + sMm * Math.sin(t));
        expect(line.diffractionOrder * line.wavelengthNm).toBeCloseTo(d * (Math.sin(g.incidenceAngleDeg * DEG) - Math.sin(beta)), 6);
        expect(line.energyEv).toBeCloseTo(HC_EV_NM / line.wavelengthNm, 9);
      }
    }
  });

  it('the rendered frame carries the truth: effective driver, lines with harmonic, order, pixel and visibility, stray lines', () => {
    const stray = list.find((s) => s.class === 'field-ff-odd-missing-stray') as SimScenario;
    const { frame, truth } = simulateFrame(stray, 7);
    expect(frame.width * frame.height).toBe(frame.data.length);
    expect(truth.effectiveDriverNm).toBe(stray.driver.effectiveNm);
    expect(truth.spuriousPeaks.length).toBe(stray.spuriousPeaks?.length);
    expect(truth.spuriousPeaks.length).toBeGreaterThanOrEqual(2);
    for (const q of stray.missingHarmonics ?? []) expect(truth.lines.some((l) => l.harmonic === q && l.visible && l.diffractionOrder === 1)).toBe(false);
    for (const l of truth.lines) {
      expect(l.pixel).toBeGreaterThanOrEqual(0);
      expect(l.pixel).toBeLessThanOrEqual(spectralLength(stray) - 1);
      expect(typeof l.visible).toBe('boolean');
    }
    expect(spatialLength(stray)).toBeGreaterThanOrEqual(128);
  });
});

describe('generateFieldScenarios: what each class claims', () => {
  const byClass = (cls: string): SimScenario[] => list.filter((s) => s.class === cls);

  it('few-line frames show 3-4 first-order lines, two-line frames 2, no-comb frames none', () => {
    for (const s of byClass('field-ff-few-lines')) expect(firstOrderVisible(s).length).toBeGreaterThanOrEqual(3);
    for (const s of byClass('field-ff-few-lines')) expect(firstOrderVisible(s).length).toBeLessThanOrEqual(4);
    for (const s of byClass('field-two-lines')) expect(expectedLines(s).lines.filter((l) => l.visible).length).toBe(2);
    for (const s of byClass('field-no-comb')) {
      expect(expectedLines(s).lines.length).toBe(0);
      expect(s.spuriousPeaks?.length).toBeGreaterThanOrEqual(2);
      expect(s.refusalExpected).toBe(true);
    }
  });

  it('higher-order frames show m = 2 lines clear of the comb, and m = 3 lines where the comb reaches 3q', () => {
    const frames = byClass('field-ff-odd-higher-orders');
    for (const s of frames) {
      const { lines } = expectedLines(s);
      expect(lines.some((l) => l.diffractionOrder === 2 && l.visible)).toBe(true);
      expect(s.maxDiffractionOrder).toBe(3);
    }
    expect(frames.some((s) => expectedLines(s).lines.some((l) => l.diffractionOrder === 3 && l.visible))).toBe(true);
  });

  it('two-colour frames show even orders, weaker than the odd ones', () => {
    for (const s of byClass('field-ff-all-two-colour')) {
      expect(s.parity).toBe('all');
      expect(s.evenRelativeStrength).toBeLessThan(1);
      expect(firstOrderVisible(s).some((l) => l.harmonic % 2 === 0)).toBe(true);
    }
  });

  it('filter frames put a transmission edge of their foil on the detector', () => {
    for (const s of byClass('field-ff-odd-filter')) {
      const energies = Array.from(expectedLines(s).wavelengthNmAtPixel, (nm) => HC_EV_NM / nm);
      const edge = steepestEdgeEv(s.filters ?? [], Math.min(...energies), Math.max(...energies));
      expect(Number.isFinite(edge), s.id).toBe(true);
    }
  });

  it('slip-comb frames are 3-5 high orders (q ≥ 35)', () => {
    for (const s of byClass('field-slip-comb')) {
      const v = firstOrderVisible(s);
      expect(v.length).toBeGreaterThanOrEqual(3);
      expect(v.length).toBeLessThanOrEqual(5);
      expect(Math.min(...v.map((l) => l.harmonic))).toBeGreaterThanOrEqual(35);
    }
  });
});
