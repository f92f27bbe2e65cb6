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
    const { raw, dark } = source;
    // Strided walk over the band's flat (row, pixel) index: every step-th vertical difference.
    const count = (band.end - band.start - 1) * L;
    let row = band.start;
    let p = 0;
    for (let k = 0; k < count && n < diffs.length; k += step) {
      const i = rowIndex(source, row) + p;
      const j = i + source.rowStride;
      const d = dark ? Math.fround(raw[j] - dark[j]) - Math.fround(raw[i] - dark[i]) : raw[j] - raw[i];
      if (d === d) diffs[n++] = d;
      // Next sample without a division.
      p += step;
      while (p >= L) {
        p -= L;
        row++;
      }
    }
  }
  return n > 2 ? madSigmaInPlace(diffs, n) / Math.SQRT2 : Number.NaN;
}
