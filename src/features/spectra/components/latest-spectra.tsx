import { Link } from 'react-router-dom';
import type { SpectrumSummary } from '../../../../shared/api/spectra-list.ts';
import { EmptyState } from '@/components/page';
import { groupSpectrumBursts, type SpectrumBurst } from '../lib/spectrum-bursts';

const shortTime = (iso: string) => new Date(iso).toLocaleTimeString(undefined, { hour: 'numeric', minute: '2-digit' });

const spectrumLink = (s: SpectrumSummary) => `/frames/${s.frameId}/spectrum?version=${s.version}`;

function Badges({ burst }: { burst: SpectrumBurst<SpectrumSummary> }) {
  const many = burst.items.length > 1;
  return (
    <div className="flex shrink-0 gap-1">
      {burst.driftFlagged > 0 ? (
        <span className="rounded bg-red-50 px-1.5 py-0.5 text-xs font-medium text-red-800 ring-1 ring-red-200" data-testid="drift-flag" title="The lines sit off the calibration: the detector may have moved">
          drift{many ? ` ×${burst.driftFlagged}` : ''}
        </span>
      ) : null}
      {burst.stale > 0 ? <span className="rounded bg-amber-100 px-1.5 py-0.5 text-xs font-medium text-amber-900">stale{many ? ` ×${burst.stale}` : ''}</span> : null}
    </div>
  );
}

/**
 * The newest spectra (by the frame's time), each linked to its spectrum page, drift flags marked.
 * Frames taken minutes apart (a scan) show as one line, so the daily spectra stay in view.
 */
export function LatestSpectra({ items, max = 5 }: { items: SpectrumSummary[]; max?: number }) {
  const bursts = groupSpectrumBursts(items).slice(0, max);
  if (bursts.length === 0) return <EmptyState>No spectra yet.</EmptyState>;
  return (
    <ul className="flex flex-col divide-y divide-slate-100 text-sm" aria-label="Latest spectra">
      {bursts.map((b) => (
        <li key={b.newest.id} className="flex items-center justify-between gap-2 py-1.5" data-testid="latest-spectrum">
          <div className="min-w-0">
            <Link to={spectrumLink(b.newest)} className="block truncate text-accent-700 hover:underline">
              {b.newest.frameName}
            </Link>
            <span className="text-xs text-slate-500 tabular-nums">
              {b.items.length > 1 ? (
                <>
                  {b.items.length} frames from{' '}
                  <Link to={spectrumLink(b.oldest)} className="hover:underline">
                    {b.oldest.frameName}
                  </Link>{' '}
                  · {new Date(b.oldest.takenAt).toLocaleDateString()} {shortTime(b.oldest.takenAt)}–{shortTime(b.newest.takenAt)}
                </>
              ) : (
                new Date(b.newest.takenAt).toLocaleString()
              )}{' '}
              · version {b.newest.version}
            </span>
          </div>
          <Badges burst={b} />
        </li>
      ))}
    </ul>
  );
}
