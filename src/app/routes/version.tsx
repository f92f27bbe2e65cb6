import { Link, useParams } from 'react-router-dom';
import { useQuery } from '@tanstack/react-query';
import { roleOn, useSession } from '@/features/auth/api/get-session';
import { instrumentQueryOptions } from '@/features/instruments/api/get-instrument';
import { useVersion } from '@/features/versions/api/get-version';
import { VersionActions } from '@/features/versions/components/version-actions';
import { VersionHistory } from '@/features/versions/components/version-history';
import { DraftEditor } from '@/features/versions/components/draft-editor';
import { allowedVersionActions } from '@/features/versions/lib/version-permissions';
import { VersionStateBadge } from '@/features/versions/components/version-state-badge';
import { VersionSpectra } from '@/features/versions/components/version-spectra';
import { MapPlot } from '@/features/workbench/components/map-plot';
import { PeaksTable } from '@/features/workbench/components/peaks-table';
import { ResidualsPlot } from '@/features/workbench/components/residuals-plot';
import { ErrorAlert } from '@/components/alert';
import { Loading, PageHeader, Panel } from '@/components/page';
import { describeAbsoluteScale } from '../../../shared/engine/scale-note.ts';

const when = (iso: string | null) => (iso ? new Date(iso).toLocaleString() : 'open end');

/** /versions/:versionId — one calibration version: validity, people, history, the map, and the review actions. */
export function VersionRoute() {
  const { versionId = '' } = useParams();
  const session = useSession();
  const version = useVersion(versionId);
  const instrumentId = version.data?.instrumentId ?? '';
  const instrument = useQuery({ ...instrumentQueryOptions(instrumentId), enabled: Boolean(instrumentId) });

  if (version.isPending) return <Loading what="Loading version" />;
  if (version.isError) return <ErrorAlert error={version.error} title="Could not load the version" />;
  const v = version.data;
  const user = session.data?.user;
  const actor = { userId: user?.id ?? '', role: roleOn(session.data, v.instrumentId), isAdmin: Boolean(user?.isAdmin) };

  return (
    <>
      <PageHeader
        title={
          <span className="flex items-center gap-3">
            Version {v.number} <VersionStateBadge state={v.state} />
          </span>
        }
        subtitle={
          <span>
            <Link className="text-accent-700 hover:underline" to={`/instruments/${v.instrumentId}`}>
              {instrument.data?.name ?? 'instrument'}
            </Link>{' '}
            · valid from {when(v.validFrom)} until {v.state === 'superseded' && v.supersededAt ? `${when(v.supersededAt)} (superseded)` : when(v.validUntil)}
          </span>
        }
        actions={
          <Link className="inline-flex items-center rounded-md bg-white px-3.5 py-2 text-sm font-medium text-slate-800 shadow-xs ring-1 ring-slate-300 hover:bg-slate-50" to={`/versions/${v.id}/report`}>
            Printable report
          </Link>
        }
      />
      <div className="flex flex-col gap-6">
        <div className="grid gap-6 lg:grid-cols-2">
          <Panel title="Summary">
            <dl className="grid grid-cols-[10rem_1fr] gap-x-4 gap-y-1.5 text-sm">
              <dt className="text-slate-500">author</dt>
              <dd>{v.author ? v.author.name || v.author.email : '—'}</dd>
              <dt className="text-slate-500">reviewer</dt>
              <dd>{v.reviewer ? v.reviewer.name || v.reviewer.email : '—'}</dd>
              <dt className="text-slate-500">model</dt>
              <dd>{v.model}</dd>
              <dt className="text-slate-500">driver (fitted)</dt>
              <dd>
                {v.calibration.driverNm.toFixed(3)} ± {v.calibration.driverSigmaNm.toFixed(3)} nm
              </dd>
              <dt className="text-slate-500">absolute scale</dt>
              <dd data-testid="version-scale">{describeAbsoluteScale(v.calibration)}</dd>
              <dt className="text-slate-500">peaks, rms residual</dt>
              <dd>
                {v.peakCount}, {v.rmsResidualPx.toFixed(3)} px
              </dd>
              <dt className="text-slate-500">frames</dt>
              <dd className="flex flex-wrap gap-2">
                {v.frameIds.map((id) => (
                  <Link key={id} className="text-accent-700 hover:underline" to={`/frames/${id}`}>
                    {id.slice(0, 8)}
                  </Link>
                ))}
              </dd>
              <dt className="text-slate-500">spectra made</dt>
              <dd>{v.spectraCount}</dd>
              <dt className="text-slate-500">note</dt>
              <dd className="whitespace-pre-line">{v.note || '—'}</dd>
            </dl>
          </Panel>
          <Panel title="Review">
            <div className="flex flex-col gap-5">
              <VersionActions version={v} actor={actor} forbidSelfApproval={instrument.data?.settings.forbidSelfApproval ?? true} />
              {allowedVersionActions(actor, { state: v.state, authorId: v.authorId ?? '', forbidSelfApproval: true }).edit ? <DraftEditor key={v.updatedAt} version={v} /> : null}
              <VersionHistory history={v.history} />
            </div>
          </Panel>
        </div>
        <div className="grid gap-6 lg:grid-cols-2">
          <Panel title="Map with uncertainty band">
            <MapPlot calibration={v.calibration} />
          </Panel>
          <Panel title="Residuals">
            <ResidualsPlot calibration={v.calibration} />
          </Panel>
        </div>
        <Panel title="Spectra made with this version">
          <VersionSpectra versionNumber={v.number} count={v.spectraCount} spectra={v.spectra} />
        </Panel>
        <Panel title="Peaks">
          <PeaksTable peaks={v.result.peaks} calibration={v.calibration} best={null} pins={v.inputs.pins} knownLines={v.inputs.knownLines ?? []} />
        </Panel>
      </div>
    </>
  );
}
