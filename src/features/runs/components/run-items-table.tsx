import { Link } from 'react-router-dom';
import type { RunItem } from '../../../../shared/api/runs.ts';

const tone: Record<RunItem['state'], string> = {
  queued: 'text-slate-500',
  running: 'text-accent-700',
  done: 'text-emerald-700',
  failed: 'text-red-700',
  cancelled: 'text-slate-400',
};

/** One row per frame of the run: state, the version used, attempts, and the failure message. */
export function RunItemsTable({ items }: { items: RunItem[] }) {
  return (
    <div className="max-h-96 overflow-auto">
      <table className="w-full text-sm tabular-nums" aria-label="Run items">
        <thead className="sticky top-0 bg-white">
          <tr className="border-b border-slate-200 text-left text-xs tracking-wide text-slate-500 uppercase">
            <th className="py-2 pr-4 font-medium">frame</th>
            <th className="py-2 pr-4 font-medium">state</th>
            <th className="py-2 pr-4 font-medium">version</th>
            <th className="py-2 pr-4 font-medium">attempts</th>
            <th className="py-2 font-medium">message</th>
          </tr>
        </thead>
        <tbody>
          {items.map((item) => (
            <tr key={item.frameId} className="border-b border-slate-100" data-testid="run-item" data-state={item.state}>
              <td className="py-1.5 pr-4">
                {item.state === 'done' ? (
                  <Link className="text-accent-700 hover:underline" to={`/frames/${item.frameId}/spectrum${item.version ? `?version=${item.version}` : ''}`}>
                    {item.frameId.slice(0, 8)}
                  </Link>
                ) : (
                  <Link className="text-slate-700 hover:underline" to={`/frames/${item.frameId}`}>
                    {item.frameId.slice(0, 8)}
                  </Link>
                )}
              </td>
              <td className={`py-1.5 pr-4 font-medium ${tone[item.state]}`}>{item.state}</td>
              <td className="py-1.5 pr-4">{item.version ?? '—'}</td>
              <td className="py-1.5 pr-4">{item.attempts}</td>
              <td className="py-1.5 text-slate-600">{item.message ?? ''}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
