import type { VersionHistoryEntry } from '../../../../shared/api/versions.ts';
import { VersionStateBadge } from './version-state-badge.tsx';

/** Every state change of a version: who, when, from what to what, and why. */
export function VersionHistory({ history }: { history: VersionHistoryEntry[] }) {
  if (history.length === 0) return <p className="text-sm text-slate-500">No changes recorded.</p>;
  return (
    <ol className="flex flex-col gap-2 text-sm" aria-label="History">
      {history.map((h, i) => (
        <li key={i} className="flex flex-wrap items-center gap-2 border-l-2 border-slate-200 pl-3">
          <span className="text-slate-500 tabular-nums">{new Date(h.at).toLocaleString()}</span>
          {h.from ? <VersionStateBadge state={h.from} /> : null}
          {h.from ? <span aria-hidden>→</span> : null}
          <VersionStateBadge state={h.to} />
          <span className="text-slate-700">{h.by ? h.by.name || h.by.email : 'system'}</span>
          {h.comment ? <span className="text-slate-600 italic">“{h.comment}”</span> : null}
        </li>
      ))}
    </ol>
  );
}
