import type { Frame } from '../types.ts';

/**
 * How (spatial s, spectral p) maps into the row-major frame: index = s·spatialStride +
 * p·spectralStride. Reading through strides avoids transposing the frame for spectralAxis 'y'.
 */
export interface AxisGeometry {
  spectralLength: number;
  spatialLength: number;
  spatialStride: number;
  spectralStride: number;
}

export function axisGeometry(frame: Frame, spectralAxis: 'x' | 'y'): AxisGeometry {
  return spectralAxis === 'x'
    ? { spectralLength: frame.width, spatialLength: frame.height, spatialStride: frame.width, spectralStride: 1 }
    : { spectralLength: frame.height, spatialLength: frame.width, spatialStride: 1, spectralStride: frame.width };
}

/**
 * Spectral-contiguous access to spatial rows [first, end) of the frame, without copying for
 * spectralAxis 'x' (rows are views of the frame) and through one blockwise transpose for 'y'.
 * `raw` holds the stored values (for saturation), `dark` the dark frame in the same layout;
 * the value of spatial row s at spectral pixel p is raw[i] − dark[i], i = (s − first)·L + offset + p
 * with L = `rowStride`.
 */
export interface RowSource {
  first: number;
  end: number;
  spectralLength: number;
  /** Spatial length of the frame: neighbours exist for rows 0..spatialLength − 1. */
  spatialLength: number;
  rowStride: number;
  offset: number;
  raw: Float32Array;
  dark?: Float32Array;
}

/** Rows [start, end) of the frame (clipped to it) as a {@link RowSource}. */
export function rowSource(frame: Frame, dark: Frame | undefined, geometry: AxisGeometry, start: number, end: number): RowSource {
  const first = Math.max(0, start);
  const last = Math.min(geometry.spatialLength, end);
  const L = geometry.spectralLength;
  // One object literal with every field in one order, so every source shares one hidden class
  // (mixed shapes made V8 deoptimise the loops that read them).
  const make = (rowStride: number, offset: number, raw: Float32Array, darkData: Float32Array | undefined): RowSource => ({
    first,
    end: last,
    spectralLength: L,
    spatialLength: geometry.spatialLength,
    rowStride,
    offset,
    raw,
    dark: darkData,
  });
  if (geometry.spectralStride === 1) return make(geometry.spatialStride, first * geometry.spatialStride, frame.data, dark?.data);
  // Spectral axis along frame columns: walk the frame row by row (contiguous reads) and scatter
  // the band's columns into spectral-contiguous rows.
  const rows = last - first;
  const W = frame.width;
  const transpose = (data: Float32Array): Float32Array => {
    const out = new Float32Array(rows * L);
    for (let p = 0; p < L; p++) {
      const from = p * W + first;
      for (let r = 0; r < rows; r++) out[r * L + p] = data[from + r];
    }
    return out;
  };
  return make(L, 0, transpose(frame.data), dark ? transpose(dark.data) : undefined);
}

/** Flat index of (spatial row s, spectral pixel 0) in the source's arrays. */
export function rowIndex(source: RowSource, s: number): number {
  return (s - source.first) * source.rowStride + source.offset;
}

/** The smallest value seen by the last {@link sumAndMin} call (a module slot avoids an object per row). */
let kernelMin = Infinity;

/**
 * Sum of data[base .. base + W) and, in {@link kernelMin}, its smallest value (NaN skipped).
 * A small function called once per row: V8 optimises it fully instead of patching the one long
 * loop of a function called once per frame. Four partial sums: one running sum is bound by the
 * latency of each addition.
 */
function sumAndMin(data: Float32Array, base: number, W: number): number {
  let mn = Infinity;
  let s0 = 0;
  let s1 = 0;
  let s2 = 0;
  let s3 = 0;
  let c = 0;
  for (; c + 3 < W; c += 4) {
    const r0 = data[base + c];
    const r1 = data[base + c + 1];
    const r2 = data[base + c + 2];
    const r3 = data[base + c + 3];
    if (r0 < mn) mn = r0;
    if (r1 < mn) mn = r1;
    if (r2 < mn) mn = r2;
    if (r3 < mn) mn = r3;
    s0 += r0;
    s1 += r1;
    s2 += r2;
    s3 += r3;
  }
  for (; c < W; c++) {
    const raw = data[base + c];
    if (raw < mn) mn = raw;
    s0 += raw;
  }
  kernelMin = mn;
  return s0 + s1 + s2 + s3;
}

/** {@link sumAndMin} without the minimum (the same four partial sums, so the same sum). */
function sumOnly(data: Float32Array, base: number, W: number): number {
  let s0 = 0;
  let s1 = 0;
  let s2 = 0;
  let s3 = 0;
  let c = 0;
  for (; c + 3 < W; c += 4) {
    s0 += data[base + c];
    s1 += data[base + c + 1];
    s2 += data[base + c + 2];
    s3 += data[base + c + 3];
  }
  for (; c < W; c++) s0 += data[base + c];
  return s0 + s1 + s2 + s3;
}

/** One pass over the whole frame: the dark-subtracted spatial profile and the bad-pixel census. */
export interface FrameCensus {
  /** Mean over the valid spectral pixels of each spatial row (dark-subtracted); NaN for a row with none. */
  profile: Float64Array;
  /** Pixels that are NaN in the frame or the dark. */
  nanCount: number;
  /** Every finite raw pixel is at or above the saturation level. */
  allSaturated: boolean;
  pixelCount: number;
}

/**
 * One pass over the frame. Sums are taken without a NaN test (NaN poisons a sum, which sends only
 * that row or column to a careful second look) and the minimum skips NaN for free (NaN never
 * compares below), so "all saturated" is "the smallest finite raw value reaches the level".
 */
export function frameCensus(frame: Frame, dark: Frame | undefined, geometry: AxisGeometry, saturationLevel: number): FrameCensus {
  const data = frame.data;
  const darkData = dark?.data;
  const W = frame.width;
  const H = frame.height;
  const alongRows = geometry.spectralStride === 1;
  // Spatial profile index: the frame row for spectralAxis 'x', the column for 'y'.
  const sums = new Float64Array(alongRows ? H : W);
  let minRaw = Infinity;
  for (let row = 0; row < H; row++) {
    const base = row * W;
    let sum = 0;
    let mn = Infinity;
    if (alongRows) {
      if (darkData) {
        for (let c = 0; c < W; c++) {
          const raw = data[base + c];
          if (raw < mn) mn = raw;
          sum += raw - darkData[base + c];
        }
      } else if (minRaw < saturationLevel) {
        // A pixel below the level is already found: "all saturated" is settled, the minimum unneeded.
        sum = sumOnly(data, base, W);
      } else {
        sum = sumAndMin(data, base, W);
        mn = kernelMin;
      }
      sums[row] = sum;
    } else if (darkData) {
      for (let c = 0; c < W; c++) {
        const raw = data[base + c];
        if (raw < mn) mn = raw;
        sums[c] += raw - darkData[base + c];
      }
    } else {
      for (let c = 0; c < W; c++) {
        const raw = data[base + c];
        if (raw < mn) mn = raw;
        sums[c] += raw;
      }
    }
    if (mn < minRaw) minRaw = mn;
  }
  const S = sums.length;
  const L = geometry.spectralLength;
  const profile = new Float64Array(S);
  let nanCount = 0;
  for (let s = 0; s < S; s++) {
    if (sums[s] === sums[s]) {
      profile[s] = sums[s] / L;
      continue;
    }
    // Careful look at a row/column holding NaN pixels (in the frame or the dark).
    let sum = 0;
    let count = 0;
    for (let p = 0; p < L; p++) {
      const i = s * geometry.spatialStride + p * geometry.spectralStride;
      const v = darkData ? data[i] - darkData[i] : data[i];
      if (v !== v) nanCount++;
      else {
        sum += v;
        count++;
      }
    }
    profile[s] = count > 0 ? sum / count : Number.NaN;
  }
  return { profile, nanCount, allSaturated: minRaw >= saturationLevel, pixelCount: data.length };
}

/**
 * The census's two refusals without its full pass, for a frame whose signal band is given (no
 * profile needed): both stop at the first pixel that settles them, which on a usable frame is
 * among the first. Same answers as {@link frameCensus}: every dark-subtracted pixel NaN; every
 * non-NaN raw pixel at or above the level.
 */
export function frameRefusals(frame: Frame, dark: Frame | undefined, saturationLevel: number): { allNaN: boolean; allSaturated: boolean } {
  const data = frame.data;
  const darkData = dark?.data;
  let allNaN = true;
  for (let i = 0; i < data.length; i++) {
    const v = darkData ? data[i] - darkData[i] : data[i];
    if (v === v) {
      allNaN = false;
      break;
    }
  }
  let allSaturated = true;
  for (let i = 0; i < data.length; i++) {
    if (data[i] < saturationLevel) {
      allSaturated = false;
      break;
    }
  }
  return { allNaN, allSaturated };
}
