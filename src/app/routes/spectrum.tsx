import { Link, useParams, useSearchParams } from 'react-router-dom';
import { paths } from '../../../shared/api/paths.ts';
import { useFrame } from '@/features/frames/api/get-frame';
import { useVersions } from '@/features/versions/api/get-versions';
import { isNoCalibration, useSpectrum } from '@/features/spectra/api/get-spectrum';
import { AxisToggle } from '@/features/spectra/components/axis-toggle';
import { CopyLinkButton } from '@/features/spectra/components/copy-link-button';
import { CalibrationUsed, SpectrumPanels } from '@/features/spectra/components/spectrum-panel';
import type { SpectrumAxis } from '@/features/spectra/lib/spectrum-axis';
import { Alert, ErrorAlert } from '@/components/alert';
import { Loading, PageHeader } from '@/components/page';

const linkButton = 'inline-flex items-center rounded-md px-3.5 py-2 text-sm font-medium shadow-xs bg-white text-slate-800 ring-1 ring-slate-300 hover:bg-slate-50';

/**
 * /frames/:frameId/spectrum[?version=N&axis=energy] — the frame's calibrated spectrum. Everything
 * the page shows is in its URL, so the address is the stable link.
 */
export function SpectrumRoute() {
  const { frameId = '' } = useParams();
  const [params, setParams] = useSearchParams();
  const versionParam = Number(params.get('version'));
  const version = Number.isInteger(versionParam) && versionParam >= 1 ? versionParam : undefined;
  const axis: SpectrumAxis = params.get('axis') === 'energy' ? 'energy' : 'wavelength';
  const logIntensity = params.get('scale') === 'log';
  const frame = useFrame(frameId);
  const versions = useVersions(frame.data?.instrumentId ?? '');
  // The filter-transmission correction divides by the calibration's filters at each photon energy (computed, not stored).
  const filterCorrection = params.get('filters') === 'corrected';
  const spectrum = useSpectrum(frameId, version, filterCorrection);

  const set = (key: string, value: string | undefined) => {
    const next = new URLSearchParams(params);
    if (value === undefined) next.delete(key);
    else next.set(key, value);
    setParams(next, { replace: true });
  };
  const usable = (versions.data ?? []).filter((v) => v.state === 'approved' || v.state === 'superseded');
  const f = frame.data;

  return (
    <>
      <PageHeader
        title={f ? `Spectrum · ${f.originalName}` : 'Spectrum'}
        subtitle={
          f ? (
            <span>
              <Link className="text-accent-700 hover:underline" to={`/frames/${f.id}`}>
                frame
              </Link>{' '}
              ·{' '}
              <Link className="text-accent-700 hover:underline" to={`/instruments/${f.instrumentId}`}>
                {f.instrumentName}
              </Link>{' '}
              · taken {new Date(f.takenAt).toLocaleString()}
              {f.scanVariable ? ` · ${f.scanVariable} = ${f.scanValue}` : ''}
            </span>
          ) : null
        }
        actions={
          <span className="flex flex-wrap items-center gap-2 print:hidden">
            <CopyLinkButton />
            {spectrum.data ? (
              <>
                <a className={linkButton} href={paths.frameSpectrumCsv(frameId, version, filterCorrection)} download={`spectrum-${frameId}-v${spectrum.data.calibration.version}.csv`}>
                  Export CSV
                </a>
                <a className={linkButton} href={paths.frameSpectrum(frameId, version, filterCorrection)} download={`spectrum-${frameId}-v${spectrum.data.calibration.version}.json`}>
                  Export JSON
                </a>
                <Link className={linkButton} to={`/versions/${spectrum.data.calibration.versionId}/report?frame=${frameId}`}>
                  Calibration report
                </Link>
              </>
            ) : null}
          </span>
        }
      />
      <div className="flex flex-col gap-6">
        <div className="flex flex-wrap items-center justify-between gap-4 print:hidden">
          <span className="flex flex-wrap items-center gap-4">
            <AxisToggle value={axis} onChange={(a) => set('axis', a === 'energy' ? 'energy' : undefined)} />
            <label className="flex items-center gap-2 text-sm text-slate-700">
              <input type="checkbox" className="size-4 accent-teal-700" checked={logIntensity} onChange={(e) => set('scale', e.target.checked ? 'log' : undefined)} />
              Log intensity
            </label>
            <label className="flex items-center gap-2 text-sm text-slate-700" title="Divide intensities and yields by the transmission of the calibration's filters at each photon energy (Henke-based tables)">
              <input type="checkbox" className="size-4 accent-teal-700" checked={filterCorrection} onChange={(e) => set('filters', e.target.checked ? 'corrected' : undefined)} />
              Correct for filter transmission
            </label>
          </span>
          <label className="flex items-center gap-2 text-sm text-slate-700">
            Calibration
            <select
              className="rounded-md border border-slate-300 bg-white px-2 py-1.5 text-sm"
              value={version ?? ''}
              onChange={(e) => set('version', e.target.value || undefined)}
            >
              <option value="">valid at the frame&apos;s time</option>
              {usable.map((v) => (
                <option key={v.id} value={v.number}>
                  version {v.number} ({v.state})
                </option>
              ))}
            </select>
          </label>
        </div>
        {spectrum.isPending ? <Loading what="Applying the calibration" /> : null}
        {spectrum.isError && isNoCalibration(spectrum.error) ? (
          <Alert title="No approved calibration covers this frame" tone="error">
            <p>{spectrum.error.message}</p>
            {f ? (
              <p className="mt-1">
                A frame taken {new Date(f.takenAt).toLocaleString()} needs an approved version valid from before that time. See the{' '}
                <Link className="underline" to={`/instruments/${f.instrumentId}`}>
                  instrument&apos;s calibrations
                </Link>
                .
              </p>
            ) : null}
          </Alert>
        ) : (
          <ErrorAlert error={spectrum.error} title="Could not make the spectrum" />
        )}
        {spectrum.data ? (
          <>
            <CalibrationUsed spectrum={spectrum.data} />
            <SpectrumPanels spectrum={spectrum.data} axis={axis} logIntensity={logIntensity} />
          </>
        ) : null}
      </div>
    </>
  );
}
