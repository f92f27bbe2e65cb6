import type { ReactNode } from 'react';
import { Link, useNavigate, useParams } from 'react-router-dom';
import { canManageInstrument, roleOn, useSession } from '@/features/auth/api/get-session';
import { useInstrument } from '@/features/instruments/api/get-instrument';
import { useDeleteInstrument } from '@/features/instruments/api/delete-instrument';
import { ProfileSummary } from '@/features/instruments/components/profile-summary';
import { Loading, PageHeader, Panel } from '@/components/page';
import { ErrorAlert } from '@/components/alert';
import { Button } from '@/components/button';
import { RoleBadge } from '@/components/role-badge';
import { SafetyCaution } from '@/components/safety-caution';
import { useVersions } from '@/features/versions/api/get-versions';
import { VersionsPanel } from '@/features/versions/components/versions-panel';
import { CalibrationNow } from '@/features/versions/components/calibration-now';
import { useInstrumentSpectra } from '@/features/spectra/api/get-instrument-spectra';
import { LatestSpectra } from '@/features/spectra/components/latest-spectra';
import { useInstrumentRuns } from '@/features/runs/api/get-instrument-runs';
import { RecentRuns } from '@/features/runs/components/recent-runs';

const linkButton =
  'inline-flex items-center rounded-md px-3.5 py-2 text-sm font-medium shadow-xs bg-white text-slate-800 ring-1 ring-slate-300 hover:bg-slate-50';

/** One column of the Activity panel, with its own loading and error line. */
function ActivityColumn({ title, query, children }: { title: string; query: { isPending: boolean; error: Error | null }; children: ReactNode }) {
  return (
    <section className="min-w-0">
      <h3 className="mb-2 text-xs font-semibold tracking-wide text-slate-500 uppercase">{title}</h3>
      {query.isPending ? <Loading what={`Loading ${title.toLowerCase()}`} /> : null}
      <ErrorAlert error={query.error} title={`Could not load ${title.toLowerCase()}`} />
      {children}
    </section>
  );
}

/** /instruments/:instrumentId: the day's activity, profile, calibrations and the safety caution. */
export function InstrumentRoute() {
  const { instrumentId = '' } = useParams();
  const session = useSession();
  const instrument = useInstrument(instrumentId);
  const remove = useDeleteInstrument();
  const versions = useVersions(instrumentId);
  const spectra = useInstrumentSpectra(instrumentId);
  const runs = useInstrumentRuns(instrumentId, 5);
  const navigate = useNavigate();

  if (instrument.isPending) return <Loading what="Loading instrument" />;
  if (instrument.isError) return <ErrorAlert error={instrument.error} title="Could not load the instrument" />;

  const canManage = canManageInstrument(session.data, instrumentId);
  const role = roleOn(session.data, instrumentId) ?? (session.data?.user?.isAdmin ? 'site admin' : null);
  const { data } = instrument;

  return (
    <>
      <PageHeader
        title={data.name}
        subtitle={
          <span className="flex flex-wrap items-center gap-2">
            Your role:{' '}
            <span data-testid="instrument-role">
              <RoleBadge role={role} />
            </span>
          </span>
        }
        actions={
          <>
            <Link to={`/frames?instrumentId=${instrumentId}`} className={linkButton}>
              Frames
            </Link>
            <Link to={`/instruments/${instrumentId}/members`} className={linkButton}>
              Members
            </Link>
            <Link to={`/instruments/${instrumentId}/spectra`} className={linkButton}>
              Spectra and drift
            </Link>
            {canManage ? (
              <Link to={`/instruments/${instrumentId}/edit`} className={linkButton}>
                Edit profile
              </Link>
            ) : null}
          </>
        }
      />
      <div className="flex flex-col gap-6">
        <SafetyCaution />
        {data.description ? <p className="max-w-3xl text-sm whitespace-pre-line text-slate-700">{data.description}</p> : null}
        <Panel
          title="Activity"
          actions={
            <Link to={`/instruments/${instrumentId}/spectra`} className="text-sm text-accent-700 hover:underline">
              All spectra
            </Link>
          }
        >
          <div className="grid gap-6 md:grid-cols-3" data-testid="activity">
            <ActivityColumn title="Calibration now" query={versions}>
              {versions.data ? <CalibrationNow versions={versions.data} /> : null}
            </ActivityColumn>
            <ActivityColumn title="Latest spectra" query={spectra}>
              {spectra.data ? <LatestSpectra items={spectra.data.items} /> : null}
            </ActivityColumn>
            <ActivityColumn title="Recent runs" query={runs}>
              {runs.data ? <RecentRuns runs={runs.data} /> : null}
            </ActivityColumn>
          </div>
        </Panel>
        <Panel title="Profile (nominal geometry)">
          <ProfileSummary profile={data.profile} />
        </Panel>
        <Panel title="Calibrations">
          {versions.isPending ? <Loading what="Loading versions" /> : null}
          <ErrorAlert error={versions.error} title="Could not load the versions" />
          {versions.data ? <VersionsPanel versions={versions.data} /> : null}
        </Panel>
        {canManage ? (
          <Panel title="Danger zone">
            <div className="flex flex-wrap items-center justify-between gap-4">
              <p className="text-sm text-slate-600">Deleting an instrument removes it for every member.</p>
              <Button
                variant="danger"
                pending={remove.isPending}
                onClick={() => {
                  if (window.confirm(`Delete ${data.name}? This cannot be undone.`)) {
                    remove.mutate(instrumentId, { onSuccess: () => navigate('/instruments') });
                  }
                }}
              >
                Delete instrument
              </Button>
            </div>
            <div className="mt-3">
              <ErrorAlert error={remove.error} title="The instrument was not deleted" />
            </div>
          </Panel>
        ) : null}
      </div>
    </>
  );
}
