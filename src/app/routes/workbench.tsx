import { useEffect, useMemo, useState } from 'react';
import { Link, useParams, useSearchParams } from 'react-router-dom';
import type { WorkbenchRunInput } from '../../../shared/api/workbench.ts';
import { roleOn, useSession } from '@/features/auth/api/get-session';
import { useFrame } from '@/features/frames/api/get-frame';
import { useFrames } from '@/features/frames/api/get-frames';
import { useInstrument } from '@/features/instruments/api/get-instrument';
import { useCreateVersion } from '@/features/versions/api/create-version';
import { useTransitionAnyVersion } from '@/features/versions/api/transition-version';
import { useRunWorkbench } from '@/features/workbench/api/run-workbench';
import { SaveDraftForm } from '@/features/workbench/components/save-draft-form';
import { WorkbenchForm, type WorkbenchSettings } from '@/features/workbench/components/workbench-form';
import { WorkbenchResults } from '@/features/workbench/components/workbench-results';
import type { KnownLine } from '@/features/workbench/lib/known-lines';
import type { Pin } from '@/features/workbench/lib/pins';
import { useDecodedFrame } from '@/lib/frame-worker/use-decoded-frame';
import { useLineout } from '@/lib/frame-worker/use-lineout';
import { ErrorAlert } from '@/components/alert';
import { EmptyState, Loading, PageHeader, Panel } from '@/components/page';
import { SafetyCaution } from '@/components/safety-caution';

function toRunInput(frameIds: string[], s: WorkbenchSettings): WorkbenchRunInput {
  return {
    frameIds,
    darkFrameId: s.darkFrameId || undefined,
    driverNm: s.driverNm,
    driverTolerancePct: s.driverTolerancePct,
    blueShiftPct: s.blueShiftPct,
    parity: s.parity,
    filters: s.filters,
    pins: s.pins,
    knownLines: s.knownLines,
    model: s.model,
  };
}

/** /instruments/:instrumentId/workbench?frames=id,id — recalibrate from one or several frames. */
export function WorkbenchRoute() {
  const { instrumentId = '' } = useParams();
  const [params] = useSearchParams();
  const frameIds = useMemo(() => (params.get('frames') ?? '').split(',').map((s) => s.trim()).filter(Boolean), [params]);
  const session = useSession();
  const instrument = useInstrument(instrumentId);
  const first = useFrame(frameIds[0] ?? '');
  const darks = useFrames({ instrumentId, kind: 'dark', pageSize: 100, sort: 'takenAt', order: 'desc' });
  const run = useRunWorkbench(instrumentId);
  const createVersion = useCreateVersion(instrumentId);
  const submit = useTransitionAnyVersion();

  const role = roleOn(session.data, instrumentId);
  const mayRun = Boolean(session.data?.user?.isAdmin) || role === 'owner' || role === 'scientist';

  const [settings, setSettings] = useState<WorkbenchSettings | null>(null);
  useEffect(() => {
    if (settings || !first.data) return;
    const f = first.data;
    setSettings({ driverNm: f.driverNm ?? 800, driverTolerancePct: 0.5, blueShiftPct: 1, parity: f.parity ?? 'odd', filters: f.filters, model: 'auto', pins: [], knownLines: [], darkFrameId: '' });
  }, [first.data, settings]);

  const decoded = useDecodedFrame(first.data ? first.data.id : null, first.data?.page ?? 0);
  const used = run.data?.inputs.regionsUsed ?? null;
  const calibration = run.data?.result.calibration;
  const lineoutOptions = useMemo(() => {
    if (!run.data || !instrument.data) return null;
    const signal = used?.signal ?? calibration?.signal;
    return {
      spectralAxis: instrument.data.profile.spectralAxis,
      signal,
      background: used?.background ?? calibration?.background,
      lineShape: used?.lineShape ?? calibration?.lineShape,
    };
  }, [run.data, instrument.data, used, calibration]);
  const { lineout } = useLineout(decoded.data?.key ?? null, lineoutOptions, 0);

  if (frameIds.length === 0) {
    return (
      <>
        <PageHeader title="Recalibration workbench" />
        <EmptyState>
          Choose signal frames first: open a frame and use <em>Open in workbench</em>, or go to the{' '}
          <Link className="text-accent-700 hover:underline" to={`/frames?instrumentId=${instrumentId}`}>
            instrument&apos;s frames
          </Link>
          .
        </EmptyState>
      </>
    );
  }
  if (instrument.isPending || first.isPending) return <Loading what="Loading the workbench" />;
  if (instrument.isError) return <ErrorAlert error={instrument.error} title="Could not load the instrument" />;
  if (first.isError) return <ErrorAlert error={first.error} title="Could not load the frame" />;

  const start = (next: WorkbenchSettings) => run.mutate(toRunInput(frameIds, next));
  const onPins = mayRun
    ? (pins: Pin[]) => {
        if (!settings) return;
        const next = { ...settings, pins };
        setSettings(next);
        start(next);
      }
    : undefined;
  const onKnownLines = mayRun
    ? (knownLines: KnownLine[]) => {
        if (!settings) return;
        const next = { ...settings, knownLines };
        setSettings(next);
        start(next);
      }
    : undefined;

  return (
    <>
      <PageHeader
        title="Recalibration workbench"
        subtitle={
          <span>
            <Link className="text-accent-700 hover:underline" to={`/instruments/${instrumentId}`}>
              {instrument.data.name}
            </Link>{' '}
            · {frameIds.length} frame{frameIds.length === 1 ? '' : 's'}:{' '}
            {frameIds.map((id, i) => (
              <Link key={id} className="text-accent-700 hover:underline" to={`/frames/${id}`}>
                {i === 0 ? first.data.originalName : id.slice(0, 8)}
                {i < frameIds.length - 1 ? ', ' : ''}
              </Link>
            ))}
          </span>
        }
      />
      <div className="flex flex-col gap-6">
        <SafetyCaution />
        <Panel title="Settings">
          {settings ? (
            <WorkbenchForm
              settings={settings}
              onChange={setSettings}
              onRun={() => start(settings)}
              running={run.isPending}
              darkFrames={(darks.data?.items ?? []).map((d) => ({ id: d.id, name: d.originalName }))}
              mayRun={mayRun}
            />
          ) : (
            <Loading />
          )}
          <div className="mt-3">
            <ErrorAlert error={run.error} title="The run was refused" />
          </div>
        </Panel>
        {run.data ? <WorkbenchResults run={run.data} lineoutCounts={lineout?.counts ?? null} onPins={onPins} onKnownLines={onKnownLines} /> : null}
        {run.data && mayRun ? (
          <Panel title="Save as a calibration version">
            <SaveDraftForm
              key={run.data.id}
              unique={run.data.result.status === 'unique'}
              onSave={(input) => createVersion.mutateAsync({ runId: run.data.id, ...input })}
              onSubmit={(versionId) => submit.mutateAsync({ versionId, action: 'submit' })}
              saveError={createVersion.error}
              submitError={submit.error}
            />
          </Panel>
        ) : null}
      </div>
    </>
  );
}
