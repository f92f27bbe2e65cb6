import { medianInPlace } from './robust.ts';
import { type RowSource, rowIndex } from './strip.ts';

/** Median of up to four finite values in `buf[0..n)`; NaN when n is 0. */
function smallMedian(buf: Float64Array, n: number): number {
  // Insertion sort: n ≤ 4.
  for (let i = 1; i < n; i++) {
    const v = buf[i];
    let j = i - 1;
    while (j >= 0 && buf[j] > v) {
      buf[j + 1] = buf[j];
      j--;
    }
    buf[j + 1] = v;
  }
  if (n === 0) return Number.NaN;
  return n % 2 === 1 ? buf[n >> 1] : 0.5 * (buf[(n >> 1) - 1] + buf[n >> 1]);
}

/** Settings of {@link RowCleaner}. */
export interface OutlierSettings {
  gain: number;
  /** Noise floor variance per pixel (read noise and background shot noise), counts². */
  floorVariance: number;
  /** Pedestal under the pixel values (bias or diffuse background), so shot noise uses value − pedestal; asked for only when needed. */
  pedestal: () => number;
  sigmas: number;
  /** When false only NaN pixels are replaced. */
  rejectHot: boolean;
  /** Raw value at or above which a pixel counts as saturated. */
  saturationLevel: number;
}

/**
 * First screen, three predictable comparisons per pixel; writes the pixels that pass it (the
 * possible outliers, and every NaN) to `candidates` and returns how many. An outlier stands more
 * than k·σ_floor (`screen`) above its reference (g·level ≥ 0), and the reference is at least the
 * median of the 4 spatial neighbours, hence at least their second smallest. When three of the
 * neighbours are ≥ v − k·σ_floor, so is the second smallest, and the pixel is no outlier. NaN
 * anywhere fails a comparison and goes on to the exact tests.
 */
function screenRow(cur: Float32Array, a: Float32Array, b: Float32Array, c: Float32Array, screen: number, candidates: Int32Array): number {
  let n = 0;
  const L = cur.length;
  for (let p = 0; p < L; p++) {
    const t = cur[p] - screen;
    if (t <= b[p] && t <= c[p] && t <= a[p]) continue;
    candidates[n++] = p;
  }
  return n;
}

/** Rows the screen reads together: a group of {@link GROUP_ROWS} band rows and two neighbours each side. */
export const GROUP_ROWS = 4;
/** Dark-subtracted rows kept: enough for a group and its neighbours (and for one row and its four). */
const RING = GROUP_ROWS + 4;

/**
 * Replaces NaN pixels and hot/cosmic pixels, one spatial row at a time, reading the source
 * (never writing it) and writing the cleaned row into {@link RowCleaner.values}.
 *
 * A pixel is an outlier when it stands more than `sigmas` noise sigmas AND more than its own
 * reference level above both the median of its 4 spatial neighbours (rows ±1, ±2) and the median
 * of its 4 spectral neighbours (pixels ±1, ±2); the reference is the larger of the two medians.
 * Harmonic lines are several pixels wide spectrally and extended spatially, so at least one of
 * the two medians follows the line and the line survives; a hit of 1-2 pixels has background in
 * both medians. The replacement is the spatial median, which keeps the spectral line profile of
 * the neighbouring rows. A replaced saturated pixel no longer flags saturation.
 *
 * Neighbours are always the source's original values, so the result does not depend on the
 * order rows are cleaned in. Dark-subtracted rows are prepared once each in a small ring.
 */
export class RowCleaner {
  /** The last cleaned row (dark-subtracted, outliers replaced). */
  readonly values: Float32Array;
  /** 1 where the last cleaned row's raw pixel reached the saturation level and was kept. */
  readonly saturated: Uint8Array;
  /** Whether {@link saturated} holds any 1. */
  anySaturated = false;
  /** The loaded row's dark-subtracted values, its raw values, and its neighbours at rows s−2, s−1, s+1, s+2 (undefined past the frame edge). */
  cur: Float32Array = new Float32Array(0);
  rawRow: Float32Array = new Float32Array(0);
  /** Rows s − 2 … s + GROUP_ROWS + 1 and the raw rows s … s + GROUP_ROWS − 1 after {@link loadGroup}(s). */
  readonly groupRows: Float32Array[] = [];
  readonly groupRaw: Float32Array[] = [];
  neighbours: (Float32Array | undefined)[] = [undefined, undefined, undefined, undefined];
  /** Whether the last {@link resolve} replaced its pixel, and whether as a hot pixel (which then no longer flags saturation; a replaced NaN keeps its raw flag). */
  wasReplaced = false;
  wasHot = false;
  /** k·σ_floor, shrunk by 1e-9 for the rounding of the square root: the first screen's threshold. */
  readonly screenThreshold: number;
  private interior = false;
  private readonly ringRows = new Int32Array(RING).fill(-1);
  private readonly ring: Float32Array[] = [];
  /** The ring's rows side by side in one array (each ring row is a view of it). */
  private readonly ringFlat: Float32Array;
  /**
   * After {@link loadPlainGroup}(s): row s + j is `groupData[groupBase[j] + p]` (one array with
   * offsets, see sum-band.ts fusedPlainGroup); `groupRawData` is the frame's own data, the same
   * array as `groupData` when there is no dark frame.
   */
  groupData: Float32Array = new Float32Array(0);
  groupRawData: Float32Array = new Float32Array(0);
  readonly groupBase = new Int32Array(GROUP_ROWS);
  private readonly buf = new Float64Array(4);
  private readonly candidates: Int32Array;

  constructor(
    private readonly source: RowSource,
    private readonly settings: OutlierSettings,
  ) {
    const L = source.spectralLength;
    this.values = new Float32Array(L);
    this.saturated = new Uint8Array(L);
    this.candidates = new Int32Array(L);
    this.screenThreshold = settings.sigmas * Math.sqrt(settings.floorVariance) * (1 - 1e-9);
    this.ringFlat = new Float32Array(source.dark ? RING * L : 0);
    for (let k = 0; k < RING; k++) this.ring.push(source.dark ? this.ringFlat.subarray(k * L, (k + 1) * L) : new Float32Array(0));
  }

  /** The dark-subtracted values of spatial row s (a view of the frame when there is no dark). */
  private row(s: number): Float32Array {
    const { source } = this;
    const L = source.spectralLength;
    const i = rowIndex(source, s);
    if (!source.dark) return source.raw.subarray(i, i + L);
    const slot = s % RING;
    const out = this.ring[slot];
    if (this.ringRows[slot] !== s) {
      const { raw, dark } = source;
      for (let p = 0; p < L; p++) out[p] = raw[i + p] - dark[i + p];
      this.ringRows[slot] = s;
    }
    return out;
  }

  /**
   * Loads spatial row s and its neighbours into {@link cur}, {@link rawRow} and
   * {@link neighbours}. Returns true when the caller may run the first screen itself (all four
   * neighbours exist and hot pixels are rejected); candidates then go to {@link resolve}.
   */
  load(s: number): boolean {
    const { source } = this;
    const S = source.spatialLength;
    const i = rowIndex(source, s);
    this.cur = this.row(s);
    this.rawRow = source.dark ? source.raw.subarray(i, i + source.spectralLength) : this.cur;
    let all = true;
    for (let k = 0; k < 4; k++) {
      const rr = s + (k < 2 ? k - 2 : k - 1);
      const row = rr >= 0 && rr < S ? this.row(rr) : undefined;
      this.neighbours[k] = row;
      if (row === undefined) all = false;
    }
    this.interior = all;
    return all && this.settings.rejectHot;
  }

  /**
   * Prepares rows s … s + GROUP_ROWS − 1 for the caller's own first screen: true only when
   * every neighbour of each exists and hot pixels are rejected. {@link groupRows}[j] is then
   * row s − 2 + j (j < GROUP_ROWS + 4) and {@link groupRaw}[j] the raw values of row s + j.
   * Call {@link load} for a row before {@link resolve} on it.
   */
  loadGroup(s: number): boolean {
    const { source } = this;
    if (!this.settings.rejectHot || s - 2 < 0 || s + GROUP_ROWS + 1 >= source.spatialLength) return false;
    const L = source.spectralLength;
    for (let j = 0; j < GROUP_ROWS + 4; j++) this.groupRows[j] = this.row(s - 2 + j);
    for (let j = 0; j < GROUP_ROWS; j++) {
      const i = rowIndex(source, s + j);
      this.groupRaw[j] = source.dark ? source.raw.subarray(i, i + L) : this.groupRows[j + 2];
    }
    return true;
  }

  /** Whether hot and cosmic pixels are rejected (otherwise only NaN pixels are replaced). */
  get rejectsHot(): boolean {
    return this.settings.rejectHot;
  }

  /**
   * Without hot-pixel rejection, prepares rows s … s + GROUP_ROWS − 1 alone (no neighbours are
   * screened): {@link groupRows}[j + 2] is row s + j, {@link groupRaw}[j] its raw values. Only NaN
   * pixels then need {@link load} and {@link resolve}. False when hot pixels are rejected.
   */
  loadPlainGroup(s: number): boolean {
    const { source } = this;
    if (this.settings.rejectHot || s < 0 || s + GROUP_ROWS > source.spatialLength) return false;
    const L = source.spectralLength;
    this.groupData = source.dark ? this.ringFlat : source.raw;
    this.groupRawData = source.raw;
    for (let j = 0; j < GROUP_ROWS; j++) {
      this.groupRows[j + 2] = this.row(s + j);
      const i = rowIndex(source, s + j);
      this.groupRaw[j] = source.dark ? source.raw.subarray(i, i + L) : this.groupRows[j + 2];
      this.groupBase[j] = source.dark ? ((s + j) % RING) * L : i;
    }
    return true;
  }

  /** Cleans spatial row s into {@link values} and {@link saturated}; returns how many pixels were replaced. */
  clean(s: number): number {
    const { settings, values: out, saturated: sat } = this;
    const screened = this.load(s);
    const { cur, rawRow } = this;
    const L = cur.length;
    out.set(cur);
    if (this.anySaturated) sat.fill(0);
    this.anySaturated = false;
    const level = settings.saturationLevel;
    if (level !== Infinity) {
      for (let p = 0; p < L; p++) {
        if (rawRow[p] >= level) {
          sat[p] = 1;
          this.anySaturated = true;
        }
      }
    }
    const candidates = this.candidates;
    let n = 0;
    if (screened) {
      const [a, b, c] = this.neighbours as Float32Array[];
      n = screenRow(cur, a, b, c, this.screenThreshold, candidates);
    } else if (!settings.rejectHot) {
      for (let p = 0; p < L; p++) if (cur[p] !== cur[p]) candidates[n++] = p;
    } else {
      for (let p = 0; p < L; p++) candidates[n++] = p;
    }
    let replaced = 0;
    for (let k = 0; k < n; k++) {
      const p = candidates[k];
      const v = this.resolve(p);
      if (this.wasReplaced) {
        out[p] = v;
        if (this.wasHot) sat[p] = 0;
        replaced++;
      }
    }
    return replaced;
  }

  /**
   * The cleaned value (Float32) of pixel p of the loaded row, a pixel the first screen did not
   * clear; sets {@link wasReplaced}. Runs the exact tests.
   */
  resolve(p: number): number {
    const { buf, neighbours, settings, cur } = this;
    const L = cur.length;
    const v = cur[p];
    this.wasReplaced = false;
    this.wasHot = false;
    const { gain, floorVariance } = settings;
    const k2 = settings.sigmas * settings.sigmas;
    if (v === v && this.interior) {
      if (!settings.rejectHot) return v;
      // Second screen, exact: not an outlier even against the smallest spatial neighbour (the
      // reference is at least that, and the threshold grows with the reference). A NaN
      // neighbour makes every comparison false and falls through to the full test.
      // Indexed, not destructured: this runs per candidate pixel.
      let mn = (neighbours[0] as Float32Array)[p];
      const vb = (neighbours[1] as Float32Array)[p];
      const vc = (neighbours[2] as Float32Array)[p];
      const vd = (neighbours[3] as Float32Array)[p];
      if (vb < mn) mn = vb;
      if (vc < mn) mn = vc;
      if (vd < mn) mn = vd;
      const excess = v - mn;
      const pedestal = settings.pedestal();
      const lv = mn - pedestal > 0 ? mn - pedestal : 0;
      if (excess <= lv || excess * excess <= k2 * (gain * lv + floorVariance)) return v;
    } else if (v === v && !settings.rejectHot) {
      return v;
    }
    let n = 0;
    for (let k = 0; k < 4; k++) {
      const row = neighbours[k];
      if (row === undefined) continue;
      const u = row[p];
      if (u === u) buf[n++] = u;
    }
    const refSpatial = smallMedian(buf, n);
    let m = 0;
    for (let dp = -2; dp <= 2; dp++) {
      if (dp === 0) continue;
      const pp = p + dp;
      if (pp < 0 || pp >= L) continue;
      const u = cur[pp];
      if (u === u) buf[m++] = u;
    }
    const refSpectral = smallMedian(buf, m);
    if (v !== v) {
      this.wasReplaced = true;
      return Math.fround(refSpatial === refSpatial ? refSpatial : refSpectral === refSpectral ? refSpectral : settings.pedestal());
    }
    const ref = Math.max(refSpatial === refSpatial ? refSpatial : -Infinity, refSpectral === refSpectral ? refSpectral : -Infinity);
    if (!Number.isFinite(ref)) return v;
    const level = Math.max(ref - settings.pedestal(), 0);
    const excess = v - ref;
    if (excess > level && excess * excess > k2 * (gain * level + floorVariance)) {
      this.wasReplaced = true;
      this.wasHot = true;
      return Math.fround(refSpatial === refSpatial ? refSpatial : ref);
    }
    return v;
  }
}

/** Median of a strided subsample of the finite dark-subtracted values in spatial rows [start, end). */
export function bandPedestal(source: RowSource, start: number, end: number): number {
  const L = source.spectralLength;
  const total = (end - start) * L;
  const step = Math.max(1, Math.floor(total / 20000));
  const scratch = new Float64Array(Math.ceil(total / step));
  const { raw, dark } = source;
  let n = 0;
  // Every step-th pixel of the band's flat (row, pixel) order, row by row: p is the next sample's
  // pixel, carried over into the following row.
  let p = 0;
  for (let row = start; row < end; row++) {
    const base = rowIndex(source, row);
    if (dark) {
      for (; p < L; p += step) {
        const v = Math.fround(raw[base + p] - dark[base + p]);
        if (v === v) scratch[n++] = v;
      }
    } else {
      for (; p < L; p += step) {
        const v = raw[base + p];
        if (v === v) scratch[n++] = v;
      }
    }
    p -= L;
  }
  return n > 0 ? medianInPlace(scratch, n) : 0;
}
