import { Link } from 'react-router-dom';
import type { SpectrumResponse } from '../../../../shared/api/spectra.ts';
import { Panel } from '@/components/page';
import type { SpectrumAxis } from '../lib/spectrum-axis';
import { DriftSummary } from './drift-summary';
import { OrdersTable } from './orders-table';
import { SpectrumChart } from './spectrum-chart';

/** Which calibration made this spectrum, with a link to the version and its stale mark. */
export function CalibrationUsed({ spectrum }: { spectrum: SpectrumResponse }) {
  const c = spectrum.calibration;
  return (
    <p className="flex flex-wrap items-center gap-2 text-sm" data-testid="calibration-used" data-version={c.version} data-stale={c.stale}>
      Calibrated with{' '}
      <Link to={`/versions/${c.versionId}`} className="font-medium text-accent-700 hover:underline">
        version {c.version}
      </Link>
      <span className="text-slate-500">({c.state})</span>
      {c.stale ? (
        <span className="rounded bg-amber-100 px-2 py-0.5 text-xs font-medium text-amber-900 ring-1 ring-amber-300" data-testid="stale-badge">
          stale: made before version {c.version} was {c.state}; re-apply to refresh
        </span>
      ) : null}
    </p>
  );
}

/** The chart, the per-order table, drift and the engine's notes for one spectrum. */
export function SpectrumPanels({ spectrum, axis, logIntensity = false }: { spectrum: SpectrumResponse; axis: SpectrumAxis; logIntensity?: boolean }) {
  return (
    <>
      <Panel title="Spectrum">
        <SpectrumChart spectrum={spectrum} axis={axis} logIntensity={logIntensity} />
        {spectrum.notes.length ? (
          <ul className="mt-3 list-disc pl-5 text-xs text-slate-600">
            {spectrum.notes.map((n) => (
              <li key={n}>{n}</li>
            ))}
          </ul>
        ) : null}
      </Panel>
      <div className="grid gap-6 lg:grid-cols-3 print:block">
        <Panel title="Orders" className="lg:col-span-2 print:mt-4">
          <OrdersTable spectrum={spectrum} />
        </Panel>
        <Panel title="Drift against the calibration" className="print:mt-4">
          <DriftSummary drift={spectrum.drift} />
        </Panel>
      </div>
    </>
  );
}
