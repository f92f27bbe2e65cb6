import { useMemo } from 'react';
import type uPlot from 'uplot';
import type { Calibration } from '../../../../shared/engine/types.ts';
import { UplotChart } from '@/components/uplot-chart';

/** Fit residuals and leave-one-out residuals of the calibration points, in pm, against pixel. */
export function ResidualsPlot({ calibration }: { calibration: Calibration }) {
  const options = useMemo<Omit<uPlot.Options, 'width' | 'height'>>(
    () => ({
      scales: { x: { time: false } },
      axes: [
        { label: 'spectral pixel', font: '11px Fira Sans', labelFont: '12px Fira Sans' },
        { label: 'residual (pm)', size: 60, font: '11px Fira Sans', labelFont: '12px Fira Sans' },
      ],
      series: [
        { label: 'pixel' },
        { label: 'fit residual (pm)', stroke: '#0f766e', width: 0, points: { show: true, size: 8, fill: '#0f766e' } },
        { label: 'leave-one-out (pm)', stroke: '#d97706', width: 0, points: { show: true, size: 6, fill: '#ffffff' } },
      ],
    }),
    [],
  );
  const data = useMemo<uPlot.AlignedData>(() => {
    const points = [...calibration.points].sort((a, b) => a.pixel - b.pixel);
    return [
      points.map((p) => p.pixel),
      points.map((p) => p.residualNm * 1000),
      points.map((p) => (Number.isFinite(p.leaveOneOutResidualNm) ? p.leaveOneOutResidualNm * 1000 : null)),
    ];
  }, [calibration]);
  return <UplotChart options={options} data={data} heightPx={200} label="Residuals of the calibration points" testId="residuals-plot" />;
}
