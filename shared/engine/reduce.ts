/** Reduction stage (frame → lineout): see `reduce/index.ts`. */
export {
  reduceFrame,
  estimateLineShape,
  type ReduceOptions,
  type LineShapeEstimate,
  type LineShapeOptions,
} from './reduce/index.ts';
