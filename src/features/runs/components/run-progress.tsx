import type { Run } from '../../../../shared/api/runs.ts';

const stateTone: Record<Run['state'], string> = {
  queued: 'bg-slate-100 text-slate-700 ring-slate-300',
  running: 'bg-accent-50 text-accent-800 ring-accent-100',
  done: 'bg-emerald-50 text-emerald-800 ring-emerald-200',
  cancelled: 'bg-slate-100 text-slate-600 ring-slate-300',
  failed: 'bg-red-50 text-red-800 ring-red-200',
};

export function RunStateBadge({ state }: { state: Run['state'] }) {
  return <span className={`rounded px-2 py-0.5 text-xs font-medium ring-1 ${stateTone[state]}`} data-testid="run-state">{state}</span>;
}

/** Done (teal), failed (red) and cancelled (grey) as parts of one bar, with the counts in words. */
export function RunProgress({ run }: { run: Run }) {
  const total = Math.max(1, run.total);
  const pct = (n: number) => `${(100 * n) / total}%`;
  const finished = run.done + run.failed + run.cancelled;
  return (
    <div className="flex flex-col gap-2">
      <div
        role="progressbar"
        aria-label="Run progress"
        aria-valuemin={0}
        aria-valuemax={run.total}
        aria-valuenow={finished}
        className="flex h-3 w-full overflow-hidden rounded-full bg-slate-200"
        data-testid="run-progress"
      >
        <div className="h-full bg-accent-600 transition-[width] duration-500" style={{ width: pct(run.done) }} />
        <div className="h-full bg-red-500" style={{ width: pct(run.failed) }} />
        <div className="h-full bg-slate-400" style={{ width: pct(run.cancelled) }} />
      </div>
      <p className="text-sm text-slate-700 tabular-nums" data-testid="run-counts">
        {run.done} of {run.total} done
        {run.failed ? ` · ${run.failed} failed` : ''}
        {run.cancelled ? ` · ${run.cancelled} cancelled` : ''}
        {run.total - finished > 0 ? ` · ${run.total - finished} to go` : ''}
      </p>
    </div>
  );
}
