/**
 * The engine's shared data shapes. Every stage (frames → reduce → peaks → assign → dispersion →
 * apply) takes and returns these plain objects; nothing here depends on the DOM or on Node.
 *
 * Conventions: pixels are 0-based with centres at integers; the spectral axis is the one the
 * grating disperses along; angles are from the grating normal, m·λ = d·(sin α − sin β).
 */

/** A decoded camera frame: row-major, `data[row * width + col]`, always as Float32. */
export interface Frame {
  width: number;
  height: number;
  data: Float32Array;
  /** Bits per sample of the stored file (8, 16, 32; -32 for float), for saturation limits. */
  bitsPerSample: number;
  sampleFormat: 'uint' | 'int' | 'float';
  /** Largest value the stored type can hold (65535 for uint16); Infinity for float. */
  fullScale: number;
  /** The container the frame came from. */
  format: 'tiff' | 'bigtiff' | 'png' | 'fits';
  /** Number of pages (images) in the file and which one was decoded (0-based). */
  pageCount: number;
  page: number;
  /** Acquisition time from the file's tags (TIFF DateTime, FITS DATE-OBS), ISO 8601, when present. */
  takenAt?: string;
  /** Exposure in seconds from the file's tags when present (FITS EXPTIME). */
  exposureS?: number;
}

/** A band along the spatial axis, inclusive start, exclusive end, in pixels. */
export interface SpatialBand {
  start: number;
  end: number;
}

/** Line tilt and curvature: the spectral shift (pixels) of a line at spatial offset s from the band centre is tilt·s + curvature·s². */
export interface LineShape {
  tiltPxPerPx: number;
  curvaturePxPerPx2: number;
}

/** The summed spectrum of a frame along the spectral axis, with its variance. */
export interface Lineout {
  /** Background-subtracted counts per spectral pixel (sum over the signal band). */
  counts: Float64Array;
  /** Variance of `counts` per pixel (shot noise through the gain, read noise, background estimate). */
  variance: Float64Array;
  /** 1 where any summed pixel reached the saturation level. */
  saturated: Uint8Array;
  /**
   * The background-subtracted, tilt-corrected signal band, `band[s * spectralLength + p]`, for
   * spatial widths: row s sums band rows s·bandBinRows … (s + 1)·bandBinRows − 1.
   */
  band: Float32Array;
  bandRows: number;
  /** Band rows summed in each row of `band` (binned on tall bands to keep it small); 1 when absent. */
  bandBinRows?: number;
  signal: SpatialBand;
  background: SpatialBand[];
  lineShape: LineShape;
  /** Number of saturated, hot or cosmic pixels replaced, for reporting. */
  rejectedPixels: number;
  /** Per-pixel noise floor used for the variance (read noise, plus background shot noise when measured), counts rms. */
  noiseFloorCounts?: number;
}

/** A detected peak in a lineout. */
export interface Peak {
  /** Sub-pixel centre along the spectral axis, from a fitted line shape. */
  pixel: number;
  pixelSigma: number;
  /** Full width at half maximum, pixels. */
  fwhmPx: number;
  amplitude: number;
  area: number;
  areaSigma: number;
  snr: number;
  /** RMS width of the line across the signal band (spatial axis), pixels; NaN when not measurable. */
  spatialWidthPx: number;
  saturated: boolean;
}

/** The instrument's nominal geometry (PROFILE.json). All values nominal: a realignment moves them. */
export interface InstrumentProfile {
  name: string;
  spectralAxis: 'x' | 'y';
  grooveDensityPerMm: number;
  incidenceAngleDeg: number;
  detectorDistanceMm: number;
  pixelPitchUm: number;
  wavelengthIncreasesWithPixel: boolean;
  /** Pixel where the nominal diffraction angle `detectorAngleDeg` lands. */
  detectorCenterPixel?: number;
  detectorAngleDeg?: number;
  /**
   * Nominal tilt of the detector plane from perpendicular to the central ray, degrees. A
   * flat-field spectrometer's focal plane (and so its camera) sits well off it. Positive when the
   * long-wavelength end is farther from the grating. Absent: the assigner searches a band for the
   * instrument kind (assign/priors.ts) and says so in its notes.
   */
  detectorTiltDeg?: number;
  /** Spectral pixel count, when known. */
  pixelCount?: number;
  notes?: string;
}

export type Parity = 'odd' | 'all';

/** A fixed geometry of grating + flat detector; see `grating.ts`. */
export interface GratingGeometry {
  grooveDensityPerMm: number;
  incidenceAngleDeg: number;
  detectorDistanceMm: number;
  pixelPitchUm: number;
  wavelengthIncreasesWithPixel: boolean;
  detectorCenterPixel: number;
  /** Diffraction angle β that lands on `detectorCenterPixel`. */
  detectorAngleDeg: number;
  /** Tilt of the detector plane from perpendicular to the central ray, degrees (0 = perpendicular). */
  detectorTiltDeg: number;
}

/** One calibration point: a peak with its assigned orders. */
export interface CalibrationPoint {
  pixel: number;
  pixelSigma: number;
  harmonic: number;
  diffractionOrder: number;
  /** Wavelength this point stands for in first diffraction order terms: driverNm / harmonic. */
  wavelengthNm: number;
  residualNm: number;
  leaveOneOutResidualNm: number;
}

/** An absolute reference that fixed the wavelength scale of a calibration. */
export interface ScaleAnchor {
  kind: 'known-line' | 'filter-edge';
  /** Plain label, e.g. "Ar II 46.18 nm" or "Al L2,3 edge (Henke step)". */
  label: string;
  pixel: number;
  pixelSigma: number;
  /** Photon energy the anchor stands for (first diffraction order), eV. */
  energyEv: number;
  /** Its 1-sigma, eV (0 when the user gives it as exact). */
  energySigmaEv: number;
}

/**
 * A stored calibration: everything needed to map pixel → wavelength with uncertainty, as JSON.
 * `orderly apply` and the server read exactly this.
 */
export interface Calibration {
  format: 'orderly-calibration/1';
  model: 'polynomial' | 'grating';
  spectralAxis: 'x' | 'y';
  pixelCount: number;
  /** Polynomial map: λ(p) = Σ c_k T_k(u), Chebyshev T_k, u = (2p − (lo + hi)) / (hi − lo) on `domainPx` [lo, hi]. */
  polynomial?: {
    degree: number;
    domainPx: [number, number];
    coefficients: number[];
    covariance: number[][];
    /** How the degree was chosen, e.g. "AICc over degrees 1-4". */
    degreeCriterion: string;
  };
  /** Physical map: the geometry at the fitted values; `parameterNames` say which entries of the geometry the covariance covers (fitted ones, and held ones listed in `heldParameterNames`). */
  grating?: {
    geometry: GratingGeometry;
    parameterNames: string[];
    /**
     * Entries of `parameterNames` that were held, not fitted (too few lines): their prior spread
     * over the realignment range is in `covariance`, so the band includes it.
     */
    heldParameterNames?: string[];
    parameters: number[];
    covariance: number[][];
  };
  /** Effective driver wavelength the comb was fitted with, and its 1-sigma uncertainty. */
  driverNm: number;
  driverSigmaNm: number;
  parity: Parity;
  /**
   * 'anchored' when the order assigner fixed the absolute scale on the references in `anchors`
   * (known lines); otherwise the absolute scale is known only to the driver tolerance and
   * `scaleSigmaRelative` says how well. A pin fixes an order, not the scale.
   */
  absoluteScale: 'anchored' | 'driver-tolerance';
  /** What fixed the absolute scale, when something did (known lines, filter edges located on a continuum). */
  anchors?: ScaleAnchor[];
  /** Relative 1-sigma of the scale the driver tolerance alone would leave: with `scaleSigmaRelative`, what the anchors bought. */
  unanchoredScaleSigmaRelative?: number;
  /** Relative 1-sigma uncertainty of the whole scale, added in quadrature to the fit's own band. */
  scaleSigmaRelative: number;
  residualRmsNm: number;
  reducedChiSquare: number;
  points: CalibrationPoint[];
  filters: string[];
  signal?: SpatialBand;
  background?: SpatialBand[];
  lineShape?: LineShape;
  notes: string[];
}
