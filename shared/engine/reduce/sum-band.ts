import type { LineShape, SpatialBand } from '../types.ts';
import { type BandGroupKernels, bandGroupKernels } from './kernels/band-groups.ts';
import { GROUP_ROWS, type RowCleaner } from './outliers.ts';

/** Inputs of {@link sumBand}. */
export interface SumBandInput {
  /** Gives each cleaned signal row in turn. */
  cleaner: RowCleaner;
  signal: SpatialBand;
  lineShape: LineShape;
  /** Background per spectral pixel, subtracted from every band row. */
  background: Float64Array;
  /** Variance of the background estimate per spectral pixel. */
  backgroundVariance: Float64Array;
  /** Noise floor variance per spectral pixel (read noise, plus background shot noise). */
  floorVariance: Float64Array;
  gain: number;
  /** Raw value at or above which a pixel counts as saturated. */
  saturationLevel: number;
}

export interface SumBandResult {
  counts: Float64Array;
  variance: Float64Array;
  saturated: Uint8Array;
  band: Float32Array;
  /** Rows of `band`: bins of `bandBinRows` band rows each. */
  bandRows: number;
  bandBinRows: number;
  /** Pixels the cleaner replaced in the signal band. */
  rejected: number;
}

/**
 * One unshifted band row: the cleaner's first screen inline (see RowCleaner), the pixels it
 * clears background-subtracted, stored in the band and summed; the others written to
 * `candidates` (their count returned) for the exact tests. A function of its own, called once
 * per row, so that V8 optimises it as a whole.
 */
function fusedRow(
  cur: Float32Array,
  rawRow: Float32Array,
  a: Float32Array,
  b: Float32Array,
  c: Float32Array,
  screen: number,
  background: Float64Array,
  floorVariance: Float64Array,
  gain: number,
  level: number,
  rowBand: Float64Array,
  counts: Float64Array,
  variance: Float64Array,
  saturated: Uint8Array,
  candidates: Int32Array,
): number {
  const L = cur.length;
  let n = 0;
  for (let p = 0; p < L; p++) {
    const v = cur[p];
    const t = v - screen;
    if (t <= b[p] && t <= c[p] && t <= a[p]) {
      const d = v - background[p];
      rowBand[p] = d;
      counts[p] += d;
      // max(d, 0) without a branch: d sits on both sides of 0 in the background, which would
      // make a branch unpredictable; d + |d| is exact.
      variance[p] += gain * 0.5 * (d + Math.abs(d)) + floorVariance[p];
      if (rawRow[p] >= level) saturated[p] = 1;
    } else {
      candidates[n++] = p;
    }
  }
  return n;
}

/**
 * Four unshifted band rows s … s + 3 (`r0`…`r3`) in one pass, each pixel through the same first
 * screen as {@link fusedRow}: a pixel whose four rows all clear it is summed at once, rows in
 * order (so each sum sees the same additions in the same order as row by row), and the four
 * rows' sum is stored at `band[out + p]` (one bin); the others go to `candidates` for
 * {@link sumGroup}. Neighbour rows are shared between the four (`am`, `bm`: rows s − 2, s − 1;
 * `r4`: row s + 4), and the running sums are loaded and stored once per four rows.
 *
 * Saturation is tested on the values, which are the raw values without a dark frame; with one
 * the caller passes `level` = Infinity and flags from the raw rows afterwards
 * ({@link flagSaturatedRows}). The kernel has no other branch on the case: a flag for binned
 * storage or a raw-row choice inside this loop made V8 run it at half speed.
 */
function fusedGroup(
  am: Float32Array,
  bm: Float32Array,
  r0: Float32Array,
  r1: Float32Array,
  r2: Float32Array,
  r3: Float32Array,
  r4: Float32Array,
  screen: number,
  background: Float64Array,
  floorVariance: Float64Array,
  gain: number,
  level: number,
  band: Float32Array,
  out: number,
  counts: Float64Array,
  variance: Float64Array,
  saturated: Uint8Array,
  candidates: Int32Array,
): number {
  const L = r0.length;
  const halfGain = gain * 0.5;
  let n = 0;
  for (let p = 0; p < L; p++) {
    const v0 = r0[p];
    const v1 = r1[p];
    const v2 = r2[p];
    const v3 = r3[p];
    const vb = bm[p];
    const t0 = v0 - screen;
    const t1 = v1 - screen;
    const t2 = v2 - screen;
    const t3 = v3 - screen;
    // Row s + j against rows s + j − 2, s + j − 1 and s + j + 1, as fusedRow.
    if (
      t0 <= vb && t0 <= v1 && t0 <= am[p] &&
      t1 <= v0 && t1 <= v2 && t1 <= vb &&
      t2 <= v1 && t2 <= v3 && t2 <= v0 &&
      t3 <= v2 && t3 <= r4[p] && t3 <= v1
    ) {
      const bp = background[p];
      const fp = floorVariance[p];
      const d0 = v0 - bp;
      const d1 = v1 - bp;
      const d2 = v2 - bp;
      const d3 = v3 - bp;
      band[out + p] = d0 + d1 + d2 + d3;
      counts[p] = counts[p] + d0 + d1 + d2 + d3;
      variance[p] =
        variance[p] +
        (halfGain * (d0 + Math.abs(d0)) + fp) +
        (halfGain * (d1 + Math.abs(d1)) + fp) +
        (halfGain * (d2 + Math.abs(d2)) + fp) +
        (halfGain * (d3 + Math.abs(d3)) + fp);
      if (v0 >= level || v1 >= level || v2 >= level || v3 >= level) saturated[p] = 1;
    } else {
      candidates[n++] = p;
    }
  }
  return n;
}

/**
 * Saturation flags from four raw rows for the pixels a group kernel summed (every pixel but the
 * `n` sorted `candidates`, which the caller flags itself): used with a dark frame, where the
 * kernel's values are not the raw values.
 */
function flagSaturatedRows(raws: Float32Array[], level: number, saturated: Uint8Array, candidates: Int32Array, n: number): void {
  if (level === Infinity) return;
  const [raw0, raw1, raw2, raw3] = raws;
  const L = raw0.length;
  let next = 0;
  for (let p = 0; p < L; p++) {
    if (next < n && candidates[next] === p) {
      next++;
      continue;
    }
    if (raw0[p] >= level || raw1[p] >= level || raw2[p] >= level || raw3[p] >= level) saturated[p] = 1;
  }
}

/**
 * Without binning the band keeps every row: rows s … s + 3 background-subtracted into
 * `band[out + j·L + p]` (the same subtraction as the kernel's, so the same values; the caller
 * overwrites its candidates' entries).
 */
function storeGroupRows(rows: Float32Array[], background: Float64Array, band: Float32Array, out: number): void {
  const L = background.length;
  for (let j = 0; j < GROUP_ROWS; j++) {
    const row = rows[j];
    const base = out + j * L;
    for (let p = 0; p < L; p++) band[base + p] = row[p] - background[p];
  }
}

/**
 * The group's candidate pixels, whose values per row wait in `pending` (row j of candidate k at
 * j·L + k), added to the sums rows in order, and their bin stored when the band is binned.
 */
function foldPending(
  candidates: Int32Array,
  n: number,
  pending: Float64Array,
  floorVariance: Float64Array,
  gain: number,
  band: Float32Array,
  out: number,
  binned: boolean,
  counts: Float64Array,
  variance: Float64Array,
): void {
  const L = floorVariance.length;
  const halfGain = gain * 0.5;
  for (let k = 0; k < n; k++) {
    const p = candidates[k];
    const fp = floorVariance[p];
    let sum = counts[p];
    let vsum = variance[p];
    let binSum = 0;
    for (let j = 0; j < GROUP_ROWS; j++) {
      const d = pending[j * L + k];
      sum += d;
      vsum += halfGain * (d + Math.abs(d)) + fp;
      // The bin's first row starts its sum (0 + d would turn −0 into +0).
      binSum = j === 0 ? d : binSum + d;
    }
    counts[p] = sum;
    variance[p] = vsum;
    if (binned) band[out + p] = binSum;
  }
}

/**
 * Rows s … s + GROUP_ROWS − 1 (prepared by `cleaner.loadGroup(s)`) folded into the band and the
 * sums: {@link fusedGroup}, then the pixels it left, row by row through the cleaner, their
 * values held in `pending` (GROUP_ROWS · L) so that each sum still adds the rows in order.
 * Returns how many pixels the cleaner replaced.
 */
function sumGroup(
  cleaner: RowCleaner,
  s: number,
  background: Float64Array,
  floorVariance: Float64Array,
  gain: number,
  level: number,
  band: Float32Array,
  out: number,
  binned: boolean,
  counts: Float64Array,
  variance: Float64Array,
  saturated: Uint8Array,
  candidates: Int32Array,
  pending: Float64Array,
  scratchBin: Float32Array,
  kernel: BandGroupKernels | undefined,
): number {
  const rows = cleaner.groupRows;
  const raws = cleaner.groupRaw;
  const screen = cleaner.screenThreshold;
  const L = background.length;
  const rawIsValue = raws[0] === rows[2] && raws[1] === rows[3] && raws[2] === rows[4] && raws[3] === rows[5];
  const groupLevel = rawIsValue ? level : Infinity;
  let n: number;
  if (kernel) {
    // counts, variance, saturated and candidates are the kernels' own views (see sumBand).
    n = kernel.screenedGroup(rows, s, screen, gain * 0.5, groupLevel);
    if (binned) band.set(kernel.bin, out);
  } else {
    n = fusedGroup(
      rows[0], rows[1], rows[2], rows[3], rows[4], rows[5], rows[6],
      screen, background, floorVariance, gain, groupLevel,
      binned ? band : scratchBin, binned ? out : 0, counts, variance, saturated, candidates,
    );
  }
  if (!rawIsValue) flagSaturatedRows(raws, level, saturated, candidates, n);
  if (!binned) storeGroupRows(rows.slice(2, 6), background, band, out);
  if (n === 0) return 0;
  let rejected = 0;
  for (let j = 0; j < GROUP_ROWS; j++) {
    // Row s + j is rows[j + 2]; its screen neighbours rows[j], rows[j + 1], rows[j + 3].
    const cur = rows[j + 2];
    const a = rows[j];
    const b = rows[j + 1];
    const c = rows[j + 3];
    const raw = raws[j];
    const rowOut = out + j * L;
    const pend = j * L;
    let loaded = false;
    for (let k = 0; k < n; k++) {
      const p = candidates[k];
      const v = cur[p];
      const t = v - screen;
      let d: number;
      let hot = false;
      if (t <= b[p] && t <= c[p] && t <= a[p]) {
        d = v - background[p];
      } else {
        if (!loaded) {
          cleaner.load(s + j);
          loaded = true;
        }
        d = cleaner.resolve(p) - background[p];
        if (cleaner.wasReplaced) rejected++;
        hot = cleaner.wasHot;
      }
      pending[pend + k] = d;
      if (!binned) band[rowOut + p] = d;
      if (raw[p] >= level && !hot) saturated[p] = 1;
    }
  }
  foldPending(candidates, n, pending, floorVariance, gain, band, out, binned, counts, variance);
  return rejected;
}

/**
 * {@link fusedGroup} without hot-pixel rejection: four rows summed where none is NaN (a NaN
 * poisons the sum, so one comparison per pixel finds them); pixels with a NaN in any row go to
 * `candidates` for {@link sumPlainGroup}. Reads one array at four row offsets (a bare four-row
 * sum over 1024 x 2048 took 1.2 ms so against 3.7 ms over four row views, on this machine);
 * saturation and binning as in {@link fusedGroup}.
 */
function fusedPlainGroup(
  data: Float32Array,
  b0: number,
  b1: number,
  b2: number,
  b3: number,
  background: Float64Array,
  floorVariance: Float64Array,
  gain: number,
  level: number,
  band: Float32Array,
  out: number,
  counts: Float64Array,
  variance: Float64Array,
  saturated: Uint8Array,
  candidates: Int32Array,
): number {
  const L = background.length;
  const halfGain = gain * 0.5;
  let n = 0;
  for (let p = 0; p < L; p++) {
    const v0 = data[b0 + p];
    const v1 = data[b1 + p];
    const v2 = data[b2 + p];
    const v3 = data[b3 + p];
    const all = v0 + v1 + v2 + v3;
    if (all === all) {
      const bp = background[p];
      const fp = floorVariance[p];
      const d0 = v0 - bp;
      const d1 = v1 - bp;
      const d2 = v2 - bp;
      const d3 = v3 - bp;
      band[out + p] = d0 + d1 + d2 + d3;
      counts[p] = counts[p] + d0 + d1 + d2 + d3;
      variance[p] =
        variance[p] +
        (halfGain * (d0 + Math.abs(d0)) + fp) +
        (halfGain * (d1 + Math.abs(d1)) + fp) +
        (halfGain * (d2 + Math.abs(d2)) + fp) +
        (halfGain * (d3 + Math.abs(d3)) + fp);
      if (v0 >= level || v1 >= level || v2 >= level || v3 >= level) saturated[p] = 1;
    } else {
      candidates[n++] = p;
    }
  }
  return n;
}

/**
 * {@link sumGroup} without hot-pixel rejection (rows from `cleaner.loadPlainGroup(s)`): the
 * pixels {@link fusedPlainGroup} left hold a NaN in some row, which the cleaner replaces; the
 * others rows' values are taken as they are. Rows are still added in order.
 */
function sumPlainGroup(
  cleaner: RowCleaner,
  s: number,
  background: Float64Array,
  floorVariance: Float64Array,
  gain: number,
  level: number,
  band: Float32Array,
  out: number,
  binned: boolean,
  counts: Float64Array,
  variance: Float64Array,
  saturated: Uint8Array,
  candidates: Int32Array,
  pending: Float64Array,
  scratchBin: Float32Array,
  kernel: BandGroupKernels | undefined,
): number {
  const rows = cleaner.groupRows;
  const raws = cleaner.groupRaw;
  const L = background.length;
  const base = cleaner.groupBase;
  const rawIsValue = cleaner.groupRawData === cleaner.groupData;
  const groupLevel = rawIsValue ? level : Infinity;
  let n: number;
  if (kernel) {
    // counts, variance, saturated and candidates are the kernel's own views (see sumBand).
    n = kernel.plainGroup(cleaner.groupData, base, gain * 0.5, groupLevel);
    if (binned) band.set(kernel.bin, out);
  } else {
    n = fusedPlainGroup(
      cleaner.groupData, base[0], base[1], base[2], base[3],
      background, floorVariance, gain, groupLevel,
      binned ? band : scratchBin, binned ? out : 0, counts, variance, saturated, candidates,
    );
  }
  if (!rawIsValue) flagSaturatedRows(raws, level, saturated, candidates, n);
  if (!binned) storeGroupRows(rows.slice(2, 6), background, band, out);
  if (n === 0) return 0;
  let rejected = 0;
  for (let j = 0; j < GROUP_ROWS; j++) {
    const cur = rows[j + 2];
    const raw = raws[j];
    const rowOut = out + j * L;
    const pend = j * L;
    let loaded = false;
    for (let k = 0; k < n; k++) {
      const p = candidates[k];
      const v = cur[p];
      let d: number;
      if (v === v) {
        d = v - background[p];
      } else {
        if (!loaded) {
          cleaner.load(s + j);
          loaded = true;
        }
        d = cleaner.resolve(p) - background[p];
        if (cleaner.wasReplaced) rejected++;
      }
      pending[pend + k] = d;
      if (!binned) band[rowOut + p] = d;
      // A replaced NaN keeps its raw saturation flag (RowCleaner.clean).
      if (raw[p] >= level) saturated[p] = 1;
    }
  }
  foldPending(candidates, n, pending, floorVariance, gain, band, out, binned, counts, variance);
  return rejected;
}

/** Working rows of {@link sumBand}, each written before it is read. */
interface ScratchRows {
  length: number;
  rowData: Float64Array;
  rowVar: Float64Array;
  rowBand: Float64Array;
  binSum: Float64Array;
  /** Four rows of candidates' values, see {@link foldPending}. */
  pending: Float64Array;
  /** Where the group kernels put their four-row sums when the band keeps every row. */
  scratchBin: Float32Array;
  candidates: Int32Array;
}

let scratch: ScratchRows | undefined;

/**
 * The working rows for a spectral length, kept between calls (never returned to a caller, and
 * sumBand does not re-enter): fresh ones cost ~100 KB of zeroed pages per 2048-pixel call.
 */
function scratchRows(length: number): ScratchRows {
  if (scratch?.length !== length) {
    scratch = {
      length,
      rowData: new Float64Array(length),
      rowVar: new Float64Array(length),
      rowBand: new Float64Array(length),
      binSum: new Float64Array(length),
      pending: new Float64Array(GROUP_ROWS * length),
      scratchBin: new Float32Array(length),
      candidates: new Int32Array(length),
    };
  }
  return scratch;
}

/**
 * Background subtraction, tilt/curvature correction and summation of the signal band, in one
 * pass over its rows (each row is cleaned, then folded into the sums while it is in cache).
 *
 * Row r sits at spatial offset o = row − centre; a line there is displaced by
 * shift = tilt·o + curvature·o², so the corrected row at pixel p is the original sampled at
 * p + shift (linear interpolation, clamped at the ends). Pixel variance g·max(x − b, 0) + floor
 * goes through the same interpolation with squared weights; the background estimate is the same
 * for every row, so its variance enters the sum n² times (it is fully correlated across rows).
 * Saturation flags follow the interpolation: a corrected pixel is flagged when either source is.
 */
export function sumBand(input: SumBandInput): SumBandResult {
  const { cleaner, signal, lineShape, background, backgroundVariance, floorVariance, gain, saturationLevel } = input;
  const L = background.length;
  const nRows = signal.end - signal.start;
  const centre = 0.5 * (signal.start + signal.end - 1);
  const binRows = bandBinRows(nRows);
  const binned = binRows > 1;
  const bins = Math.floor(nRows / binRows);
  const band = new Float32Array(bins * L);
  // rowBand: a row from the row-by-row paths; binSum: the running sum of its bin when binned.
  const { rowData, rowVar, rowBand, binSum, pending, scratchBin, candidates: jsCandidates } = scratchRows(L);
  // The four-row groups run in WebAssembly where it is there: the running sums then live in the
  // kernels' memory, where every path below adds to them, and are copied out at the end.
  const kernel = bandGroupKernels(L);
  kernel?.forgetRows();
  let counts: Float64Array;
  let variance: Float64Array;
  let saturated: Uint8Array;
  let candidates: Int32Array;
  if (kernel) {
    ({ counts, variance, saturated, candidates } = kernel);
    counts.fill(0);
    variance.fill(0);
    saturated.fill(0);
    kernel.background.set(background);
    kernel.floorVariance.set(floorVariance);
  } else {
    counts = new Float64Array(L);
    variance = new Float64Array(L);
    saturated = new Uint8Array(L);
    candidates = jsCandidates;
  }
  const values = cleaner.values;
  const sat = cleaner.saturated;
  const level = saturationLevel;
  let rejected = 0;
  const shiftAt = (r: number) => {
    const o = signal.start + r - centre;
    return lineShape.tiltPxPerPx * o + lineShape.curvaturePxPerPx2 * o * o;
  };
  const unshiftedFrom = (r: number) => {
    for (let j = 1; j < GROUP_ROWS; j++) if (shiftAt(r + j) !== 0) return false;
    return true;
  };
  /** Row r's band values (in rowBand) into the band: stored, or added to its bin. */
  const foldBandRow = (r: number) => {
    if (!binned) {
      band.set(rowBand, r * L);
      return;
    }
    const bin = Math.floor(r / binRows);
    if (bin >= bins) return; // the rows of a last, partial bin are summed but not kept
    const first = r % binRows === 0;
    for (let p = 0; p < L; p++) binSum[p] = first ? rowBand[p] : binSum[p] + rowBand[p];
    if (r % binRows === binRows - 1) band.set(binSum, bin * L);
  };
  for (let r = 0; r < nRows; r++) {
    const shift = shiftAt(r);
    // Four rows at once fill one bin exactly, or four band rows.
    const groupable = shift === 0 && r + GROUP_ROWS <= nRows && unshiftedFrom(r) && (!binned || r % binRows === 0);
    const out = binned ? (r / binRows) * L : r * L;
    if (groupable && !cleaner.rejectsHot && cleaner.loadPlainGroup(signal.start + r)) {
      rejected += sumPlainGroup(cleaner, signal.start + r, background, floorVariance, gain, level, band, out, binned, counts, variance, saturated, candidates, pending, scratchBin, kernel);
      r += GROUP_ROWS - 1;
      continue;
    }
    if (groupable && cleaner.loadGroup(signal.start + r)) {
      rejected += sumGroup(cleaner, signal.start + r, background, floorVariance, gain, level, band, out, binned, counts, variance, saturated, candidates, pending, scratchBin, kernel);
      r += GROUP_ROWS - 1;
      continue;
    }
    if (shift === 0 && cleaner.load(signal.start + r)) {
      // The common row, in one pass: the cleaner's first screen inline, pixels it clears summed
      // at once, the rest resolved afterwards. Each pixel still gets one addition per row, in
      // row order, so the sums are the same as cleaning the row first.
      const { cur, rawRow, screenThreshold: screen } = cleaner;
      const [a, b, c] = cleaner.neighbours as Float32Array[];
      const n = fusedRow(cur, rawRow, a, b, c, screen, background, floorVariance, gain, level, rowBand, counts, variance, saturated, candidates);
      for (let k = 0; k < n; k++) {
        const p = candidates[k];
        const d = cleaner.resolve(p) - background[p];
        if (cleaner.wasReplaced) rejected++;
        rowBand[p] = d;
        counts[p] += d;
        variance[p] += gain * 0.5 * (d + Math.abs(d)) + floorVariance[p];
        if (rawRow[p] >= level && !cleaner.wasHot) saturated[p] = 1;
      }
      foldBandRow(r);
      continue;
    }
    rejected += cleaner.clean(signal.start + r);
    if (shift === 0) {
      for (let p = 0; p < L; p++) {
        const d = values[p] - background[p];
        rowBand[p] = d;
        counts[p] += d;
        variance[p] += gain * 0.5 * (d + Math.abs(d)) + floorVariance[p];
      }
      if (cleaner.anySaturated) for (let p = 0; p < L; p++) saturated[p] |= sat[p];
      foldBandRow(r);
      continue;
    }
    for (let p = 0; p < L; p++) {
      const d = values[p] - background[p];
      rowData[p] = d;
      rowVar[p] = gain * 0.5 * (d + Math.abs(d)) + floorVariance[p];
    }
    const whole = Math.floor(shift);
    const f = shift - whole;
    const w0 = 1 - f;
    const w0sq = w0 * w0;
    const w1sq = f * f;
    const anySat = cleaner.anySaturated;
    for (let p = 0; p < L; p++) {
      let i0 = p + whole;
      let i1 = i0 + 1;
      if (i0 < 0) i0 = 0;
      else if (i0 > L - 1) i0 = L - 1;
      if (i1 < 0) i1 = 0;
      else if (i1 > L - 1) i1 = L - 1;
      const d = w0 * rowData[i0] + f * rowData[i1];
      rowBand[p] = d;
      counts[p] += d;
      variance[p] += w0sq * rowVar[i0] + w1sq * rowVar[i1];
      if (anySat && ((w0 > 0 && sat[i0]) || (f > 0 && sat[i1]))) saturated[p] = 1;
    }
    foldBandRow(r);
  }
  const n2 = nRows * nRows;
  for (let p = 0; p < L; p++) variance[p] += n2 * backgroundVariance[p];
  if (kernel) {
    counts = counts.slice();
    variance = variance.slice();
    saturated = saturated.slice();
  }
  return { counts, variance, saturated, band, bandRows: bins, bandBinRows: binRows, rejected };
}

/** Band rows from which the kept band is binned (a 2048-row frame's band is ~10 MB unbinned). */
export const TALL_BAND_ROWS = 256;

/**
 * Rows per bin of the kept band: {@link GROUP_ROWS} for a tall band, else 1. Its only reader is
 * the spatial width of a line, which a 4-row box hardly blurs on a band this tall
 * (variance (4² − 1)/12 = 1.25 rows², taken off there).
 */
export function bandBinRows(nRows: number): number {
  return nRows >= TALL_BAND_ROWS ? GROUP_ROWS : 1;
}
