import type { Frame } from '../../../../../shared/engine/types.ts';

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

/** A band of spatial rows copied out of the frame with the dark subtracted: `values[r·L + p]`. */
export interface Strip {
  start: number;
  rows: number;
  spectralLength: number;
  values: Float32Array;
  /** 1 where the raw (pre-dark) pixel reached the saturation level. */
  saturated: Uint8Array;
}

/** Copies spatial rows [start, end) out of the frame, dark-subtracted, in spectral-contiguous order. */
export function extractStrip(
  frame: Frame,
  dark: Frame | undefined,
  geometry: AxisGeometry,
  start: number,
  end: number,
  saturationLevel: number,
): Strip {
  const L = geometry.spectralLength;
  const rows = end - start;
  const values = new Float32Array(rows * L);
  const saturated = new Uint8Array(rows * L);
  const data = frame.data;
  const darkData = dark?.data;
  if (geometry.spectralStride === 1) {
    for (let r = 0; r < rows; r++) {
      const base = (start + r) * geometry.spatialStride;
      const out = r * L;
      for (let p = 0; p < L; p++) {
        const raw = data[base + p];
        if (raw >= saturationLevel) saturated[out + p] = 1;
        values[out + p] = darkData ? raw - darkData[base + p] : raw;
      }
    }
  } else {
    // Spectral axis along frame rows: walk the frame row by row (contiguous reads) and scatter
    // the few band columns into the strip.
    const W = frame.width;
    for (let p = 0; p < L; p++) {
      const base = p * W + start;
      for (let r = 0; r < rows; r++) {
        const raw = data[base + r];
        const out = r * L + p;
        if (raw >= saturationLevel) saturated[out] = 1;
        values[out] = darkData ? raw - darkData[base + r] : raw;
      }
    }
  }
  return { start, rows, spectralLength: L, values, saturated };
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
      } else {
        for (let c = 0; c < W; c++) {
          const raw = data[base + c];
          if (raw < mn) mn = raw;
          sum += raw;
        }
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
