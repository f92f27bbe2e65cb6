/**
 * What both scenario generators (scenarios.ts, field-scenarios.ts) do alike: a class's draft is
 * drawn, its expected lines are checked against the class's conditions, and it is redrawn from the
 * same stream until accepted, so a scenario is a function of its seed alone.
 */
import { EngineError } from '../errors.ts';
import type { FilterTransmissionFn } from './filters.ts';
import { expectedLines } from './render.ts';
import type { SimLine, SimScenario } from './types.ts';

/** A drawn scenario and its class's acceptance test on the expected (jitter-free) lines. */
export interface Draft {
  scenario: SimScenario;
  accept: (lines: SimLine[]) => boolean;
}

const FWHM_PER_SIGMA = 2 * Math.sqrt(2 * Math.LN2);

/** Photons in a line whose peak pixel holds `peakCounts` counts (separable Gaussians). */
export function photonsForPeak(peakCounts: number, gain: number, lineFwhmPx: number, spatialFwhmPx: number): number {
  return (peakCounts / gain) * 2 * Math.PI * (lineFwhmPx / FWHM_PER_SIGMA) * (spatialFwhmPx / FWHM_PER_SIGMA);
}

export function visibleFirstOrder(lines: SimLine[]): SimLine[] {
  return lines.filter((l) => l.visible && l.diffractionOrder === 1);
}

/** Adjacent visible first-order lines at least `factor` line widths apart. */
export function resolvable(lines: SimLine[], lineFwhmPx: number, factor: number): boolean {
  const v = visibleFirstOrder(lines);
  for (let k = 1; k < v.length; k += 1) if (v[k].pixel - v[k - 1].pixel < factor * lineFwhmPx) return false;
  return true;
}

/** The first draft `draw` makes that its class accepts, within `maxAttempts`; `what` names it in the error. */
export function firstAccepted(maxAttempts: number, draw: () => Draft | null, filterTransmission: FilterTransmissionFn | undefined, what: string): SimScenario {
  for (let attempt = 0; attempt < maxAttempts; attempt += 1) {
    const draft = draw();
    if (!draft) continue;
    const { lines } = expectedLines(draft.scenario, { filterTransmission });
    if (draft.accept(lines)) return draft.scenario;
  }
  throw new EngineError('invalid_input', `No acceptable ${what} in ${maxAttempts} draws.`);
}

/** `count` scenarios: scenario i has class classes[i mod n], so a list is a prefix of a longer one with the same seed. */
export function scenarioList<C>(count: number, classes: readonly C[], generate: (className: C, index: number) => SimScenario, noun: string): SimScenario[] {
  if (!Number.isInteger(count) || count < 0) throw new EngineError('invalid_input', `count must be a non-negative integer (got ${count}).`);
  if (classes.length === 0) throw new EngineError('invalid_input', `classes must name at least one ${noun} class.`);
  return Array.from({ length: count }, (_, i) => generate(classes[i % classes.length], i));
}
