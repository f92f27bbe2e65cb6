import { useMemo } from 'react';
import type uPlot from 'uplot';
import { evaluateCalibration } from '../../../../shared/engine/dispersion/index.ts';
import type { Calibration } from '../../../../shared/engine/types.ts';
import { UplotChart } from '@/components/uplot-chart';

/**
 * The pixel → wavelength map with its 1-σ uncertainty drawn as a band (×`bandScale`, since the
 * band is usually far thinner than a line width), and the calibration points on it.
 */
export function MapPlot({ calibration }: { calibration: Calibration }) {
  const { data, bandScale } = useMemo(() => {
    const n = 200;
    const pixels = Array.from({ length: n }, (_, i) => ((calibration.pixelCount - 1) * i) / (n - 1));
    const { wavelengthNm, wavelengthSigmaNm } = evaluateCalibration(calibration, pixels);
    const span = Math.abs(wavelengthNm[n - 1] - wavelengthNm[0]) || 1;
    const maxSigma = Math.max(0, ...Array.from(wavelengthSigmaNm).filter(Number.isFinite));
    // Exaggerate the band to about 3 % of the plotted range so it is visible; the legend says by how much.
    const scale = maxSigma > 0 ? Math.max(1, Math.round((0.03 * span) / maxSigma)) : 1;
    const points = new Map(calibration.points.map((p) => [Math.round(p.pixel), p.wavelengthNm * p.diffractionOrder]));
    const xs = [...pixels, ...calibration.points.map((p) => p.pixel)].sort((a, b) => a - b);
    const at = (x: number) => evaluateCalibration(calibration, [x]);
    const lambda: number[] = [];
    const upper: number[] = [];
    const lower: number[] = [];
    const marks: (number | null)[] = [];
    for (const x of xs) {
      const e = at(x);
      lambda.push(e.wavelengthNm[0]);
      upper.push(e.wavelengthNm[0] + scale * e.wavelengthSigmaNm[0]);
      lower.push(e.wavelengthNm[0] - scale * e.wavelengthSigmaNm[0]);
      const point = calibration.points.find((p) => Math.abs(p.pixel - x) < 1e-9);
      marks.push(point ? (points.get(Math.round(point.pixel)) ?? null) : null);
    }
    const gap = (v: number | null) => (v !== null && Number.isFinite(v) ? v : null);
    return { data: [xs, lambda.map(gap), upper.map(gap), lower.map(gap), marks] as uPlot.AlignedData, bandScale: scale };
  }, [calibration]);

  const options = useMemo<Omit<uPlot.Options, 'width' | 'height'>>(
    () => ({
      scales: { x: { time: false } },
      axes: [
        { label: 'spectral pixel', font: '11px Fira Sans', labelFont: '12px Fira Sans' },
        { label: 'first-order wavelength (nm)', size: 60, font: '11px Fira Sans', labelFont: '12px Fira Sans' },
      ],
      series: [
        { label: 'pixel' },
        { label: 'map (nm)', stroke: '#0f766e', width: 1.5, points: { show: false } },
        { label: `+${bandScale}σ`, stroke: 'rgba(13, 148, 136, 0.4)', width: 0.5, points: { show: false } },
        { label: `−${bandScale}σ`, stroke: 'rgba(13, 148, 136, 0.4)', width: 0.5, points: { show: false } },
        { label: 'points (nm)', stroke: '#0f172a', width: 0, points: { show: true, size: 7, fill: '#0f172a' } },
      ],
      bands: [{ series: [2, 3], fill: 'rgba(45, 212, 191, 0.25)' }],
    }),
    [bandScale],
  );
  return <UplotChart options={options} data={data} heightPx={220} label="Dispersion map with uncertainty band" testId="map-plot" />;
}
