/** Plain-language failure of an analysis on unusable input (too few points, non-positive values…). */
export class AnalysisError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'AnalysisError';
  }
}
