/**
 * The simulator's data shapes: a scenario (everything that makes a frame, as plain JSON) and the
 * truth that comes back with each rendered frame. Pixels follow the engine's conventions
 * (0-based, centres at integers); "spectral" is the axis the grating disperses along.
 */
import type { Frame, GratingGeometry, InstrumentProfile, LineShape, Parity, SpatialBand } from '../types.ts';

/** A filter foil in the beam. */
export interface SimFilter {
  /** Element symbol as the reference tables know it, e.g. "Al", "Zr". */
  material: string;
  /** Foil thickness, nm. */
  thicknessNm: number;
}

/** The driving laser as the user states it and as it really was. */
export interface SimDriver {
  /** Wavelength the user gives, nm. */
  nominalNm: number;
  /** Tolerance the user gives on `nominalNm`, percent. */
  tolerancePercent: number;
  /**
   * The effective (blue-shifted) wavelength that really makes the harmonics, nm. The classic
   * scenarios (scenarios.ts) keep it in [nominalNm·(1 − tolerancePercent/100), nominalNm]; the
   * field scenarios (field-scenarios.ts) put it anywhere a real laser and plasma put it:
   * laserCentreNm · (1 − blueShiftRelative).
   */
  effectiveNm: number;
  /** The laser's true centre wavelength, nm (field scenarios: a symmetric spread about the nameplate). Absent in classic scenarios. */
  laserCentreNm?: number;
  /** Ionisation blue shift of the harmonics relative to laserCentreNm (0.01 = 1 %). Absent in classic scenarios. */
  blueShiftRelative?: number;
}

/** The harmonic envelope: photons per line before filters, as a function of harmonic order q. */
export interface SimEnvelope {
  /** Photons in one line (integrated over the line) on the plateau, before filters. */
  plateauPhotons: number;
  /** First harmonic of the plateau; lower orders fall off smoothly. @default 1 */
  plateauStartHarmonic?: number;
  /** Harmonic where the logistic cutoff halves the plateau. */
  cutoffHarmonic: number;
  /** Width of the logistic roll-off around the cutoff and below the plateau start, in orders. @default 3 */
  rollOffOrders?: number;
  /** Relative (log-normal sigma) per-order amplitude jitter, drawn per frame from the frame seed. @default 0.15 */
  jitterRelative?: number;
}

/** A smooth continuum under the comb (e.g. from a few-cycle driver); filter edges show on it. */
export interface SimContinuum {
  /** Photons per pixel at the spatial centre, before filters. */
  photonsPerPixel: number;
  /** Spatial FWHM of the continuum, px; absent = uniform over the whole frame (a flat field). */
  spatialFwhmPx?: number;
}

/** A spurious narrow peak that is no harmonic (stray light, a ghost, a fluorescence line). */
export interface SimSpuriousPeak {
  /** Spectral position, px. */
  pixel: number;
  /** Photons in the peak. */
  photons: number;
  /** Spectral FWHM, px. */
  fwhmPx: number;
  /** Spatial FWHM, px (an unrelated line need not share the harmonics' divergence). @default the scenario's spatialFwhmPx */
  spatialFwhmPx?: number;
  /** What the peak stands for, for reports (e.g. "stray light", "plasma line"). */
  origin?: string;
}

/** Everything needed to render a frame, as plain JSON; the seed of `simulateFrame` adds the noise. */
export interface SimScenario {
  /** Stable name, e.g. "gi-1200-800nm-odd-al-0007". */
  id: string;
  /** Class tag for the evaluation, e.g. "gi-odd-filter-edge", "undecidable-two-lines". */
  class: string;
  /** Whether the data can decide the order labelling (false for deliberately ambiguous cases). */
  decidable: boolean;
  /**
   * The input itself is wrong or holds no comb (a profile of another instrument, a frame without
   * harmonics): whatever the data, the right answer is `failed` or `ambiguous`. @default false
   */
  refusalExpected?: boolean;
  /** One line saying what the scenario is, for reports. */
  description: string;
  /** The TRUE geometry that renders the frame (includes detector tilt). */
  geometry: GratingGeometry;
  /** The NOMINAL profile the user would give (a realignment away from `geometry`); what the engine sees. */
  profile: InstrumentProfile;
  /** Frame width, px. */
  width: number;
  /** Frame height, px. */
  height: number;
  /** Which frame axis the grating disperses along ('x' = along a row). */
  spectralAxis: 'x' | 'y';
  driver: SimDriver;
  /** 'odd' for a single-colour gas driver; 'all' when even orders are generated too. */
  parity: Parity;
  /** Strength of even orders relative to the envelope when parity is 'all'. @default 1 */
  evenRelativeStrength?: number;
  envelope: SimEnvelope;
  /** Harmonics that are (nearly) absent: absorbed, phase-mismatched. @default [] */
  missingHarmonics?: number[];
  /** Strength left to a missing harmonic, relative. @default 0.01 */
  missingRelativeStrength?: number;
  /** Per-harmonic multipliers of the envelope (e.g. a modulation along a scan), keyed by q. @default {} */
  harmonicWeights?: Record<number, number>;
  /** Filter foils in the beam; transmissions multiply. @default [] */
  filters?: SimFilter[];
  /** Photons of the m = 2 line of a harmonic relative to its m = 1 line; 0 = none. @default 0.05 */
  secondOrderRelativeStrength?: number;
  /**
   * Photons of the m = 3 line of a harmonic relative to its m = 1 line (gratings often suppress
   * it far more than m = 2). @default secondOrderRelativeStrength² (orders m ≥ 4 keep that power law)
   */
  thirdOrderRelativeStrength?: number;
  /** Highest diffraction order rendered. @default 2 */
  maxDiffractionOrder?: number;
  /** Spectral FWHM of a harmonic line, px (Gaussian, pixel-integrated). @default 4 */
  lineFwhmPx: number;
  /** Spatial FWHM of harmonic `spatialReferenceHarmonic`, px. */
  spatialFwhmPx: number;
  /** Harmonic whose spatial FWHM is `spatialFwhmPx`. */
  spatialReferenceHarmonic: number;
  /** Divergence ∝ q^(−exponent): higher harmonics (and so m = 2 lines) are narrower. @default 0.5 */
  divergenceExponent?: number;
  /** Spatial centre of the beam, px along the spatial axis. */
  spatialCentrePx: number;
  /** Line tilt and curvature about the spatial centre. @default { tiltPxPerPx: 0, curvaturePxPerPx2: 0 } */
  lineShape?: LineShape;
  /** Constant offset added to every pixel, counts. @default 100 */
  pedestalCounts?: number;
  /** Optional smooth continuum under the comb. */
  continuum?: SimContinuum;
  /** Gaussian read noise, counts RMS. @default 3 */
  readNoiseCounts?: number;
  /** Camera gain, counts per detected photon (photon arrival is Poisson). @default 1 */
  gainCountsPerPhoton?: number;
  /** Fraction of pixels that are hot. @default 0 */
  hotPixelFraction?: number;
  /** Extra counts of a hot pixel. @default 5000 */
  hotPixelCounts?: number;
  /** Number of cosmic-ray tracks. @default 0 */
  cosmicRayCount?: number;
  /** Spurious narrow peaks inside the signal band. @default [] */
  spuriousPeaks?: SimSpuriousPeak[];
  /** Stored sample type: 16 = uint16 (rounded, clipped to 0..65535), 'float' = float32. @default 16 */
  bitDepth?: 16 | 'float';
  /** Saturation level, counts (values clip here). @default 65535 for 16 bit, Infinity for float */
  fullScaleCounts?: number;
  /** Lines with SNR in the summed lineout at or above this count as visible. @default 5 */
  visibleSnr?: number;
  /** Acquisition time to stamp on the frame, ISO 8601. */
  takenAt?: string;
  /** Exposure to stamp on the frame, s. */
  exposureS?: number;
}

/** One true line on the detector. */
export interface SimLine {
  harmonic: number;
  diffractionOrder: number;
  /** True spectral position at the spatial centre, px. */
  pixel: number;
  /** Photon wavelength effectiveNm / harmonic, nm (a m = 2 line lands where 2× this lands in m = 1). */
  wavelengthNm: number;
  /** diffractionOrder · wavelengthNm: the first-order wavelength at this pixel, nm. */
  firstOrderWavelengthNm: number;
  /** Photon energy, eV. */
  energyEv: number;
  /** Expected photons in the line on the whole detector (after filters, jitter, missing orders). */
  photons: number;
  /** Filter transmission applied to this line (product over filters). */
  filterTransmission: number;
  /** Spatial FWHM, px. */
  spatialFwhmPx: number;
  /** Expected SNR of the line's area in the lineout summed over `signal`. */
  snr: number;
  /** snr ≥ scenario.visibleSnr and the centre is on the detector. */
  visible: boolean;
}

/** What really is in a simulated frame. */
export interface SimTruth {
  /** Every harmonic line (m = 1 and higher) whose centre lies on the detector, sorted by pixel. */
  lines: SimLine[];
  /** The true first-order wavelength at every spectral pixel, nm (NaN where none). */
  wavelengthNmAtPixel: Float64Array;
  /** The effective driver wavelength used, nm. */
  effectiveDriverNm: number;
  /** The band along the spatial axis that holds the harmonic light (centre ± 1.5 FWHM of the widest line). */
  signal: SpatialBand;
  /** Spurious peaks rendered, as given. */
  spuriousPeaks: SimSpuriousPeak[];
  /** Frame indices of hot pixels. */
  hotPixelIndices: Uint32Array;
  /** Frame indices hit by cosmic rays. */
  cosmicPixelIndices: Uint32Array;
  /** Number of pixels clipped at full scale. */
  saturatedPixels: number;
  /** Number of visible lines (lines with visible = true). */
  visibleLineCount: number;
}

/** The result of `simulateFrame`. */
export interface SimResult {
  frame: Frame;
  truth: SimTruth;
}
