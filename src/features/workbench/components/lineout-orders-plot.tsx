import { useMemo } from 'react';
import type uPlot from 'uplot';
import type { CalibratedPeak, HypothesisSummary } from '../../../../shared/engine/calibrate.ts';
import { UplotChart } from '@/components/uplot-chart';

export interface LineoutOrdersPlotProps {
  countsPerPixel: Float64Array | null;
  peaks: CalibratedPeak[];
  /** Tentative orders of the best hypothesis, used when the result is not unique (drawn with "?"). */
  best: HypothesisSummary | null;
}

function labelFor(peak: CalibratedPeak, index: number, best: HypothesisSummary | null): string {
  if (peak.harmonic !== null) return peak.diffractionOrder === 1 ? `q${peak.harmonic}` : `q${peak.harmonic} (m=${peak.diffractionOrder})`;
  const q = best?.harmonics[index];
  return q ? `q${q}?` : '·';
}

/** The lineout with every peak's order written over it (m = 2 lines marked), uPlot axes. */
export function LineoutOrdersPlot({ countsPerPixel, peaks, best }: LineoutOrdersPlotProps) {
  const options = useMemo<Omit<uPlot.Options, 'width' | 'height'>>(
    () => ({
      legend: { show: false },
      scales: { x: { time: false } },
      axes: [
        { label: 'spectral pixel', font: '11px Fira Sans', labelFont: '12px Fira Sans' },
        { label: 'counts', size: 60, font: '11px Fira Sans', labelFont: '12px Fira Sans' },
      ],
      series: [{}, { label: 'counts', stroke: '#0f766e', width: 1.25, points: { show: false } }],
      hooks: {
        draw: [
          (u: uPlot) => {
            const ctx = u.ctx;
            const ratio = window.devicePixelRatio || 1;
            ctx.save();
            ctx.font = `${12 * ratio}px Fira Sans, sans-serif`;
            ctx.textAlign = 'center';
            const ys = u.data[1] as number[];
            peaks.forEach((peak, i) => {
              const x = u.valToPos(peak.pixel, 'x', true);
              const near = ys[Math.round(peak.pixel)] ?? 0;
              const y = Math.max(u.bbox.top + 14 * ratio, u.valToPos(near, 'y', true) - 8 * ratio);
              ctx.fillStyle = peak.harmonic === null ? '#b45309' : peak.diffractionOrder > 1 ? '#4338ca' : '#0f172a';
              ctx.fillText(labelFor(peak, i, best), x, y);
            });
            ctx.restore();
          },
        ],
      },
    }),
    [peaks, best],
  );
  const data = useMemo<uPlot.AlignedData>(
    () => (countsPerPixel ? [Array.from(countsPerPixel, (_, i) => i), Array.from(countsPerPixel)] : [[], []]),
    [countsPerPixel],
  );
  return <UplotChart options={options} data={data} heightPx={240} label="Lineout with harmonic order labels" testId="lineout-orders-plot" />;
}
