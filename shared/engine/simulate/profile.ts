/** The nominal instrument profile a user would give for a simulated scenario. */
import type { InstrumentProfile } from '../types.ts';
import type { SimScenario } from './types.ts';

/**
 * The NOMINAL profile (PROFILE.json) of `scenario`: what the engine is allowed to see. A copy, so
 * callers may edit it; the true geometry stays in `scenario.geometry`.
 */
export function scenarioProfile(scenario: SimScenario): InstrumentProfile {
  return { ...scenario.profile };
}
