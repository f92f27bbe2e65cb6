import { Link } from 'react-router-dom';
import { ErrorAlert } from '@/components/alert';
import { Button } from '@/components/button';
import { EmptyState, Loading } from '@/components/page';
import { useInstrumentSpectra } from '../api/get-instrument-spectra';
import { useReapplyStale } from '../api/reapply-stale';

/**
 * Spectra made with a version that was superseded or withdrawn after they were made, and the one
 * action that re-applies them (each frame gets the version valid at its time now).
 */
export function StaleSpectraPanel({ instrumentId, mayReapply, onStarted }: { instrumentId: string; mayReapply: boolean; onStarted: (runId: string) => void }) {
  const stale = useInstrumentSpectra(instrumentId, true);
  const reapply = useReapplyStale(instrumentId);
  if (stale.isPending) return <Loading what="Looking for stale spectra" />;
  if (stale.isError) return <ErrorAlert error={stale.error} title="Could not list the spectra" />;
  const { items, staleFrames } = stale.data;
  if (items.length === 0) return <EmptyState>No stale spectra: every spectrum was made by a version that still stands.</EmptyState>;
  return (
    <div className="flex flex-col gap-4" data-testid="stale-spectra" data-count={items.length}>
      <div className="flex flex-wrap items-center justify-between gap-4">
        <p className="text-sm text-slate-700">
          {items.length} spectr{items.length === 1 ? 'um was' : 'a were'} made with a version since superseded or withdrawn
          {staleFrames < items.length ? ` (${staleFrames} frame${staleFrames === 1 ? '' : 's'} without a fresh spectrum)` : ''}.
        </p>
        {mayReapply && staleFrames > 0 ? (
          <Button pending={reapply.isPending} onClick={() => reapply.mutate(undefined, { onSuccess: (run) => onStarted(run.id) })}>
            Re-apply {staleFrames} stale spectr{staleFrames === 1 ? 'um' : 'a'}
          </Button>
        ) : null}
      </div>
      <ErrorAlert error={reapply.error} title="The re-apply did not start" />
      <div className="max-h-80 overflow-auto">
        <table className="w-full text-sm tabular-nums" aria-label="Stale spectra">
          <thead className="sticky top-0 bg-white">
            <tr className="border-b border-slate-200 text-left text-xs tracking-wide text-slate-500 uppercase">
              <th className="py-2 pr-4 font-medium">frame</th>
              <th className="py-2 pr-4 font-medium">taken</th>
              <th className="py-2 pr-4 font-medium">made with</th>
              <th className="py-2 font-medium">made</th>
            </tr>
          </thead>
          <tbody>
            {items.map((s) => (
              <tr key={s.id} className="border-b border-slate-100" data-testid="stale-row">
                <td className="py-1.5 pr-4">
                  <Link className="text-accent-700 hover:underline" to={`/frames/${s.frameId}/spectrum?version=${s.version}`}>
                    {s.frameName}
                  </Link>
                </td>
                <td className="py-1.5 pr-4">{new Date(s.takenAt).toLocaleString()}</td>
                <td className="py-1.5 pr-4">
                  <Link className="hover:underline" to={`/versions/${s.versionId}`}>
                    version {s.version}
                  </Link>{' '}
                  <span className="rounded bg-amber-100 px-1.5 py-0.5 text-xs font-medium text-amber-900">{s.versionState}</span>
                </td>
                <td className="py-1.5">{new Date(s.updatedAt).toLocaleString()}</td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
    </div>
  );
}
