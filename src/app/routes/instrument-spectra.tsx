import { Link, useNavigate, useParams } from 'react-router-dom';
import { roleOn, useSession } from '@/features/auth/api/get-session';
import { useInstrument } from '@/features/instruments/api/get-instrument';
import { useFrames } from '@/features/frames/api/get-frames';
import { useDrift } from '@/features/drift/api/get-drift';
import { InstrumentDriftChart } from '@/features/drift/components/drift-chart';
import { DriftThresholdForm } from '@/features/drift/components/threshold-form';
import { StaleSpectraPanel } from '@/features/spectra/components/stale-spectra-panel';
import { ScanRunForm } from '@/features/runs/components/scan-run-form';
import { ErrorAlert } from '@/components/alert';
import { Loading, PageHeader, Panel } from '@/components/page';

/** /instruments/:instrumentId/spectra — drift over time (owners set its threshold), stale spectra, and scan runs. */
export function InstrumentSpectraRoute() {
  const { instrumentId = '' } = useParams();
  const session = useSession();
  const instrument = useInstrument(instrumentId);
  const drift = useDrift(instrumentId);
  // Scan variables in use, offered when starting a scan run (the newest 200 frames are enough to list them).
  const frames = useFrames({ instrumentId, kind: 'signal', sort: 'takenAt', order: 'desc', page: 1, pageSize: 200 });
  const navigate = useNavigate();

  if (instrument.isPending) return <Loading what="Loading instrument" />;
  if (instrument.isError) return <ErrorAlert error={instrument.error} title="Could not load the instrument" />;
  const role = roleOn(session.data, instrumentId);
  const isAdmin = Boolean(session.data?.user?.isAdmin);
  const mayMake = isAdmin || role === 'owner' || role === 'scientist' || role === 'student';
  const mayManage = isAdmin || role === 'owner';
  const scanVariables = [...new Set((frames.data?.items ?? []).map((f) => f.scanVariable).filter((v): v is string => Boolean(v)))];

  return (
    <>
      <PageHeader
        title={`Spectra and drift · ${instrument.data.name}`}
        subtitle={
          <Link className="text-accent-700 hover:underline" to={`/instruments/${instrumentId}`}>
            back to the instrument
          </Link>
        }
      />
      <div className="flex flex-col gap-6">
        <Panel title="Drift of the camera against the calibration">
          {drift.isPending ? <Loading what="Loading drift" /> : null}
          <ErrorAlert error={drift.error} title="Could not load the drift" />
          {drift.data ? (
            <div className="flex flex-col gap-4">
              <InstrumentDriftChart series={drift.data} />
              {mayManage ? (
                <DriftThresholdForm instrumentId={instrumentId} threshold={drift.data.threshold} />
              ) : (
                <p className="text-sm text-slate-600">
                  Threshold: {drift.data.threshold.sigma} σ and {drift.data.threshold.px} px (the instrument&apos;s owners set it).
                </p>
              )}
            </div>
          ) : null}
        </Panel>
        <Panel title="Stale spectra">
          <StaleSpectraPanel instrumentId={instrumentId} mayReapply={mayMake} onStarted={(runId) => navigate(`/runs/${runId}`)} />
        </Panel>
        {mayMake ? (
          <Panel title="Run a scan">
            <ScanRunForm key={scanVariables.join('|')} instrumentId={instrumentId} suggestions={scanVariables} />
          </Panel>
        ) : null}
      </div>
    </>
  );
}
