/**
 * What a user would tell the assigner about a simulated driver, in the assigner's terms (1σ of the
 * measured wavelength, and the blue-shift allowance below it; assign/priors.ts):
 * - field scenarios state a symmetric ~1σ spread of the real centre, and the plasma blue-shifts
 *   by up to 1 %: σ = the stated tolerance, allowance 1 %;
 * - classic scenarios put the effective driver anywhere in [nominal·(1 − tol), nominal]: that is
 *   a blue-shift allowance of tol over a wavelength measured (almost) exactly.
 */
import type { SimDriver } from './types.ts';

export interface DriverPriorInput {
  driverTolerancePct: number;
  blueShiftPct: number;
}

/** Fraction of a classic scenario's window taken as the measurement's own 1σ (small: the window is the blue shift). */
const CLASSIC_SIGMA_FRACTION = 0.05;

export function driverPriorOf(driver: SimDriver): DriverPriorInput {
  if (driver.laserCentreNm !== undefined) return { driverTolerancePct: driver.tolerancePercent, blueShiftPct: 1 };
  return { driverTolerancePct: CLASSIC_SIGMA_FRACTION * driver.tolerancePercent, blueShiftPct: driver.tolerancePercent };
}
