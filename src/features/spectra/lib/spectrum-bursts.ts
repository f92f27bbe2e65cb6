/**
 * Spectra taken in quick succession (a scan, a burst of shots) folded into one group, so a
 * 24-frame scan does not push the day-to-day spectra off a short list. Items must come newest
 * first (as the spectra list returns them); a group ends where the gap to the next older frame
 * exceeds `maxGapMs` or the version changes.
 */
import type { SpectrumSummary } from '../../../../shared/api/spectra-list.ts';

export interface SpectrumBurst<T> {
  /** Newest first, as given. */
  items: T[];
  newest: T;
  oldest: T;
  driftFlagged: number;
  stale: number;
}

/** Default gap: ten minutes (a scan's frames come minutes apart, daily frames a day apart). */
export const BURST_GAP_MS = 10 * 60 * 1000;

export function groupSpectrumBursts<T extends Pick<SpectrumSummary, 'takenAt' | 'version' | 'driftFlagged' | 'stale'>>(items: readonly T[], maxGapMs = BURST_GAP_MS): SpectrumBurst<T>[] {
  const groups: T[][] = [];
  for (const item of items) {
    const current = groups.at(-1);
    const last = current?.at(-1);
    if (current && last && last.version === item.version && Math.abs(Date.parse(last.takenAt) - Date.parse(item.takenAt)) <= maxGapMs) current.push(item);
    else groups.push([item]);
  }
  return groups.map((g) => ({
    items: g,
    newest: g[0]!,
    oldest: g.at(-1)!,
    driftFlagged: g.filter((s) => s.driftFlagged).length,
    stale: g.filter((s) => s.stale).length,
  }));
}
