import { useMemo } from 'react';
import type uPlot from 'uplot';
import type { DriftSeries } from '../../../../shared/api/spectra.ts';
import { UplotChart } from '@/components/uplot-chart';

const FONT = '11px Fira Sans';

/**
 * Shift of the observed peaks against the calibration over frame time: every frame's shift (px)
 * with its ±1σ, the ±threshold band (the pixel part of the rule; a point must also exceed its own
 * σ·threshold.sigma to be flagged), and the flagged frames in amber.
 */
export function InstrumentDriftChart({ series }: { series: DriftSeries }) {
  const data = useMemo<uPlot.AlignedData>(() => {
    const pts = series.points;
    const t = pts.map((p) => Date.parse(p.takenAt) / 1000);
    const px = series.threshold.px;
    return [
      t,
      pts.map((p) => (p.flagged ? null : p.shiftPx)),
      pts.map((p) => (p.flagged ? p.shiftPx : null)),
      pts.map((p) => p.shiftPx + p.shiftPxSigma),
      pts.map((p) => p.shiftPx - p.shiftPxSigma),
      t.map(() => px),
      t.map(() => -px),
    ];
  }, [series]);
  const options = useMemo<Omit<uPlot.Options, 'width' | 'height'>>(
    () => ({
      scales: { x: { time: true } },
      axes: [
        { label: 'frame time', font: FONT, labelFont: '12px Fira Sans' },
        { label: 'shift (px)', size: 60, font: FONT, labelFont: '12px Fira Sans' },
      ],
      series: [
        { label: 'time' },
        { label: 'shift', stroke: '#0f766e', width: 0, points: { show: true, size: 6, fill: '#0f766e' } },
        { label: 'flagged', stroke: '#b45309', width: 0, points: { show: true, size: 9, fill: '#f59e0b' } },
        { label: '+1σ', stroke: 'rgba(15, 118, 110, 0.35)', width: 0, points: { show: true, size: 3 } },
        { label: '−1σ', stroke: 'rgba(15, 118, 110, 0.35)', width: 0, points: { show: true, size: 3 } },
        { label: `+${series.threshold.px} px`, stroke: 'rgba(180, 83, 9, 0.6)', width: 1, dash: [4, 4], points: { show: false } },
        { label: `−${series.threshold.px} px`, stroke: 'rgba(180, 83, 9, 0.6)', width: 1, dash: [4, 4], points: { show: false } },
      ],
      bands: [{ series: [5, 6], fill: 'rgba(20, 184, 166, 0.08)' }],
    }),
    [series.threshold.px],
  );
  if (series.points.length === 0) return <p className="text-sm text-slate-500">No spectra with a measured shift yet.</p>;
  const flagged = series.points.filter((p) => p.flagged).length;
  return (
    <div data-testid="drift-chart" data-flagged={flagged} data-points={series.points.length}>
      <UplotChart options={options} data={data} heightPx={260} label="Drift of the camera against the calibration over time" />
      <p className="mt-2 text-sm text-slate-600">
        {series.points.length} frames, {flagged} flagged; {series.episodes.length} episode{series.episodes.length === 1 ? '' : 's'}
        {series.episodes.some((e) => e.closedAt === null) ? ' (one still open: the latest frames are outside the threshold)' : ''}.
      </p>
    </div>
  );
}
