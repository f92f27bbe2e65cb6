import { Link, useParams } from 'react-router-dom';
import { useQuery } from '@tanstack/react-query';
import type { Regions as ApiRegions } from '../../../shared/api/frames.ts';
import type { Instrument } from '../../../shared/api/instruments.ts';
import type { Version } from '../../../shared/api/versions.ts';
import { roleOn, useSession } from '@/features/auth/api/get-session';
import { useFrame } from '@/features/frames/api/get-frame';
import { useUpdateFrame } from '@/features/frames/api/update-frame';
import { useSaveInstrumentRegions } from '@/features/frames/api/save-instrument-regions';
import { instrumentQueryOptions } from '@/features/instruments/api/get-instrument';
import { versionsQueryOptions } from '@/features/versions/api/get-versions';
import { useVersion } from '@/features/versions/api/get-version';
import { FrameViewer } from '@/features/viewer/components/frame-viewer';
import { NO_LINE_SHAPE, type Regions } from '@/features/viewer/lib/regions';
import { useDecodedFrame } from '@/lib/frame-worker/use-decoded-frame';
import { ErrorAlert } from '@/components/alert';
import { Loading, PageHeader, Panel } from '@/components/page';

const linkButton = 'inline-flex items-center rounded-md px-3.5 py-2 text-sm font-medium shadow-xs bg-white text-slate-800 ring-1 ring-slate-300 hover:bg-slate-50';

function toViewerRegions(r: ApiRegions | null | undefined): Regions | null {
  return r ? { signal: r.signal, background: r.background ?? [], lineShape: r.lineShape ?? NO_LINE_SHAPE } : null;
}

/** The approved (or since superseded) version whose validity covers time t: validFrom ≤ t < validUntil. */
function versionValidAt(versions: Version[] | undefined, takenAt: string): Version | null {
  const t = Date.parse(takenAt);
  return (
    versions?.find(
      (v) => (v.state === 'approved' || v.state === 'superseded') && Date.parse(v.validFrom) <= t && (v.validUntil === null || t < Date.parse(v.validUntil)),
    ) ?? null
  );
}

/** /frames/:frameId — the frame viewer with the region editor and the live lineout. */
export function FrameViewerRoute() {
  const { frameId = '' } = useParams();
  const session = useSession();
  const frame = useFrame(frameId);
  const instrumentId = frame.data?.instrumentId ?? '';
  const instrument = useQuery({ ...instrumentQueryOptions(instrumentId), enabled: Boolean(instrumentId) });
  const decoded = useDecodedFrame(frame.data ? frameId : null, frame.data?.page ?? 0);
  const versions = useQuery({ ...versionsQueryOptions(instrumentId), enabled: Boolean(instrumentId) });
  const valid = frame.data ? versionValidAt(versions.data, frame.data.takenAt) : null;
  const version = useVersion(valid?.id ?? null);
  const updateFrame = useUpdateFrame(frameId);
  const saveDefault = useSaveInstrumentRegions(instrumentId);

  if (frame.isPending) return <Loading what="Loading frame" />;
  if (frame.isError) return <ErrorAlert error={frame.error} title="Could not load the frame" />;
  const f = frame.data;
  const role = roleOn(session.data, f.instrumentId);
  const isAdmin = Boolean(session.data?.user?.isAdmin);
  const mayEditFrame = isAdmin || role === 'owner' || role === 'scientist' || (role === 'student' && f.uploadedBy === session.data?.user?.id);
  const maySaveDefault = isAdmin || role === 'owner' || role === 'scientist';
  const axis = instrument.data?.profile.spectralAxis ?? 'x';
  const instrumentRegions = (instrument.data as (Instrument & { regions?: ApiRegions | null }) | undefined)?.regions;

  return (
    <>
      <PageHeader
        title={f.originalName + (f.pageCount > 1 ? ` · page ${f.page + 1} of ${f.pageCount}` : '')}
        subtitle={
          <span>
            <Link className="text-accent-700 hover:underline" to={`/instruments/${f.instrumentId}`}>
              {f.instrumentName}
            </Link>{' '}
            · {f.kind} frame · {f.width} × {f.height} px, {f.bitsPerSample}-bit {f.sampleFormat} · taken {new Date(f.takenAt).toLocaleString()} ({f.takenAtSource})
            {f.exposureS !== null ? ` · ${f.exposureS} s` : ''}
            {f.filters.length ? ` · filters ${f.filters.join(', ')}` : ''}
          </span>
        }
        actions={
          <>
            {f.kind === 'signal' ? (
              <Link to={`/frames/${f.id}/spectrum`} className={linkButton}>
                Spectrum
              </Link>
            ) : null}
            {maySaveDefault && f.kind === 'signal' ? (
              <Link to={`/instruments/${f.instrumentId}/workbench?frames=${f.id}`} className={linkButton}>
                Open in workbench
              </Link>
            ) : null}
          </>
        }
      />
      <Panel title="Frame">
        {decoded.isPending || instrument.isPending ? <Loading what="Decoding the frame" /> : null}
        {decoded.isError ? <ErrorAlert error={decoded.error} title="The frame could not be decoded" /> : null}
        {decoded.data && instrument.data ? (
          <FrameViewer
            key={decoded.data.key}
            frame={decoded.data}
            axis={axis}
            initialRegions={toViewerRegions(f.regions) ?? toViewerRegions(instrumentRegions)}
            calibration={version.data?.calibration ?? null}
            calibrationLabel={valid ? `version ${valid.number}, ${valid.state}` : undefined}
            editable={mayEditFrame}
            onSaveFrame={mayEditFrame ? (regions) => updateFrame.mutateAsync({ regions }) : undefined}
            onSaveInstrument={maySaveDefault ? (regions) => saveDefault.mutateAsync(regions) : undefined}
          />
        ) : null}
        <div className="mt-3 flex flex-col gap-2">
          <ErrorAlert error={updateFrame.error} title="The regions were not saved" />
          <ErrorAlert error={saveDefault.error} title="The instrument default was not saved" />
          {updateFrame.isSuccess ? <p className="text-sm text-accent-800" role="status">Regions saved with the frame.</p> : null}
          {saveDefault.isSuccess ? <p className="text-sm text-accent-800" role="status">Saved as the instrument&apos;s default regions.</p> : null}
        </div>
      </Panel>
    </>
  );
}
