/**
 * Apply a calibration to a lineout: wavelength and photon-energy axes with their 1-σ bands,
 * counts per pixel and per eV (through the Jacobian |dE/dp|), and the harmonic orders labelled
 * with their yields. Output uses plain number arrays because it is serialised as JSON.
 */
import { HC_EV_NM } from './constants.ts';
import { calibrationWavelengthToPixel, evaluateCalibrationAxes } from './dispersion/evaluate.ts';
import { EngineError } from './errors.ts';
import { isTabulatedEnergy, stackTransmission } from './filters/transmission.ts';
import { parseFilterSpec } from './references.ts';
import type { Calibration, Lineout, Peak } from './types.ts';

export interface ApplyOptions {
  /** Divide intensities and yields by the transmission of `cal.filters`. @default false */
  filterCorrection?: boolean;
  /** Transmission below which the correction is clipped (divided by this value instead). @default 1e-3 */
  minTransmission?: number;
  /** Highest diffraction order whose images are predicted and labelled. @default 2 */
  maxDiffractionOrder?: number;
  /** A peak takes a label when within this many σ of the prediction… @default 3 */
  toleranceSigma?: number;
  /** …but never farther than this fraction of the local harmonic spacing. @default 0.3 */
  maxSpacingFraction?: number;
  /**
   * Parity of the comb in this frame, when it differs from the calibration's: a two-colour frame
   * ('all') calibrated with a single-colour version ('odd') still has its even orders labelled.
   * @default the calibration's parity
   */
  parity?: 'odd' | 'all';
}

export interface AppliedOrder {
  harmonic: number;
  diffractionOrder: number;
  /** The detected peak's pixel when labelled, else the predicted pixel. */
  pixel: number;
  predictedPixel: number;
  /** True photon wavelength driverNm / harmonic. */
  wavelengthNm: number;
  energyEv: number;
  /** Peak area (counts) when detected, else the counts summed over the predicted line window; filter-corrected when asked. */
  yield: number;
  yieldSigma: number;
  detected: boolean;
  /** Index into the `peaks` argument, or null. */
  peakIndex: number | null;
  /** Filter transmission at this order's photon energy when the correction was applied. */
  filterTransmission?: number;
  /**
   * Higher diffraction orders of other harmonics that land on exactly this pixel (m·λ is the same):
   * m = 3 of harmonic 3q on m = 1 of q, and for parity 'all' m = 2 of 2q. Their light is in this
   * order's yield; position cannot separate it. Listed unless the filters block that harmonic or
   * its own first-order line should be on the detector and is not seen.
   */
  sharedWith?: { harmonic: number; diffractionOrder: number }[];
}

export interface AppliedSpectrum {
  pixel: number[];
  /** First-order wavelength at each pixel. */
  wavelengthNm: number[];
  wavelengthSigmaNm: number[];
  /** hc / wavelengthNm. */
  energyEv: number[];
  /** Counts per pixel (filter-corrected when asked). */
  intensity: number[];
  intensitySigma: number[];
  /** Counts per eV: intensity / |dE/dp|. */
  intensityPerEv: number[];
  intensityPerEvSigma: number[];
  /** Product transmission of the filters at each pixel's first-order energy, when corrected. */
  filterTransmission?: number[];
  orders: AppliedOrder[];
  /** Photon energy of the highest-energy first-order harmonic detected, eV. */
  cutoffEv?: number;
  notes: string[];
}

interface Prediction {
  harmonic: number;
  diffractionOrder: number;
  pixel: number;
  sigmaPx: number;
  spacingPx: number;
}

function resolveOptions(options: ApplyOptions | undefined) {
  const o = {
    filterCorrection: options?.filterCorrection ?? false,
    minTransmission: options?.minTransmission ?? 1e-3,
    maxDiffractionOrder: options?.maxDiffractionOrder ?? 2,
    toleranceSigma: options?.toleranceSigma ?? 3,
    maxSpacingFraction: options?.maxSpacingFraction ?? 0.3,
    parity: options?.parity,
  };
  if (o.parity !== undefined && o.parity !== 'odd' && o.parity !== 'all') throw new EngineError('invalid_input', `parity must be 'odd' or 'all', got ${String(o.parity)}.`);
  if (!(o.minTransmission > 0 && o.minTransmission < 1)) throw new EngineError('invalid_input', `minTransmission must lie in (0, 1), got ${o.minTransmission}.`);
  if (!(Number.isInteger(o.maxDiffractionOrder) && o.maxDiffractionOrder >= 1)) throw new EngineError('invalid_input', `maxDiffractionOrder must be a whole number ≥ 1, got ${o.maxDiffractionOrder}.`);
  if (!(o.toleranceSigma > 0) || !(o.maxSpacingFraction > 0 && o.maxSpacingFraction <= 0.5)) throw new EngineError('invalid_input', 'toleranceSigma must be > 0 and maxSpacingFraction in (0, 0.5].');
  return o;
}

/**
 * A plain array copy of a typed array, for JSON. A counted loop: `Array.from` on a typed array
 * goes through the generic iterator protocol and cost most of this stage's time.
 */
function toArray(values: Float64Array): number[] {
  const out = new Array<number>(values.length);
  for (let i = 0; i < values.length; i++) out[i] = values[i];
  return out;
}

/** Linear interpolation of a per-pixel array at a fractional pixel (clamped to the ends). */
function at(values: Float64Array, pixel: number): number {
  const n = values.length;
  const p = Math.min(n - 1, Math.max(0, pixel));
  const i = Math.min(n - 2, Math.floor(p));
  const f = p - i;
  return n === 1 ? values[0] : values[i] * (1 - f) + values[i + 1] * f;
}

function predictOrders(cal: Calibration, parity: 'odd' | 'all', lambdaMin: number, lambdaMax: number, sigmaNm: Float64Array, slope: Float64Array, maxOrder: number, pixelCount: number): Prediction[] {
  const step = parity === 'odd' ? 2 : 1;
  const out: Prediction[] = [];
  for (let m = 1; m <= maxOrder; m++) {
    // q such that m·driver/q lies in the detector's first-order range.
    let q = Math.max(1, Math.ceil((m * cal.driverNm) / lambdaMax));
    const qMax = Math.floor((m * cal.driverNm) / lambdaMin);
    if (step === 2 && q % 2 === 0) q += 1;
    for (; q <= qMax; q += step) {
      const pixel = calibrationWavelengthToPixel(cal, cal.driverNm / q, m);
      if (!(pixel >= 0 && pixel <= pixelCount - 1)) continue;
      const dispersion = Math.abs(at(slope, pixel));
      const sigmaPx = at(sigmaNm, pixel) / dispersion;
      // Distance to the neighbouring comb line of the same order, in first-order wavelength.
      const spacingPx = (m * cal.driverNm * step) / (q * (q + step)) / dispersion;
      out.push({ harmonic: q, diffractionOrder: m, pixel, sigmaPx, spacingPx });
    }
  }
  return out;
}

/** Greedy one-to-one matching of predictions and peaks, nearest (in tolerances) first; first order wins ties. */
function matchPeaks(predictions: Prediction[], peaks: readonly Peak[], toleranceSigma: number, maxSpacingFraction: number): Map<number, number> {
  const pairs: Array<{ pred: number; peak: number; score: number }> = [];
  predictions.forEach((pr, a) => {
    peaks.forEach((pk, b) => {
      const sigma = Math.hypot(pr.sigmaPx, pk.pixelSigma);
      const tolerance = Math.min(maxSpacingFraction * pr.spacingPx, Math.max(toleranceSigma * sigma, 0.5));
      const distance = Math.abs(pk.pixel - pr.pixel);
      if (distance <= tolerance) pairs.push({ pred: a, peak: b, score: distance / tolerance + 0.01 * (pr.diffractionOrder - 1) });
    });
  });
  pairs.sort((x, y) => x.score - y.score);
  const byPrediction = new Map<number, number>();
  const usedPeaks = new Set<number>();
  for (const pair of pairs) {
    if (byPrediction.has(pair.pred) || usedPeaks.has(pair.peak)) continue;
    byPrediction.set(pair.pred, pair.peak);
    usedPeaks.add(pair.peak);
  }
  return byPrediction;
}

/** Fewest first-order lines that must match before images of higher orders are labelled. */
const MIN_FIRST_ORDER_FOR_HIGHER = 3;

/**
 * Removes higher-order labels the first-order comb does not support (common practice for a
 * grating used in its design order: higher-order images are weaker than the first-order lines).
 * An m ≥ 2 label needs at least three matched first-order lines — without them the calibration
 * does not fit this frame (a moved camera, another setup) and a peak that happens to sit on a
 * predicted m = 2 position says nothing — and it must not be brighter than the brightest
 * matched first-order line. Mutates `matches`; returns a note when labels were withheld.
 */
function dropImplausibleHigherOrders(predictions: Prediction[], matches: Map<number, number>, peaks: readonly Peak[]): { reason?: string } {
  let firstOrder = 0;
  let brightestFirst = 0;
  for (const [a, b] of matches) {
    if (predictions[a].diffractionOrder !== 1) continue;
    firstOrder++;
    brightestFirst = Math.max(brightestFirst, peaks[b].area);
  }
  let withheld = 0;
  for (const [a, b] of [...matches]) {
    if (predictions[a].diffractionOrder === 1) continue;
    if (firstOrder < MIN_FIRST_ORDER_FOR_HIGHER || peaks[b].area > brightestFirst) {
      matches.delete(a);
      withheld++;
    }
  }
  if (withheld === 0) return {};
  return firstOrder < MIN_FIRST_ORDER_FOR_HIGHER
    ? { reason: `Only ${firstOrder} first-order line(s) sit where this calibration predicts them, so ${withheld} peak(s) on predicted higher-order positions are left unlabelled: the calibration may not fit this frame (check the drift).` }
    : { reason: `${withheld} peak(s) on predicted higher-order positions are brighter than every first-order line and are left unlabelled.` };
}

/** Product transmission of the filters at one photon energy (filters/transmission.ts: end values held outside the tables); NaN for no energy. */
function transmissionAt(filters: Array<{ material: string; thicknessNm: number }>, energyEv: number): number {
  return stackTransmission(filters, energyEv);
}

/**
 * Calibrated spectrum of `lineout` under `cal`, with the detected `peaks` labelled by harmonic
 * and diffraction order. Never mutates its inputs.
 */
/**
 * Yields that hold light of other harmonics in higher diffraction orders at the same pixel (see
 * AppliedOrder.sharedWith). Grating equation: m·λ equal ⇒ same angle (common practice).
 */
function markSharedPixels(orders: AppliedOrder[], parity: 'odd' | 'all', driverNm: number, filters: ReturnType<typeof parseFilterSpec>[], notes: string[]): void {
  const firstOrder = new Map<number, AppliedOrder>();
  for (const x of orders) if (x.diffractionOrder === 1) firstOrder.set(x.harmonic, x);
  const marked: string[] = [];
  for (const x of orders) {
    if (x.diffractionOrder !== 1) continue;
    const shared: { harmonic: number; diffractionOrder: number }[] = [];
    for (const m of parity === 'all' ? [2, 3] : [3]) {
      const q = m * x.harmonic;
      // Its own first-order line on the detector and not seen: that harmonic is not there.
      const own = firstOrder.get(q);
      if (own && !own.detected) continue;
      if (filters.length > 0) {
        const t = transmissionAt(filters, (q * HC_EV_NM) / driverNm);
        if (Number.isFinite(t) && t < 1e-3) continue;
      }
      shared.push({ harmonic: q, diffractionOrder: m });
    }
    if (shared.length > 0) {
      x.sharedWith = shared;
      marked.push(`${x.harmonic} (${shared.map((h) => `m = ${h.diffractionOrder} of ${h.harmonic}`).join(', ')})`);
    }
  }
  if (marked.length > 0) {
    notes.push(`Higher diffraction orders land on the same pixels as first-order lines, so these yields may include their light: q = ${marked.slice(0, 8).join('; ')}${marked.length > 8 ? `; and ${marked.length - 8} more` : ''}.`);
  }
}

export function applyCalibration(lineout: Lineout, peaks: readonly Peak[], cal: Calibration, options?: ApplyOptions): AppliedSpectrum {
  const o = resolveOptions(options);
  const n = lineout.counts.length;
  if (n !== cal.pixelCount) throw new EngineError('invalid_input', `The lineout has ${n} spectral pixels but the calibration was made for ${cal.pixelCount}.`);
  if (!(cal.driverNm > 0)) throw new EngineError('invalid_input', `The calibration's driver wavelength must be positive, got ${cal.driverNm}.`);
  const notes: string[] = [];
  const pixels = new Float64Array(n);
  for (let i = 0; i < n; i++) pixels[i] = i;
  const { wavelengthNm, wavelengthSigmaNm, dispersionNmPerPixel: slope } = evaluateCalibrationAxes(cal, pixels);
  const energyEv = new Float64Array(n);
  const intensity = new Float64Array(n);
  const intensitySigma = new Float64Array(n);
  const perEv = new Float64Array(n);
  const perEvSigma = new Float64Array(n);
  let lambdaMin = Number.POSITIVE_INFINITY;
  let lambdaMax = 0;
  for (let i = 0; i < n; i++) {
    const lambda = wavelengthNm[i];
    if (lambda > 0) {
      lambdaMin = Math.min(lambdaMin, lambda);
      lambdaMax = Math.max(lambdaMax, lambda);
    }
    energyEv[i] = HC_EV_NM / lambda;
    intensity[i] = lineout.counts[i];
    intensitySigma[i] = Math.sqrt(Math.max(0, lineout.variance[i]));
  }

  let transmission: Float64Array | undefined;
  const filters = o.filterCorrection ? cal.filters.map(parseFilterSpec) : [];
  if (o.filterCorrection) {
    if (filters.length === 0) notes.push('Filter correction asked for, but the calibration lists no filters.');
    transmission = new Float64Array(n);
    let clipped = 0;
    let outside = 0;
    let unmapped = 0;
    for (let i = 0; i < n; i++) {
      const t = transmissionAt(filters, energyEv[i]);
      transmission[i] = t;
      if (!Number.isFinite(t)) {
        unmapped++;
        continue;
      }
      if (filters.length > 0 && !isTabulatedEnergy(energyEv[i])) outside++;
      if (t < o.minTransmission) clipped++;
      const divisor = Math.max(t, o.minTransmission);
      intensity[i] /= divisor;
      intensitySigma[i] /= divisor;
    }
    if (clipped > 0) notes.push(`Filter transmission below ${o.minTransmission} at ${clipped} pixels: the correction there is clipped at ×${1 / o.minTransmission}, so those intensities are lower bounds.`);
    if (outside > 0) notes.push(`${outside} pixels lie outside the filter tables (15-300 eV): their correction holds the nearest tabulated transmission, so it is indicative only there.`);
    if (unmapped > 0) notes.push(`${unmapped} pixels have no photon energy under this calibration and are not corrected.`);
    if (filters.length > 0) notes.push('Per-pixel correction uses the first-order photon energy; second-order light at those pixels is corrected with the wrong transmission.');
  }
  for (let i = 0; i < n; i++) {
    // |dE/dp| = hc/λ² · |dλ/dp|: counts per pixel → counts per eV.
    const jacobian = (HC_EV_NM / (wavelengthNm[i] * wavelengthNm[i])) * Math.abs(slope[i]);
    perEv[i] = intensity[i] / jacobian;
    perEvSigma[i] = intensitySigma[i] / jacobian;
  }

  const orders: AppliedOrder[] = [];
  if (lambdaMax > 0) {
    // The scale term moves the whole axis and the driver wavelength together, not a harmonic's
    // pixel: lines are matched against the fit-only band.
    const scale = cal.scaleSigmaRelative ?? 0;
    const fitOnlySigmaNm = new Float64Array(n);
    for (let i = 0; i < n; i++) fitOnlySigmaNm[i] = Math.sqrt(Math.max(0, wavelengthSigmaNm[i] ** 2 - (wavelengthNm[i] * scale) ** 2));
    const predictions = predictOrders(cal, o.parity ?? cal.parity, lambdaMin, lambdaMax, fitOnlySigmaNm, slope, o.maxDiffractionOrder, n);
    const matches = matchPeaks(predictions, peaks, o.toleranceSigma, o.maxSpacingFraction);
    const dropped = dropImplausibleHigherOrders(predictions, matches, peaks);
    if (dropped.reason) notes.push(dropped.reason);
    predictions.forEach((pr, a) => {
      const peakIndex = matches.get(a);
      // Higher-order images are reported only when seen; every first-order line in range is.
      if (peakIndex === undefined && pr.diffractionOrder > 1) return;
      const lambda = cal.driverNm / pr.harmonic;
      const energy = HC_EV_NM / lambda;
      let value: number;
      let sigma: number;
      if (peakIndex !== undefined) {
        value = peaks[peakIndex].area;
        sigma = peaks[peakIndex].areaSigma;
      } else {
        const half = Math.max(1, 0.25 * pr.spacingPx);
        const from = Math.max(0, Math.round(pr.pixel - half));
        const to = Math.min(n - 1, Math.round(pr.pixel + half));
        value = 0;
        let variance = 0;
        for (let i = from; i <= to; i++) {
          value += lineout.counts[i];
          variance += Math.max(0, lineout.variance[i]);
        }
        sigma = Math.sqrt(variance);
      }
      const order: AppliedOrder = {
        harmonic: pr.harmonic,
        diffractionOrder: pr.diffractionOrder,
        pixel: peakIndex !== undefined ? peaks[peakIndex].pixel : pr.pixel,
        predictedPixel: pr.pixel,
        wavelengthNm: lambda,
        energyEv: energy,
        yield: value,
        yieldSigma: sigma,
        detected: peakIndex !== undefined,
        peakIndex: peakIndex ?? null,
      };
      if (o.filterCorrection && filters.length > 0) {
        // The order's own photon energy (not the first-order position's) sets its transmission.
        const t = transmissionAt(filters, energy);
        order.filterTransmission = t;
        if (Number.isFinite(t)) {
          const divisor = Math.max(t, o.minTransmission);
          order.yield /= divisor;
          order.yieldSigma /= divisor;
        }
      }
      orders.push(order);
    });
    orders.sort((x, y) => x.diffractionOrder - y.diffractionOrder || x.harmonic - y.harmonic);
    markSharedPixels(orders, o.parity ?? cal.parity, cal.driverNm, cal.filters.map(parseFilterSpec), notes);
  }
  const unlabelled = peaks.length - orders.filter((x) => x.detected).length;
  if (unlabelled > 0) notes.push(`${unlabelled} detected peak(s) match no predicted harmonic.`);
  const firstOrderSeen = orders.filter((x) => x.detected && x.diffractionOrder === 1);
  const cutoffEv = firstOrderSeen.length > 0 ? Math.max(...firstOrderSeen.map((x) => x.energyEv)) : undefined;

  return {
    pixel: toArray(pixels),
    wavelengthNm: toArray(wavelengthNm),
    wavelengthSigmaNm: toArray(wavelengthSigmaNm),
    energyEv: toArray(energyEv),
    intensity: toArray(intensity),
    intensitySigma: toArray(intensitySigma),
    intensityPerEv: toArray(perEv),
    intensityPerEvSigma: toArray(perEvSigma),
    ...(transmission ? { filterTransmission: toArray(transmission) } : {}),
    orders,
    ...(cutoffEv !== undefined ? { cutoffEv } : {}),
    notes,
  };
}
