/** Drift flags counted per frame, not per spectrum: one frame may carry spectra of several versions. */
import type { SpectrumSummary } from '../../../../shared/api/spectra-list.ts';

/** Frames whose current (not stale) spectrum carries the drift flag. */
export function driftFlaggedFrameCount(items: readonly Pick<SpectrumSummary, 'frameId' | 'stale' | 'driftFlagged'>[]): number {
  return new Set(items.filter((s) => !s.stale && s.driftFlagged).map((s) => s.frameId)).size;
}
