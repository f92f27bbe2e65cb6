/** Reduction stage: frame → lineout, and line-shape measurement. */
export { reduceFrame } from './reduce-frame.ts';
export type { ReduceOptions } from './options.ts';
export { estimateLineShape, type LineShapeEstimate, type LineShapeOptions } from './line-shape.ts';
