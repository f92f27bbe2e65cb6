/** Filter edges as anchors: between two harmonics (labels) and located on the data (the scale). See README.md. */
export { locateContinuumEdges, type ContinuumEdgeInput, type ContinuumEdgeOptions, type ContinuumEdgeResult, type EdgeSearch, type LineAt, type LocatedEdge, type ProvisionalMap } from './continuum-edge.ts';
export { reportEnvelopeEdges, type EdgeNeighbour, type EnvelopeEdgeInput, type EnvelopeEdgeReport, type EnvelopeLine, type EnvelopeVerdict } from './envelope-edge.ts';
export { findFilterEdges, type EdgeKnownLine, type FilterEdgeFindings, type FilterEdgeInput } from './filter-edges.ts';
