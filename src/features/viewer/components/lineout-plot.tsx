import { useMemo } from 'react';
import type uPlot from 'uplot';
import { UplotChart } from '@/components/uplot-chart';

export interface LineoutPlotProps {
  countsPerPixel: Float64Array | null;
  /** Plot title-less label for screen readers. */
  label?: string;
}

/** The lineout (background-subtracted counts summed over the signal band) against the spectral pixel. */
export function LineoutPlot({ countsPerPixel, label = 'Lineout: counts against spectral pixel' }: LineoutPlotProps) {
  const options = useMemo<Omit<uPlot.Options, 'width' | 'height'>>(
    () => ({
      legend: { show: false },
      scales: { x: { time: false } },
      axes: [
        { label: 'spectral pixel', font: '11px Fira Sans', labelFont: '12px Fira Sans' },
        { label: 'counts', size: 60, font: '11px Fira Sans', labelFont: '12px Fira Sans' },
      ],
      series: [{ label: 'pixel' }, { label: 'counts', stroke: '#0f766e', width: 1.25, points: { show: false } }],
    }),
    [],
  );
  const data = useMemo<uPlot.AlignedData>(() => {
    if (!countsPerPixel) return [[], []];
    return [Array.from(countsPerPixel, (_, i) => i), Array.from(countsPerPixel)];
  }, [countsPerPixel]);
  return <UplotChart options={options} data={data} heightPx={200} label={label} testId="lineout-plot" />;
}
