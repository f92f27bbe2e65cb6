/**
 * What fixed a calibration's absolute wavelength scale, and by how much, in one plain sentence:
 * the note `calibrateFrame` adds and the sentence the workbench and reports show.
 */
import { HC_EV_NM } from './constants.ts';
import { evaluateCalibration } from './dispersion/index.ts';
import type { Calibration, ScaleAnchor } from './types.ts';

/** Two significant digits: enough to compare uncertainties, no false precision. */
function twoDigits(value: number): string {
  return Number.isFinite(value) ? value.toPrecision(2) : '?';
}

function percent(relative: number): string {
  return `±${twoDigits(100 * relative)} %`;
}

/** "1 known line and 1 filter edge": what anchored the scale, by kind. */
export function anchorKindWords(anchors: readonly ScaleAnchor[]): string {
  const lines = anchors.filter((a) => a.kind === 'known-line').length;
  const edges = anchors.length - lines;
  const parts: string[] = [];
  if (lines > 0) parts.push(`${lines} known line${lines === 1 ? '' : 's'}`);
  if (edges > 0) parts.push(`${edges} filter edge${edges === 1 ? '' : 's'}`);
  return parts.join(' and ');
}

/**
 * 1σ of the photon energy the map gives at each anchor's pixel, eV: the map's whole band there
 * (centroids and scale), E·σλ/λ.
 */
export function anchorEnergySigmasEv(calibration: Calibration, anchors: readonly ScaleAnchor[]): number[] {
  if (anchors.length === 0) return [];
  const { wavelengthNm, wavelengthSigmaNm } = evaluateCalibration(calibration, anchors.map((a) => a.pixel));
  return anchors.map((_, i) => (HC_EV_NM / wavelengthNm[i]) * (wavelengthSigmaNm[i] / wavelengthNm[i]));
}

/** The sentence. Uncertainties are 1σ; `unanchoredScaleSigmaRelative` absent (older files) leaves out the comparison. */
export function describeAbsoluteScale(calibration: Calibration): string {
  const anchors = calibration.anchors ?? [];
  const alone = calibration.unanchoredScaleSigmaRelative;
  if (calibration.absoluteScale === 'anchored' && anchors.length > 0) {
    const where = anchors.map((a) => `${a.label} at px ${a.pixel.toFixed(1)}`).join('; ');
    const sigmas = anchorEnergySigmasEv(calibration, anchors).map((s) => `±${twoDigits(s)} eV`);
    const atLines = anchors.length === 1 ? `${sigmas[0]} at the ${anchors[0].kind === 'known-line' ? 'line' : 'edge'}` : `${sigmas.join(', ')} at them`;
    const bought = alone === undefined ? '' : `; the driver tolerance alone would leave ${percent(alone)}`;
    return `Scale anchored by ${anchorKindWords(anchors)} (${where}): ${atLines}, ${percent(calibration.scaleSigmaRelative)} of the scale (1σ)${bought}.`;
  }
  if (calibration.absoluteScale === 'anchored') {
    return `Scale anchored (${percent(calibration.scaleSigmaRelative)} of the scale, 1σ); this calibration does not list what anchored it.`;
  }
  return `Scale not anchored: known only to the driver tolerance (${percent(calibration.scaleSigmaRelative)}, 1σ). A known line, or a filter edge on a continuum, would pin it.`;
}
