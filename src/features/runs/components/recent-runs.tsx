import { Link } from 'react-router-dom';
import type { RunSummary } from '../../../../shared/api/runs.ts';
import { EmptyState } from '@/components/page';
import { RunStateBadge } from './run-progress';

/** What a run did, in a few words: a scan, a re-apply, or a plain apply. */
function runTitle(run: RunSummary): string {
  if (run.kind === 'reapply') return 'Re-apply of stale spectra';
  if (run.scanVariable) return `Scan: ${run.scanVariable}`;
  return `Apply to ${run.total} frame${run.total === 1 ? '' : 's'}`;
}

/** The instrument's newest runs: what, who, when, a thin progress bar and the state. */
export function RecentRuns({ runs }: { runs: RunSummary[] }) {
  if (runs.length === 0) return <EmptyState>No runs yet.</EmptyState>;
  return (
    <ul className="flex flex-col gap-3" aria-label="Recent runs">
      {runs.map((run) => {
        const total = Math.max(1, run.total);
        return (
          <li key={run.id} data-testid="recent-run">
            <div className="flex items-baseline justify-between gap-2">
              <Link to={`/runs/${run.id}`} className="truncate text-sm font-medium text-accent-700 hover:underline">
                {runTitle(run)}
              </Link>
              <RunStateBadge state={run.state} />
            </div>
            <div className="mt-1 flex h-1.5 w-full overflow-hidden rounded-full bg-slate-200" aria-hidden="true">
              <div className="h-full bg-accent-600" style={{ width: `${(100 * run.done) / total}%` }} />
              <div className="h-full bg-red-500" style={{ width: `${(100 * run.failed) / total}%` }} />
              <div className="h-full bg-slate-400" style={{ width: `${(100 * run.cancelled) / total}%` }} />
            </div>
            <p className="mt-1 text-xs text-slate-500 tabular-nums">
              {run.done} of {run.total} done{run.failed ? ` · ${run.failed} failed` : ''} · {run.createdByName} · {new Date(run.createdAt).toLocaleString()}
            </p>
          </li>
        );
      })}
    </ul>
  );
}
