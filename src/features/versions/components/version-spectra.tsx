import { Link } from 'react-router-dom';
import type { VersionSpectrum } from '../../../../shared/api/versions.ts';

/** The spectra a calibration version produced, newest first, each linked to its spectrum page with that version. */
export function VersionSpectra({ versionNumber, count, spectra }: { versionNumber: number; count: number; spectra: VersionSpectrum[] }) {
  if (count === 0) return <p className="text-sm text-slate-500">No spectra were made with this version yet.</p>;
  return (
    <div className="overflow-x-auto">
      <p className="mb-2 text-sm text-slate-600">
        {count} spectr{count === 1 ? 'um' : 'a'} made with version {versionNumber}
        {count > spectra.length ? `; the newest ${spectra.length} are listed` : ''}.
      </p>
      <table className="min-w-full text-sm">
        <thead className="text-left text-xs uppercase tracking-wide text-slate-500">
          <tr>
            <th className="py-1.5 pr-4 font-medium">frame</th>
            <th className="py-1.5 pr-4 font-medium">taken</th>
            <th className="py-1.5 pr-4 font-medium">made</th>
            <th className="py-1.5 pr-4 font-medium">marks</th>
          </tr>
        </thead>
        <tbody className="divide-y divide-slate-100">
          {spectra.map((s) => (
            <tr key={s.frameId}>
              <td className="py-1.5 pr-4">
                <Link className="text-accent-700 hover:underline" to={`/frames/${s.frameId}/spectrum?version=${versionNumber}`}>
                  {s.frameName}
                </Link>
              </td>
              <td className="py-1.5 pr-4 whitespace-nowrap text-slate-700">{new Date(s.takenAt).toLocaleString()}</td>
              <td className="py-1.5 pr-4 whitespace-nowrap text-slate-700">{new Date(s.madeAt).toLocaleString()}</td>
              <td className="py-1.5 pr-4 text-xs">
                {s.stale ? <span className="mr-1 rounded bg-slate-200 px-1.5 py-0.5 text-slate-700">stale</span> : null}
                {s.driftFlagged ? <span className="rounded bg-amber-100 px-1.5 py-0.5 text-amber-800">drift</span> : null}
              </td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
