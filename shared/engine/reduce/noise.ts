import { madSigmaInPlace } from './robust.ts';
import { type RowSource, rowIndex } from './strip.ts';
import type { SpatialBand } from '../types.ts';

/** Keep the MAD cheap on big bands: a strided sample of this many differences is plenty. */
const MAX_DIFFERENCES = 20_000;

/** A band of spatial rows and the source that holds them. */
export interface SourcedBand {
  source: RowSource;
  band: SpatialBand;
}

/**
 * Per-pixel noise floor (counts rms) from row-to-row differences inside the given bands:
 * σ = 1.4826 · MAD(x[s+1,p] − x[s,p]) / √2. Differences of neighbouring rows cancel the smooth
 * background and any bias pattern along the spectral axis; the MAD ignores cosmic hits and lines.
 * Reads the dark-subtracted values before outlier rejection. Returns NaN when fewer than two
 * rows are available.
 */
export function noiseFloorFromRows(bands: SourcedBand[]): number {
  let total = 0;
  for (const { source, band } of bands) {
    if (band.end - band.start >= 2) total += (band.end - band.start - 1) * source.spectralLength;
  }
  if (total === 0) return Number.NaN;
  const step = Math.max(1, Math.floor(total / MAX_DIFFERENCES));
  const diffs = new Float64Array(Math.ceil(total / step) + bands.length);
  let n = 0;
  for (const { source, band } of bands) {
    const L = source.spectralLength;
    const { raw, dark, rowStride } = source;
    // Every step-th vertical difference of the band's flat (row, pixel) index, row by row: p is
    // the next sample's pixel, carried over into the following row.
    let p = 0;
    for (let row = band.start; row < band.end - 1 && n < diffs.length; row++) {
      const base = rowIndex(source, row);
      if (dark) {
        for (; p < L && n < diffs.length; p += step) {
          const i = base + p;
          const j = i + rowStride;
          const d = Math.fround(raw[j] - dark[j]) - Math.fround(raw[i] - dark[i]);
          if (d === d) diffs[n++] = d;
        }
      } else {
        for (; p < L && n < diffs.length; p += step) {
          const d = raw[base + p + rowStride] - raw[base + p];
          if (d === d) diffs[n++] = d;
        }
      }
      p -= L;
    }
  }
  return n > 2 ? madSigmaInPlace(diffs, n) / Math.SQRT2 : Number.NaN;
}
