import { Link } from 'react-router-dom';
import type { Version } from '../../../../shared/api/versions.ts';
import { calibrationStatus } from '../lib/calibration-status.ts';
import { VersionStateBadge } from './version-state-badge.tsx';

/** The calibration in force now, and the versions waiting for an owner's review. */
export function CalibrationNow({ versions }: { versions: Version[] }) {
  const { inForce, inReview } = calibrationStatus(versions, Date.now());
  return (
    <div className="flex flex-col gap-3 text-sm">
      {inForce ? (
        <div data-testid="version-in-force">
          <div className="flex items-center gap-2">
            <Link to={`/versions/${inForce.id}`} className="font-medium text-accent-700 hover:underline">
              Version {inForce.number}
            </Link>
            <VersionStateBadge state={inForce.state} />
          </div>
          <p className="mt-1 text-xs text-slate-500">valid from {new Date(inForce.validFrom).toLocaleString()}</p>
          {inForce.note ? <p className="mt-1 line-clamp-2 text-xs text-slate-600">{inForce.note}</p> : null}
        </div>
      ) : (
        <p className="text-slate-600">No approved calibration is in force now: spectra cannot be labelled.</p>
      )}
      {inReview.map((v) => (
        <div key={v.id} className="rounded-md border border-amber-200 bg-amber-50 px-3 py-2" data-testid="version-in-review">
          <div className="flex items-center gap-2">
            <Link to={`/versions/${v.id}`} className="font-medium text-accent-700 hover:underline">
              Version {v.number}
            </Link>
            <VersionStateBadge state={v.state} />
          </div>
          <p className="mt-1 text-xs text-amber-900">waiting for an owner · valid from {new Date(v.validFrom).toLocaleString()}</p>
        </div>
      ))}
    </div>
  );
}
