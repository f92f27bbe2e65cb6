/**
 * The assigner's physical model: the grating equation with a flat, possibly tilted detector
 * (grating.ts), written as a parameter vector so that the search can free parameters one group
 * at a time. Realignment ranges enter as soft walls: zero cost inside the range, a steep
 * quadratic outside, appended to the residuals.
 */
import { wavelengthToPixel } from '../grating.ts';
import type { GratingGeometry } from '../types.ts';
import { levenbergMarquardt } from '../fit/levenberg-marquardt.ts';

/** Indices into the full parameter vector. */
export const P_CENTER = 0;
export const P_ANGLE = 1;
export const P_INCIDENCE = 2;
export const P_DISTANCE = 3;
export const P_DRIVER = 4;
export const P_TILT = 5;
export const PARAMETER_COUNT = 6;
export const PARAMETER_NAMES = ['detectorCenterPixel', 'detectorAngleDeg', 'incidenceAngleDeg', 'detectorDistanceMm', 'driverNm', 'detectorTiltDeg'];

/** A soft wall: free inside [lo, hi]; outside, each `softness` beyond the wall costs 1 in χ². */
export interface Wall {
  lo: number;
  hi: number;
  softness: number;
}

/** Everything fixed about one assignment problem. */
export interface ModelContext {
  grooveDensityPerMm: number;
  pixelPitchUm: number;
  wavelengthIncreasesWithPixel: boolean;
  pixelCount: number;
  /** Nominal (prior centre) values of the full parameter vector. */
  nominal: Float64Array;
  /** One wall per parameter; null = unbounded. */
  walls: (Wall | null)[];
  /** Forward-difference steps per parameter. */
  steps: Float64Array;
}

/** One point the model must pass through: first-order wavelength = scale · λ0 + fixedNm at `pixel`. */
export interface ModelPoint {
  pixel: number;
  sigmaPx: number;
  /** diffractionOrder / harmonic for a harmonic line; 0 for a line of known wavelength. */
  scale: number;
  /** diffractionOrder · wavelength of a known line; 0 for a harmonic. */
  fixedNm: number;
}

export function geometryOf(ctx: ModelContext, p: ArrayLike<number>): GratingGeometry {
  return {
    grooveDensityPerMm: ctx.grooveDensityPerMm,
    pixelPitchUm: ctx.pixelPitchUm,
    wavelengthIncreasesWithPixel: ctx.wavelengthIncreasesWithPixel,
    detectorCenterPixel: p[P_CENTER],
    detectorAngleDeg: p[P_ANGLE],
    incidenceAngleDeg: p[P_INCIDENCE],
    detectorDistanceMm: p[P_DISTANCE],
    detectorTiltDeg: p[P_TILT],
  };
}

/** Pixel of first-order wavelength `lambda1Nm` under parameters `p` (NaN if it misses the detector plane). */
export function predictPixel(ctx: ModelContext, p: ArrayLike<number>, lambda1Nm: number): number {
  return wavelengthToPixel(geometryOf(ctx, p), lambda1Nm, 1);
}

export function wallResidual(w: Wall | null, x: number): number {
  if (!w) return 0;
  if (x < w.lo) return (w.lo - x) / w.softness;
  if (x > w.hi) return (x - w.hi) / w.softness;
  return 0;
}

export interface ModelFit {
  parameters: Float64Array;
  /** Σ ((pixel − predicted) / σ)² over the points. */
  chiSquarePosition: number;
  /** Σ wall residual² over the free parameters. */
  chiSquarePrior: number;
  residualsPx: Float64Array;
  /** Covariance of the free parameters (unscaled, from JᵀJ), row-major; null if singular. */
  covariance: Float64Array | null;
  freeIndices: number[];
}

const MISS_RESIDUAL = 1e4;

/** Fit the free parameters (mask) to the points from `start`; never throws. */
export function fitModel(ctx: ModelContext, points: ModelPoint[], start: ArrayLike<number>, free: number[]): ModelFit {
  const full = Float64Array.from(start);
  const nPoints = points.length;
  const nFree = free.length;
  const steps = new Float64Array(nFree);
  for (let j = 0; j < nFree; j++) steps[j] = ctx.steps[free[j]];
  const geometry = geometryOf(ctx, full);
  const apply = (q: Float64Array): void => {
    for (let j = 0; j < nFree; j++) full[free[j]] = q[j];
    geometry.detectorCenterPixel = full[P_CENTER];
    geometry.detectorAngleDeg = full[P_ANGLE];
    geometry.incidenceAngleDeg = full[P_INCIDENCE];
    geometry.detectorDistanceMm = full[P_DISTANCE];
    geometry.detectorTiltDeg = full[P_TILT];
  };
  const problem = {
    residualCount: nPoints + nFree,
    residuals(q: Float64Array, out: Float64Array): void {
      apply(q);
      const lambda0 = full[P_DRIVER];
      for (let i = 0; i < nPoints; i++) {
        const pt = points[i];
        const pred = wavelengthToPixel(geometry, pt.scale * lambda0 + pt.fixedNm, 1);
        out[i] = Number.isFinite(pred) ? (pt.pixel - pred) / pt.sigmaPx : MISS_RESIDUAL;
      }
      for (let j = 0; j < nFree; j++) out[nPoints + j] = wallResidual(ctx.walls[free[j]], q[j]);
    },
  };
  const q0 = new Float64Array(nFree);
  for (let j = 0; j < nFree; j++) q0[j] = full[free[j]];
  // Forward differences with the context's steps. Hypotheses are told apart by χ² differences of
  // order 1 to 16 (ENGINE-NOTES.md), so χ² to 1e-6 relative plus 1e-6 absolute (exact points take
  // χ² to ≈ 0, where a relative test alone would never stop) is ample, and keeps the search fast.
  const lm = nFree > 0 ? levenbergMarquardt(problem, q0, { steps, maxIterations: 60, ftol: 1e-6, ftolAbsolute: 1e-6 }) : null;
  const qBest = lm ? lm.parameters : q0;
  apply(qBest);
  const parameters = Float64Array.from(full);
  const residualsPx = new Float64Array(nPoints);
  let chiPos = 0;
  for (let i = 0; i < nPoints; i++) {
    const pt = points[i];
    const pred = wavelengthToPixel(geometry, pt.scale * parameters[P_DRIVER] + pt.fixedNm, 1);
    residualsPx[i] = Number.isFinite(pred) ? pt.pixel - pred : MISS_RESIDUAL;
    chiPos += (residualsPx[i] / pt.sigmaPx) ** 2;
  }
  let chiPrior = 0;
  for (let j = 0; j < nFree; j++) chiPrior += wallResidual(ctx.walls[free[j]], qBest[j]) ** 2;
  return {
    parameters,
    chiSquarePosition: chiPos,
    chiSquarePrior: chiPrior,
    residualsPx,
    covariance: lm ? lm.covariance : null,
    freeIndices: free.slice(),
  };
}
