/** Inputs and results of the order assigner (see index.ts). */
import type { GratingGeometry, InstrumentProfile, Parity } from '../types.ts';

/** A filter foil: a material symbol ("Al", optionally "Al:200" for 200 nm) or an object. */
export type FilterSpec = string | { material: string; thicknessNm?: number };

/** How far a realignment may have moved the instrument from its profile. */
export interface RealignmentRanges {
  /** Half-range of the incidence angle, degrees. @default 0.5 */
  incidenceDeg: number;
  /** Half-range of the grating–detector distance, relative. @default 0.1 */
  distanceRelative: number;
  /** Half-range of the detector centre pixel, as a fraction of the pixel count. @default 0.06 */
  centerRelative: number;
  /** Half-range of the central diffraction angle when the profile states it, degrees (added to the centre's range: both shift the spectrum). @default 0.5 */
  detectorAngleDeg: number;
  /** Half-range of the detector tilt around the profile's stated tilt, degrees (without a stated tilt the band is set by priors.ts). @default 3 */
  tiltDeg: number;
}

export interface AssignInput {
  /** The instrument's nominal geometry; `detectorAngleDeg` may be absent (then it is searched). */
  profile: InstrumentProfile;
  pixelCount: number;
  /** Nominal driver wavelength, nm. */
  driverNm: number;
  /** 1σ of the measured driver wavelength, percent (the measurement's spread, symmetric). @default 0.5 */
  driverTolerancePct?: number;
  /** Largest ionisation blue shift of the effective driver below the measured one, percent. @default 1 */
  blueShiftPct?: number;
  parity: Parity;
  /** Filter foils in the beam. @default [] */
  filters?: FilterSpec[];
  /** User-fixed orders: "the peak at this pixel is harmonic q" (first diffraction order). @default [] */
  pins?: { pixel: number; harmonic: number }[];
  /**
   * Lines of known wavelength (first-order wavelength, nm) at a pixel: absolute anchors there (an
   * absorption edge located on a continuum is passed this way). The peak at that pixel is kept out
   * of the harmonic search unless its wavelength is λ0/q for an allowed q. A line without a pixel
   * is ignored. @default []
   */
  knownLines?: { wavelengthNm: number; pixel?: number; pixelSigma?: number; label?: string }[];
  /** Realignment ranges. @default see RealignmentRanges */
  ranges?: Partial<RealignmentRanges>;
  /** Transmission of the filter stack at a photon energy (overrides `filters`), for tests and callers with their own data. */
  transmission?: (energyEv: number) => number;
  /** Margin (in −2 ln L) the runner-up must trail by for `unique`. @default 16 */
  uniqueMargin?: number;
}

/** The label of one peak in one hypothesis. */
export interface PeakLabel {
  /** Harmonic order q, or null when the peak is not explained (spurious or unknown). */
  harmonic: number | null;
  /** Diffraction order m (1 or 2), or null. */
  diffractionOrder: number | null;
  /** Other (harmonic, m) that land on the same pixel (parity 'all': m = 2 of 2q on m = 1 of q). */
  blend?: { harmonic: number; diffractionOrder: number }[];
  /** Set when the peak is a known line. */
  knownLine?: string;
  residualPx: number;
}

export interface Hypothesis {
  /** Lowest harmonic labelled in first diffraction order. */
  firstHarmonic: number;
  /** Highest harmonic labelled in first diffraction order. */
  lastHarmonic: number;
  /** One label per input peak, same order as the peaks given. */
  labels: PeakLabel[];
  /** Harmonic per peak (null = unexplained), convenience copy of labels. */
  harmonics: (number | null)[];
  matchedPeaks: number;
  secondOrderPeaks: number;
  unexplainedPeaks: number;
  rmsResidualPx: number;
  chiSquarePosition: number;
  degreesOfFreedom: number;
  /** −2 ln L, position χ² scaled by the best hypothesis's reduced χ², plus penalties. */
  score: number;
  /** score − best score (0 for the best). */
  deltaScore: number;
  /** Effective driver wavelength of this hypothesis' fit, nm. */
  driverNm: number;
  /** Fitted geometry (nominal values for parameters that were held). */
  geometry: GratingGeometry;
  /** Names of the geometry/driver parameters that were fitted. */
  fittedParameters: string[];
  /** Score terms, for "why" displays. */
  terms: { position: number; prior: number; unexplained: number; secondOrder: number; missing: number; normalisation: number };
  /** Predicted first-order lines on the detector that are missing although the filters transmit. */
  missingHarmonics: number[];
}

/** One check the leading labelling must pass before it is called unique (verdict.ts). */
export interface VerdictGate {
  name: 'fit' | 'explained' | 'comb' | 'priors' | 'lines' | 'margin';
  passed: boolean;
  /** Plain words: what was measured, and (when failed) what to check. */
  detail: string;
}

export interface AssignResult {
  status: 'unique' | 'ambiguous' | 'failed';
  message: string;
  /** The gates of the verdict, in order (empty when the assignment failed before a labelling was found). */
  gates: VerdictGate[];
  /** Distinct hypotheses, best first (at most 8). */
  hypotheses: Hypothesis[];
  best: Hypothesis | null;
  /** True when a known line/edge fixed the absolute scale. */
  anchored: boolean;
  /** Driver wavelength the best hypothesis uses, and its 1σ. */
  driverNm: number;
  driverSigmaNm: number;
  /** Relative 1σ of the whole wavelength scale (see index.ts for how it is chosen). */
  scaleSigmaRelative: number;
  /**
   * 1σ spread of each geometry parameter under its prior (realignment range or stated band, as a
   * uniform distribution: width/√12), by geometry name; for fits that must hold a parameter the
   * data cannot determine and still state an honest band.
   */
  priorSigma: Partial<Record<'detectorCenterPixel' | 'detectorAngleDeg' | 'incidenceAngleDeg' | 'detectorDistanceMm' | 'detectorTiltDeg', number>>;
  /** Reduced χ² of the best fit (≥ 1 is used to scale the others). */
  reducedChiSquare: number;
  /** Assumptions and notes, in plain language. */
  notes: string[];
}
