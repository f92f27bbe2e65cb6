import { useMemo } from 'react';
import type uPlot from 'uplot';
import { UplotChart } from '@/components/uplot-chart';
import { colourAt, type ColourMapName } from '@/lib/frame-worker/colour-maps';
import { scaleCounts, type DisplayScaling } from '@/lib/frame-worker/scaling';

export interface ColourBarProps {
  loCounts: number;
  hiCounts: number;
  scaling: DisplayScaling;
  colourMap: ColourMapName;
  /** Histogram of the frame's pixel values inside the limits, drawn over the bar. */
  histogram: { centresCounts: Float64Array; counts: Float64Array } | null;
}

/**
 * The colour bar: the colour of every count value between the limits (through the chosen
 * stretch), with uPlot's counts axis under it and the pixel histogram over it, so the limits can
 * be judged against where the pixels are.
 */
export function ColourBar({ loCounts, hiCounts, scaling, colourMap, histogram }: ColourBarProps) {
  const options = useMemo<Omit<uPlot.Options, 'width' | 'height'>>(
    () => ({
      legend: { show: false },
      cursor: { show: false },
      scales: { x: { time: false, range: [loCounts, hiCounts] }, y: { distr: 3, range: (_u, _min, max) => [1, Math.max(10, max * 1.2)] } },
      axes: [
        { label: 'counts', size: 36, labelSize: 14, font: '11px Fira Sans', labelFont: '12px Fira Sans' },
        { show: false },
      ],
      series: [{}, { stroke: 'rgba(15, 23, 42, 0.85)', width: 1, paths: undefined, points: { show: false } }],
      hooks: {
        drawClear: [
          (u: uPlot) => {
            const { left, top, width, height } = u.bbox;
            const ctx = u.ctx;
            const columns = Math.max(1, Math.round(width));
            for (let c = 0; c < columns; c++) {
              const value = u.posToVal(c / (window.devicePixelRatio || 1), 'x');
              ctx.fillStyle = colourAt(colourMap, scaleCounts(value, loCounts, hiCounts, scaling));
              ctx.fillRect(left + c, top, 1.5, height);
            }
          },
        ],
      },
    }),
    [loCounts, hiCounts, scaling, colourMap],
  );
  const data = useMemo<uPlot.AlignedData>(
    () => (histogram ? [Array.from(histogram.centresCounts), Array.from(histogram.counts, (c) => Math.max(1, c))] : [[loCounts, hiCounts], [1, 1]]),
    [histogram, loCounts, hiCounts],
  );
  return <UplotChart options={options} data={data} heightPx={90} label="Colour bar with pixel histogram" testId="colour-bar" />;
}
