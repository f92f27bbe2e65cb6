/** Public surface of shared/analysis. */
export { AnalysisError } from './errors.ts';
export { linearLeastSquares, type LinearFit } from './linear-least-squares.ts';
export { fitSinusoid, detectPeriod, type SinusoidFit, type SinusoidOptions } from './sinusoid.ts';
export { fitPowerLaw, type PowerLawFit } from './power-law.ts';
export { computeDrift, exceedsThreshold, DEFAULT_DRIFT_THRESHOLD, type Drift, type DriftLine, type DriftThreshold, type DriftInput } from './drift.ts';
export { analyseScan, type ScanAnalysis, type ScanFrame, type ScanCurvePoint } from './scan.ts';
