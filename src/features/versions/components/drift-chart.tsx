import { useMemo } from 'react';
import type uPlot from 'uplot';
import type { VersionDetail } from '../../../../shared/api/versions.ts';
import { UplotChart } from '@/components/uplot-chart';
import { wavelengthsAt } from '../lib/version-diff.ts';

/**
 * Drift over versions: how far the first-order wavelength at the camera's first pixel, centre and
 * last pixel moved from the earliest version shown, in pm (one axis, so the three compare).
 */
export function DriftChart({ versions }: { versions: VersionDetail[] }) {
  const { data, pixels } = useMemo(() => {
    const sorted = [...versions].filter((v) => v.state !== 'withdrawn').sort((a, b) => a.number - b.number);
    const n = Math.max(...sorted.map((v) => v.calibration.pixelCount), 2);
    const px = [0, Math.round((n - 1) / 2), n - 1];
    const rows = sorted.map((v) => wavelengthsAt(v.calibration, px));
    const base = rows[0] ?? [0, 0, 0];
    const delta = (k: number) => rows.map((r) => (Number.isFinite(r[k] - base[k]) ? (r[k] - base[k]) * 1000 : null));
    return { pixels: px, data: [sorted.map((v) => v.number), delta(0), delta(1), delta(2)] as uPlot.AlignedData };
  }, [versions]);
  const options = useMemo<Omit<uPlot.Options, 'width' | 'height'>>(
    () => ({
      scales: { x: { time: false } },
      axes: [
        { label: 'version', font: '11px Fira Sans', labelFont: '12px Fira Sans', incrs: [1], values: (_u, s) => s.map((v) => `v${v}`) },
        { label: 'Δλ since first (pm)', size: 60, font: '11px Fira Sans', labelFont: '12px Fira Sans' },
      ],
      series: [
        { label: 'version' },
        { label: `pixel ${pixels[0]} (pm)`, stroke: '#0f766e', width: 1.5, points: { show: true, size: 6 } },
        { label: `centre, pixel ${pixels[1]} (pm)`, stroke: '#0f172a', width: 1.5, points: { show: true, size: 6 } },
        { label: `pixel ${pixels[2]} (pm)`, stroke: '#b45309', width: 1.5, points: { show: true, size: 6 } },
      ],
    }),
    [pixels],
  );
  if (versions.length < 2) return <p className="text-sm text-slate-500">The drift chart needs two versions.</p>;
  return <UplotChart options={options} data={data} heightPx={220} label="Wavelength at the camera's edges and centre per version" testId="drift-chart" />;
}
