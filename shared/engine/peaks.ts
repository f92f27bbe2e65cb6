/** Peak finding stage: see `peaks/index.ts`. */
export { findPeaks, fitGaussians, type PeakOptions, type GaussFitInput, type GaussFitResult } from './peaks/index.ts';
