/**
 * Dispersion stage: fit and evaluate pixel → wavelength maps (empirical Chebyshev polynomial or
 * the physical grating equation), plus the NIST-tested polynomial least squares underneath.
 */
export { fitPolynomial, type FitPolynomialOptions, type PolynomialFit } from './polynomial-fit.ts';
export { fitPolynomialMap, type PolynomialMapFit, type PolynomialMapOptions, type PolynomialMapPoint } from './polynomial-map.ts';
export { fitGratingMap, type GratingMapFit, type GratingMapOptions, type GratingMapPoint } from './grating-fit.ts';
export {
  calibrationDispersionNmPerPixel,
  calibrationWavelengthToPixel,
  evaluateCalibration,
  GRATING_PARAMETERS,
  type EvaluatedCalibration,
  type GratingParameter,
} from './evaluate.ts';
