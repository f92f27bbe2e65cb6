/** Pins (user-fixed orders on peaks) derived from a hypothesis or typed by the user. */
import type { CalibratedPeak, HypothesisSummary } from '../../../../shared/engine/calibrate.ts';

export interface Pin {
  pixel: number;
  harmonic: number;
}

/**
 * The pin that makes a hypothesis the answer: its strongest labelled peak fixed at the order the
 * hypothesis gives it (one pin fixes the comb; the engine then labels the rest itself).
 */
export function pinFromHypothesis(h: HypothesisSummary, peaks: CalibratedPeak[]): Pin | null {
  let best = -1;
  for (let i = 0; i < peaks.length; i++) {
    if (h.harmonics[i] === null || h.harmonics[i] === undefined) continue;
    if (best < 0 || peaks[i].snr > peaks[best].snr) best = i;
  }
  if (best < 0) return null;
  return { pixel: Number(peaks[best].pixel.toFixed(2)), harmonic: h.harmonics[best] as number };
}

/** Adds or replaces the pin on a peak (pins closer than 1 px are the same peak). */
export function withPin(pins: Pin[], pin: Pin): Pin[] {
  return [...pins.filter((p) => Math.abs(p.pixel - pin.pixel) >= 1), pin].sort((a, b) => a.pixel - b.pixel);
}
