/**
 * Resolves a scenario's optional fields to their defaults and checks the values, in one place,
 * with plain-language errors (EngineError 'invalid_input').
 */
import { EngineError } from '../errors.ts';
import type { LineShape } from '../types.ts';
import type { SimFilter, SimScenario, SimSpuriousPeak } from './types.ts';

/** A scenario with every optional field filled in. */
export interface ResolvedScenario extends SimScenario {
  evenRelativeStrength: number;
  missingHarmonics: number[];
  missingRelativeStrength: number;
  filters: SimFilter[];
  secondOrderRelativeStrength: number;
  thirdOrderRelativeStrength: number;
  maxDiffractionOrder: number;
  divergenceExponent: number;
  lineShape: LineShape;
  pedestalCounts: number;
  readNoiseCounts: number;
  gainCountsPerPhoton: number;
  hotPixelFraction: number;
  hotPixelCounts: number;
  cosmicRayCount: number;
  spuriousPeaks: SimSpuriousPeak[];
  bitDepth: 16 | 'float';
  fullScaleCounts: number;
  visibleSnr: number;
  plateauStartHarmonic: number;
  rollOffOrders: number;
  jitterRelative: number;
}

/** Largest frame side the simulator renders, px (a guard against typos, not a physical limit). */
export const MAX_SIM_SIDE_PX = 16384;

function fail(field: string, why: string): never {
  throw new EngineError('invalid_input', `Scenario field ${field} ${why}.`, { field });
}

function finite(field: string, value: number, min = -Infinity, max = Infinity): void {
  if (!Number.isFinite(value) || value < min || value > max) fail(field, `must be a finite number in [${min}, ${max}] (got ${value})`);
}

/** Fills defaults (see the @default tags on SimScenario) and checks ranges. */
export function resolveScenario(scenario: SimScenario): ResolvedScenario {
  const s = scenario;
  for (const [field, value] of [['width', s.width], ['height', s.height]] as const) {
    if (!Number.isInteger(value) || value < 2 || value > MAX_SIM_SIDE_PX) fail(field, `must be an integer from 2 to ${MAX_SIM_SIDE_PX} (got ${value})`);
  }
  if (s.spectralAxis !== 'x' && s.spectralAxis !== 'y') fail('spectralAxis', "must be 'x' or 'y'");
  if (s.parity !== 'odd' && s.parity !== 'all') fail('parity', "must be 'odd' or 'all'");
  finite('driver.effectiveNm', s.driver.effectiveNm, 1e-3);
  finite('driver.nominalNm', s.driver.nominalNm, 1e-3);
  finite('geometry.grooveDensityPerMm', s.geometry.grooveDensityPerMm, 1e-6);
  finite('geometry.detectorDistanceMm', s.geometry.detectorDistanceMm, 1e-6);
  finite('geometry.pixelPitchUm', s.geometry.pixelPitchUm, 1e-6);
  finite('geometry.incidenceAngleDeg', s.geometry.incidenceAngleDeg, -90, 90);
  finite('geometry.detectorAngleDeg', s.geometry.detectorAngleDeg, -90, 90);
  finite('envelope.plateauPhotons', s.envelope.plateauPhotons, 0);
  finite('envelope.cutoffHarmonic', s.envelope.cutoffHarmonic, 0);
  finite('lineFwhmPx', s.lineFwhmPx, 0.05, 1000);
  finite('spatialFwhmPx', s.spatialFwhmPx, 0.05, 1e5);
  finite('spatialReferenceHarmonic', s.spatialReferenceHarmonic, 1e-6);
  finite('spatialCentrePx', s.spatialCentrePx);
  for (const [q, weight] of Object.entries(s.harmonicWeights ?? {})) finite(`harmonicWeights[${q}]`, weight, 0);
  const bitDepth = s.bitDepth ?? 16;
  if (bitDepth !== 16 && bitDepth !== 'float') fail('bitDepth', "must be 16 or 'float'");
  const typeMax = bitDepth === 16 ? 65535 : Infinity;
  const fullScaleCounts = Math.min(s.fullScaleCounts ?? typeMax, typeMax);
  if (!(fullScaleCounts > 0)) fail('fullScaleCounts', 'must be positive');
  const resolved: ResolvedScenario = {
    ...s,
    evenRelativeStrength: s.evenRelativeStrength ?? 1,
    missingHarmonics: s.missingHarmonics ?? [],
    missingRelativeStrength: s.missingRelativeStrength ?? 0.01,
    filters: s.filters ?? [],
    secondOrderRelativeStrength: s.secondOrderRelativeStrength ?? 0.05,
    thirdOrderRelativeStrength: s.thirdOrderRelativeStrength ?? (s.secondOrderRelativeStrength ?? 0.05) ** 2,
    maxDiffractionOrder: s.maxDiffractionOrder ?? 2,
    divergenceExponent: s.divergenceExponent ?? 0.5,
    lineShape: s.lineShape ?? { tiltPxPerPx: 0, curvaturePxPerPx2: 0 },
    pedestalCounts: s.pedestalCounts ?? 100,
    readNoiseCounts: s.readNoiseCounts ?? 3,
    gainCountsPerPhoton: s.gainCountsPerPhoton ?? 1,
    hotPixelFraction: s.hotPixelFraction ?? 0,
    hotPixelCounts: s.hotPixelCounts ?? 5000,
    cosmicRayCount: s.cosmicRayCount ?? 0,
    spuriousPeaks: s.spuriousPeaks ?? [],
    bitDepth,
    fullScaleCounts,
    visibleSnr: s.visibleSnr ?? 5,
    plateauStartHarmonic: s.envelope.plateauStartHarmonic ?? 1,
    rollOffOrders: s.envelope.rollOffOrders ?? 3,
    jitterRelative: s.envelope.jitterRelative ?? 0.15,
  };
  finite('evenRelativeStrength', resolved.evenRelativeStrength, 0);
  finite('secondOrderRelativeStrength', resolved.secondOrderRelativeStrength, 0);
  finite('thirdOrderRelativeStrength', resolved.thirdOrderRelativeStrength, 0);
  if (!Number.isInteger(resolved.maxDiffractionOrder) || resolved.maxDiffractionOrder < 1 || resolved.maxDiffractionOrder > 5) fail('maxDiffractionOrder', 'must be an integer from 1 to 5');
  finite('readNoiseCounts', resolved.readNoiseCounts, 0);
  finite('gainCountsPerPhoton', resolved.gainCountsPerPhoton, 1e-6);
  finite('hotPixelFraction', resolved.hotPixelFraction, 0, 0.1);
  finite('rollOffOrders', resolved.rollOffOrders, 1e-3);
  finite('jitterRelative', resolved.jitterRelative, 0, 2);
  for (const f of resolved.filters) finite(`filters[${f.material}].thicknessNm`, f.thicknessNm, 0);
  resolved.spuriousPeaks.forEach((p, i) => {
    if (p.spatialFwhmPx !== undefined) finite(`spuriousPeaks[${i}].spatialFwhmPx`, p.spatialFwhmPx, 0.05, 1e5);
  });
  return resolved;
}
