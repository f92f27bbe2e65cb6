import { useMemo, useState } from 'react';
import type uPlot from 'uplot';
import type { VersionDetail } from '../../../../shared/api/versions.ts';
import { SelectField } from '@/components/field';
import { UplotChart } from '@/components/uplot-chart';
import { diffVersions } from '../lib/version-diff.ts';

/**
 * The difference between any two versions across the camera: how far the spectrum moved (px,
 * left axis) and the photon-energy change at each pixel (meV, right axis), computed here with the
 * engine's evaluateCalibration.
 */
export function VersionDiffPlot({ versions }: { versions: VersionDetail[] }) {
  const sorted = useMemo(() => [...versions].sort((a, b) => a.number - b.number), [versions]);
  const [aId, setA] = useState(sorted.at(-2)?.id ?? '');
  const [bId, setB] = useState(sorted.at(-1)?.id ?? '');
  const a = sorted.find((v) => v.id === aId);
  const b = sorted.find((v) => v.id === bId);

  const data = useMemo<uPlot.AlignedData | null>(() => {
    if (!a || !b) return null;
    const d = diffVersions(a.calibration, b.calibration);
    // A map that cannot be evaluated somewhere (NaN) leaves a gap rather than a fake value.
    const gap = (v: number) => (Number.isFinite(v) ? v : null);
    return [Array.from(d.pixel), Array.from(d.shiftPx, gap), Array.from(d.shiftMeV, gap)];
  }, [a, b]);
  const options = useMemo<Omit<uPlot.Options, 'width' | 'height'>>(
    () => ({
      scales: { x: { time: false }, px: {}, mev: {} },
      axes: [
        { label: 'spectral pixel', font: '11px Fira Sans', labelFont: '12px Fira Sans' },
        { scale: 'px', label: 'shift on the camera (px)', size: 60, font: '11px Fira Sans', labelFont: '12px Fira Sans', stroke: '#0f766e' },
        { scale: 'mev', side: 1, label: 'energy change (meV)', size: 70, font: '11px Fira Sans', labelFont: '12px Fira Sans', stroke: '#b45309', grid: { show: false } },
      ],
      series: [
        { label: 'pixel' },
        { label: 'shift (px)', scale: 'px', stroke: '#0f766e', width: 1.75, points: { show: false } },
        { label: 'energy change (meV)', scale: 'mev', stroke: '#b45309', width: 1.5, dash: [6, 4], points: { show: false } },
      ],
    }),
    [],
  );

  if (sorted.length < 2) return <p className="text-sm text-slate-500">The difference needs two versions.</p>;
  const choices = sorted.map((v) => ({ value: v.id, label: `version ${v.number} (${v.state.replace('_', ' ')})` }));
  return (
    <div className="flex flex-col gap-3">
      <div className="grid max-w-xl grid-cols-2 gap-3">
        <SelectField label="From version" value={aId} onChange={(e) => setA(e.target.value)} options={choices} />
        <SelectField label="To version" value={bId} onChange={(e) => setB(e.target.value)} options={choices} />
      </div>
      {data ? <UplotChart options={options} data={data} heightPx={220} label="Shift between two versions across the camera" testId="version-diff-plot" /> : null}
      <p className="text-xs text-slate-500">
        Shift: where the later version puts the wavelength the earlier one gives each pixel. Energy change: first-order photon energy of the later map minus the earlier at the same pixel.
      </p>
    </div>
  );
}
