import { Link, useParams, useSearchParams } from 'react-router-dom';
import { useQuery } from '@tanstack/react-query';
import { instrumentQueryOptions } from '@/features/instruments/api/get-instrument';
import { useVersion } from '@/features/versions/api/get-version';
import { VersionHistory } from '@/features/versions/components/version-history';
import { MapPlot } from '@/features/workbench/components/map-plot';
import { PeaksTable } from '@/features/workbench/components/peaks-table';
import { ResidualsPlot } from '@/features/workbench/components/residuals-plot';
import { useSpectrum } from '@/features/spectra/api/get-spectrum';
import { DriftSummary } from '@/features/spectra/components/drift-summary';
import { OrdersTable } from '@/features/spectra/components/orders-table';
import { SpectrumChart } from '@/features/spectra/components/spectrum-chart';
import type { SpectrumAxis } from '@/features/spectra/lib/spectrum-axis';
import { ErrorAlert } from '@/components/alert';
import { Button } from '@/components/button';
import { Loading } from '@/components/page';
import { describeAbsoluteScale } from '../../../shared/engine/scale-note.ts';

const when = (iso: string | null) => (iso ? new Date(iso).toLocaleString() : 'open end');

function Section({ title, children }: { title: string; children: React.ReactNode }) {
  return (
    <section className="break-inside-avoid border-t border-slate-300 pt-4">
      <h2 className="mb-3 text-base font-semibold text-slate-900">{title}</h2>
      {children}
    </section>
  );
}

/**
 * /versions/:versionId/report[?frame=ID&axis=energy] — a printable page for the logbook: the
 * version's numbers and figures, and (with `frame`) that frame's spectrum made by this version.
 * Outside the app frame so that printing gives only the report; print: variants hide the controls.
 */
export function VersionReportRoute() {
  const { versionId = '' } = useParams();
  const [params] = useSearchParams();
  const frameId = params.get('frame') ?? '';
  const axis: SpectrumAxis = params.get('axis') === 'energy' ? 'energy' : 'wavelength';
  const version = useVersion(versionId);
  const instrumentId = version.data?.instrumentId ?? '';
  const instrument = useQuery({ ...instrumentQueryOptions(instrumentId), enabled: Boolean(instrumentId) });
  const spectrum = useSpectrum(version.data ? frameId : '', version.data?.number);

  if (version.isPending) return <Loading what="Loading version" />;
  if (version.isError) return <ErrorAlert error={version.error} title="Could not load the version" />;
  const v = version.data;
  const c = v.calibration;

  return (
    <div className="mx-auto max-w-5xl bg-white px-8 py-8 text-slate-900 print:max-w-none print:px-0 print:py-0 print:text-[11pt]" data-testid="calibration-report">
      <div className="mb-6 flex items-center justify-between gap-4 print:hidden">
        <Link className="text-sm text-accent-700 hover:underline" to={frameId ? `/frames/${frameId}/spectrum` : `/versions/${v.id}`}>
          ← back
        </Link>
        <Button onClick={() => window.print()}>Print</Button>
      </div>
      <header className="mb-6">
        <p className="text-xs tracking-wide text-slate-500 uppercase">Orderly · calibration report</p>
        <h1 className="mt-1 text-2xl font-semibold">
          {instrument.data?.name ?? 'Instrument'} — version {v.number} ({v.state})
        </h1>
        <p className="mt-1 text-sm text-slate-600">
          Valid from {when(v.validFrom)} until {v.state === 'superseded' && v.supersededAt ? `${when(v.supersededAt)} (superseded)` : when(v.validUntil)} · printed {new Date().toLocaleString()}
        </p>
        <p className="mt-1 text-xs break-all text-slate-500">{typeof window === 'undefined' ? '' : window.location.href}</p>
      </header>
      <div className="flex flex-col gap-6">
        <Section title="Calibration">
          <dl className="grid grid-cols-[12rem_1fr] gap-x-4 gap-y-1 text-sm tabular-nums">
            <dt className="text-slate-500">model</dt>
            <dd>
              {c.model}
              {c.polynomial ? ` (degree ${c.polynomial.degree}, ${c.polynomial.degreeCriterion})` : ''}
              {c.grating ? ` (fitted: ${c.grating.parameterNames.filter((n) => !(c.grating?.heldParameterNames ?? []).includes(n)).join(', ')})` : ''}
              {c.grating?.heldParameterNames?.length ? ` (held, spread in the band: ${c.grating.heldParameterNames.join(', ')})` : ''}
            </dd>
            <dt className="text-slate-500">driver (fitted)</dt>
            <dd>
              {c.driverNm.toFixed(3)} ± {c.driverSigmaNm.toFixed(3)} nm, {c.parity === 'odd' ? 'odd harmonics' : 'all harmonics'}
            </dd>
            <dt className="text-slate-500">absolute scale</dt>
            <dd>{describeAbsoluteScale(c)}</dd>
            <dt className="text-slate-500">points, rms residual</dt>
            <dd>
              {c.points.length} · {v.rmsResidualPx.toFixed(3)} px ({(c.residualRmsNm * 1000).toFixed(2)} pm) · χ²/dof {c.reducedChiSquare.toFixed(2)}
            </dd>
            <dt className="text-slate-500">filters</dt>
            <dd>{c.filters.length ? c.filters.join(', ') : 'none'}</dd>
            <dt className="text-slate-500">author · reviewer</dt>
            <dd>
              {v.author ? v.author.name || v.author.email : '—'} · {v.reviewer ? v.reviewer.name || v.reviewer.email : '—'}
              {v.approvedAt ? `, approved ${when(v.approvedAt)}` : ''}
            </dd>
            <dt className="text-slate-500">note</dt>
            <dd className="whitespace-pre-line">{v.note || '—'}</dd>
          </dl>
        </Section>
        <Section title="Dispersion map and residuals">
          <div className="grid grid-cols-2 gap-4">
            <MapPlot calibration={c} />
            <ResidualsPlot calibration={c} />
          </div>
        </Section>
        <Section title="Calibration peaks">
          <PeaksTable peaks={v.result.peaks} calibration={c} best={null} pins={v.inputs.pins} knownLines={v.inputs.knownLines ?? []} />
        </Section>
        {frameId ? (
          <Section title="Spectrum of the frame">
            {spectrum.isPending ? <Loading what="Applying the calibration" /> : null}
            <ErrorAlert error={spectrum.error} title="Could not make the spectrum" />
            {spectrum.data ? (
              <div className="flex flex-col gap-4">
                <p className="text-sm">
                  Frame {frameId.slice(0, 8)} with version {spectrum.data.calibration.version}
                  {spectrum.data.calibration.stale ? ' (stale)' : ''}.
                </p>
                <SpectrumChart spectrum={spectrum.data} axis={axis} heightPx={280} />
                <OrdersTable spectrum={spectrum.data} />
                <DriftSummary drift={spectrum.data.drift} />
              </div>
            ) : null}
          </Section>
        ) : null}
        <Section title="History">
          <VersionHistory history={v.history} />
        </Section>
      </div>
    </div>
  );
}
