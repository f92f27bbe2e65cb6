/**
 * Known lines: "the peak near this pixel has this first-order photon energy" (an emission or
 * absorption line of known energy, or a harmonic measured elsewhere). Each is matched to one
 * detected peak and becomes an absolute anchor of the wavelength scale for the order assigner.
 */
import type { AssignInput } from './assign/index.ts';
import { HC_EV_NM } from './constants.ts';
import { EngineError } from './errors.ts';
import type { Peak, ScaleAnchor } from './types.ts';

/** A known line as the user states it. */
export interface KnownLine {
  /** Spectral pixel of the line, roughly (the nearest detected peak is taken). */
  pixel: number;
  /** First-order photon energy of the line, eV. */
  energyEv: number;
  /** Plain name, e.g. "Ar II" or "H23 measured on the reference spectrometer". @default "known line E eV" */
  label?: string;
}

/** Known lines matched to peaks: what the assigner takes, and what the calibration reports. */
export interface MatchedKnownLines {
  assignLines: NonNullable<AssignInput['knownLines']>;
  anchors: ScaleAnchor[];
}

/** The nearest peak counts only within max(MATCH_MIN_PX, MATCH_FWHM · its FWHM): a line is a few px wide (common practice). */
const MATCH_MIN_PX = 3;
const MATCH_FWHM = 2;
/** Energies that differ by less than this (relative) are the same line given twice. */
const SAME_ENERGY_RELATIVE = 1e-9;

function describe(line: KnownLine, start = 'the'): string {
  return `${start} known line at pixel ${line.pixel} (${line.energyEv} eV${line.label ? `, ${line.label}` : ''})`;
}

/**
 * Checks what can be checked without the data: finite positive energy, a pixel on the detector
 * (0 … pixelCount − 1, centres at integers). Throws EngineError('invalid_input') naming the line, with `details` { option: 'knownLines', index }.
 */
export function checkKnownLines(lines: readonly KnownLine[], pixelCount: number): void {
  lines.forEach((line, index) => {
    const details = { option: 'knownLines', index };
    if (!(Number.isFinite(line.energyEv) && line.energyEv > 0)) {
      throw new EngineError('invalid_input', `A known line needs a finite positive photon energy in eV; got ${line.energyEv} for the line at pixel ${line.pixel}.`, details);
    }
    if (!(Number.isFinite(line.pixel) && line.pixel >= -0.5 && line.pixel <= pixelCount - 0.5)) {
      throw new EngineError('invalid_input', `${describe(line, 'The')} is off the detector: its spectral pixels run from 0 to ${pixelCount - 1}.`, details);
    }
  });
}

/**
 * Matches every known line to the detected peak nearest its pixel and returns the assigner's
 * anchors at that peak's fitted centre and uncertainty. Throws EngineError('invalid_input') when
 * no peak lies close enough, or when two lines with different energies land on one peak (the
 * details name the entry, as for {@link checkKnownLines}).
 */
export function matchKnownLines(lines: readonly KnownLine[], peaks: readonly Peak[], pixelCount: number): MatchedKnownLines {
  checkKnownLines(lines, pixelCount);
  const byPeak = new Map<number, KnownLine>();
  lines.forEach((line, index) => {
    const details = { option: 'knownLines', index };
    let best = -1;
    for (let i = 0; i < peaks.length; i++) {
      if (best < 0 || Math.abs(peaks[i].pixel - line.pixel) < Math.abs(peaks[best].pixel - line.pixel)) best = i;
    }
    const reach = best < 0 ? 0 : Math.max(MATCH_MIN_PX, MATCH_FWHM * (Number.isFinite(peaks[best].fwhmPx) ? peaks[best].fwhmPx : 0));
    if (best < 0 || Math.abs(peaks[best].pixel - line.pixel) > reach) {
      const nearest = best < 0 ? 'no peaks were detected' : `the nearest detected peak is at pixel ${peaks[best].pixel.toFixed(2)}`;
      throw new EngineError('invalid_input', `No detected peak within ${reach.toFixed(1)} px of ${describe(line)}: ${nearest}.`, details);
    }
    const previous = byPeak.get(best);
    if (previous && Math.abs(previous.energyEv - line.energyEv) > SAME_ENERGY_RELATIVE * line.energyEv) {
      throw new EngineError(
        'invalid_input',
        `${describe(previous, 'The')} and ${describe(line)} both land on the peak at pixel ${peaks[best].pixel.toFixed(2)} with different energies; give one energy per peak.`,
        details,
      );
    }
    if (!previous || (!previous.label && line.label)) byPeak.set(best, line);
  });
  const matched = [...byPeak.entries()].sort((a, b) => peaks[a[0]].pixel - peaks[b[0]].pixel);
  const assignLines: MatchedKnownLines['assignLines'] = [];
  const anchors: ScaleAnchor[] = [];
  for (const [index, line] of matched) {
    const peak = peaks[index];
    const label = line.label?.trim() || `known line ${line.energyEv} eV`;
    assignLines.push({ wavelengthNm: HC_EV_NM / line.energyEv, pixel: peak.pixel, pixelSigma: peak.pixelSigma, label });
    // The user states the energy as exact; the anchor's uncertainty is the peak's centroid.
    anchors.push({ kind: 'known-line', label, pixel: peak.pixel, pixelSigma: peak.pixelSigma, energyEv: line.energyEv, energySigmaEv: 0 });
  }
  return { assignLines, anchors };
}
