import { useState } from 'react';
import { Link, useParams } from 'react-router-dom';
import { useQuery } from '@tanstack/react-query';
import { roleOn, useSession } from '@/features/auth/api/get-session';
import { instrumentQueryOptions } from '@/features/instruments/api/get-instrument';
import { runIsActive, useRun } from '@/features/runs/api/get-run';
import { useCancelRun, useRetryRun } from '@/features/runs/api/run-actions';
import { useScan } from '@/features/runs/api/get-scan';
import { RunItemsTable } from '@/features/runs/components/run-items-table';
import { RunProgress, RunStateBadge } from '@/features/runs/components/run-progress';
import { ScanMap } from '@/features/runs/components/scan-map';
import { CutoffPlot, ModulationFits, YieldCurves } from '@/features/runs/components/scan-plots';
import { ApiError } from '@/lib/api-client';
import { ErrorAlert } from '@/components/alert';
import { Button } from '@/components/button';
import { Loading, PageHeader, Panel } from '@/components/page';

/**
 * A scan variable that is a field strength or intensity: the cutoff power law is shown, and the
 * sinusoidal modulation fit (meant for periodic variables such as a two-colour phase) is not.
 */
const FIELD_LIKE = /intens|field|power|fluence|W\/cm|V\/m|energy|pulse/i;

/** /runs/:runId — progress (polled while queued/running), cancel, retry, items, and the scan plots. */
export function RunRoute() {
  const { runId = '' } = useParams();
  const session = useSession();
  const run = useRun(runId);
  const instrumentId = run.data?.instrumentId ?? '';
  const instrument = useQuery({ ...instrumentQueryOptions(instrumentId), enabled: Boolean(instrumentId) });
  const cancel = useCancelRun(runId);
  const retry = useRetryRun(runId);
  const [periodText, setPeriodText] = useState('');
  const periodNumber = Number(periodText);
  const period = periodText === 'detect' ? ('detect' as const) : periodText && Number.isFinite(periodNumber) && periodNumber > 0 ? periodNumber : undefined;
  const finished = Boolean(run.data && !runIsActive(run.data) && run.data.done > 0);
  const scan = useScan(runId, period, finished);

  if (run.isPending) return <Loading what="Loading run" />;
  if (run.isError) return <ErrorAlert error={run.error} title="Could not load the run" />;
  const r = run.data;
  const user = session.data?.user;
  const role = roleOn(session.data, r.instrumentId);
  const mayManage = Boolean(user?.isAdmin) || role === 'owner' || role === 'scientist' || (role === 'student' && r.createdBy === user?.id);
  const active = runIsActive(r);
  const noScan = scan.error instanceof ApiError && scan.error.status < 500;

  return (
    <>
      <PageHeader
        title={
          <span className="flex items-center gap-3">
            {r.kind === 'reapply' ? 'Re-apply run' : r.scanVariable ? `Scan run · ${r.scanVariable}` : 'Run'} <RunStateBadge state={r.state} />
          </span>
        }
        subtitle={
          <span>
            <Link className="text-accent-700 hover:underline" to={`/instruments/${r.instrumentId}`}>
              {instrument.data?.name ?? 'instrument'}
            </Link>{' '}
            · {r.total} frames · calibration {r.version === 'valid' ? "valid at each frame's time" : `version ${r.version}`} · started {new Date(r.createdAt).toLocaleString()}
            {r.finishedAt ? ` · finished ${new Date(r.finishedAt).toLocaleString()}` : ''}
          </span>
        }
        actions={
          mayManage ? (
            <>
              {active ? (
                <Button variant="danger" pending={cancel.isPending} onClick={() => cancel.mutate()}>
                  Cancel run
                </Button>
              ) : null}
              {r.failed > 0 && !active ? (
                <Button variant="secondary" pending={retry.isPending} onClick={() => retry.mutate()}>
                  Retry {r.failed} failed
                </Button>
              ) : null}
            </>
          ) : null
        }
      />
      <div className="flex flex-col gap-6">
        <ErrorAlert error={cancel.error} title="The run was not cancelled" />
        <ErrorAlert error={retry.error} title="The failed frames were not retried" />
        <Panel title="Progress">
          <RunProgress run={r} />
        </Panel>
        {finished ? (
          <>
            {scan.isPending ? <Loading what="Analysing the scan" /> : null}
            {noScan ? <p className="text-sm text-slate-600">No scan plots: {scan.error?.message}</p> : <ErrorAlert error={scan.error} title="Could not analyse the scan" />}
            {scan.data ? (
              <>
                <Panel title={`Order versus ${scan.data.scanVariable ?? 'scan value'}`}>
                  <p className="mb-3 text-xs text-slate-500">
                    {scan.data.framesUsed} frames used{scan.data.framesSkipped ? `, ${scan.data.framesSkipped} without a spectrum or scan value left out` : ''}; frames at the same value are averaged.
                  </p>
                  <ScanMap scan={scan.data} />
                </Panel>
                <Panel title="Per-order yield">
                  <YieldCurves scan={scan.data} />
                </Panel>
                {FIELD_LIKE.test(scan.data.scanVariable ?? '') ? null : (
                  <Panel
                    title="Modulation fit per order"
                    actions={
                      <label className="flex items-center gap-2 text-sm text-slate-700 print:hidden">
                        Period
                        <input
                          className="w-28 rounded-md border border-slate-300 px-2 py-1 text-sm"
                          placeholder={r.period === null ? '2π' : String(r.period)}
                          value={periodText}
                          onChange={(e) => setPeriodText(e.target.value.trim())}
                          aria-label="Modulation period"
                        />
                      </label>
                    }
                  >
                    <ModulationFits scan={scan.data} />
                  </Panel>
                )}
                {FIELD_LIKE.test(scan.data.scanVariable ?? '') ? (
                  <Panel title="Cutoff versus field strength">
                    <CutoffPlot scan={scan.data} />
                  </Panel>
                ) : null}
              </>
            ) : null}
          </>
        ) : null}
        <Panel title="Frames">
          <RunItemsTable items={r.items} />
        </Panel>
      </div>
    </>
  );
}
