/**
 * The simulator's public surface: scenarios, rendering, the nominal profile and file encoders.
 * Everything here is invented data for tests, evaluation, benchmark and demo.
 */
export type { SimContinuum, SimDriver, SimEnvelope, SimFilter, SimLine, SimResult, SimScenario, SimSpuriousPeak, SimTruth } from './types.ts';
export { simulateFrame, expectedLines, type SimulateOptions } from './render.ts';
export { generateScenario, generateScenarios, SCENARIO_CLASSES, type GenerateScenariosOptions, type ScenarioClass } from './scenarios.ts';
export { generateFieldScenario, generateFieldScenarios, FIELD_SCENARIO_CLASSES, unblendedSecondOrder, type FieldScenarioClass, type GenerateFieldScenariosOptions } from './field-scenarios.ts';
export { FIELD_RANGES, drawFieldDriver, drawGrazingGeometry, drawNominalProfile, detectorRangeEv, maxHarmonicEnergyEv } from './field-ranges.ts';
export { scenarioProfile } from './profile.ts';
export { encodeTiff, encodePng16, encodeFits, type TiffEncodeOptions } from './encode.ts';
export { filterStackTransmission, referenceFilterTransmission, steepestEdgeEv, type FilterTransmissionFn } from './filters.ts';
export { createRandom, mixSeed, Random } from './random.ts';
export { resolveScenario, type ResolvedScenario } from './options.ts';
export { driverPriorOf, type DriverPriorInput } from './driver-prior.ts';
