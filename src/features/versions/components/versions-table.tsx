import { Link } from 'react-router-dom';
import type { Version } from '../../../../shared/api/versions.ts';
import { VersionStateBadge } from './version-state-badge.tsx';

const when = (iso: string | null) => (iso ? new Date(iso).toLocaleString() : 'open');

/** The version history as rows, newest first: state, validity, model, driver, residual. */
export function VersionsTable({ versions }: { versions: Version[] }) {
  return (
    <div className="overflow-x-auto">
      <table className="w-full text-sm tabular-nums" aria-label="Versions">
        <thead>
          <tr className="border-b border-slate-200 text-left text-slate-500">
            <th className="py-1.5 pr-3 font-medium">version</th>
            <th className="py-1.5 pr-3 font-medium">state</th>
            <th className="py-1.5 pr-3 font-medium">valid from</th>
            <th className="py-1.5 pr-3 font-medium">valid until</th>
            <th className="py-1.5 pr-3 font-medium">model</th>
            <th className="py-1.5 pr-3 font-medium">driver (nm)</th>
            <th className="py-1.5 pr-3 font-medium">peaks</th>
            <th className="py-1.5 pr-3 font-medium">rms (px)</th>
          </tr>
        </thead>
        <tbody>
          {versions.map((v) => (
            <tr key={v.id} className="border-b border-slate-100" data-testid="version-row">
              <td className="py-1.5 pr-3">
                <Link className="font-medium text-accent-700 hover:underline" to={`/versions/${v.id}`}>
                  Version {v.number}
                </Link>
              </td>
              <td className="py-1.5 pr-3">
                <VersionStateBadge state={v.state} />
              </td>
              <td className="py-1.5 pr-3">{when(v.validFrom)}</td>
              <td className="py-1.5 pr-3" data-testid="valid-until">
                {v.state === 'superseded' && v.supersededAt ? `superseded ${when(v.supersededAt)}` : when(v.validUntil)}
              </td>
              <td className="py-1.5 pr-3">{v.model}</td>
              <td className="py-1.5 pr-3">{v.driverNm.toFixed(2)}</td>
              <td className="py-1.5 pr-3">{v.peakCount}</td>
              <td className="py-1.5 pr-3">{v.rmsResidualPx.toFixed(3)}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
