import type { Version } from '../../../../shared/api/versions.ts';
import { EmptyState } from '@/components/page';
import { useVersionDetails } from '../api/get-version.ts';
import { DriftChart } from './drift-chart.tsx';
import { VersionDiffPlot } from './version-diff-plot.tsx';
import { VersionTimeline } from './version-timeline.tsx';
import { VersionsTable } from './versions-table.tsx';

/** The instrument page's calibration section: timeline, history, difference between two versions, drift. */
export function VersionsPanel({ versions }: { versions: Version[] }) {
  const details = useVersionDetails(versions.map((v) => v.id));
  const loaded = details.flatMap((d) => (d.data ? [d.data] : []));
  if (versions.length === 0) return <EmptyState>No calibration versions yet.</EmptyState>;
  return (
    <div className="flex flex-col gap-6">
      <VersionTimeline versions={versions} />
      <VersionsTable versions={versions} />
      {versions.length > 1 ? (
        <div className="grid gap-6 lg:grid-cols-2">
          <section>
            <h3 className="mb-2 text-sm font-semibold text-slate-800">Difference between two versions</h3>
            {loaded.length === versions.length ? <VersionDiffPlot versions={loaded} /> : <p className="text-sm text-slate-500">Loading calibrations…</p>}
          </section>
          <section>
            <h3 className="mb-2 text-sm font-semibold text-slate-800">Drift over versions</h3>
            {loaded.length === versions.length ? <DriftChart versions={loaded} /> : <p className="text-sm text-slate-500">Loading calibrations…</p>}
          </section>
        </div>
      ) : null}
    </div>
  );
}
