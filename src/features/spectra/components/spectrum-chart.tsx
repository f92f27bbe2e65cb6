import { useMemo } from 'react';
import type uPlot from 'uplot';
import type { AppliedSpectrum } from '../../../../shared/engine/apply.ts';
import { UplotChart } from '@/components/uplot-chart';
import { axisSeries, orderLabels, type OrderLabel, type SpectrumAxis } from '../lib/spectrum-axis';

const FONT = '11px Fira Sans';

/**
 * A uPlot plugin that writes each order's name above its peak (uPlot draws the axes; this only
 * adds text through its draw hook, in canvas pixels, skipping labels outside the plot area).
 * Crowded labels (weak high orders close together) are stacked on up to four levels instead of
 * overprinting; a thin leader line joins each label to its peak.
 */
function orderLabelsPlugin(labels: OrderLabel[]): uPlot.Plugin {
  return {
    hooks: {
      draw: (u) => {
        const { ctx } = u;
        const { left, top, width, height } = u.bbox;
        const dpr = devicePixelRatio;
        const lineH = 13 * dpr;
        const gap = 3 * dpr;
        ctx.save();
        ctx.font = `${Math.round(11 * dpr)}px Fira Sans, sans-serif`;
        ctx.textAlign = 'center';
        ctx.textBaseline = 'bottom';
        const placed = labels
          .map((l) => ({ ...l, cx: u.valToPos(l.x, 'x', true), cy: u.valToPos(l.y, 'y', true), w: ctx.measureText(l.text).width }))
          .filter((l) => l.cx >= left && l.cx <= left + width)
          .sort((a, b) => a.cx - b.cx);
        // Right edge and baseline of the last label on each level.
        const levels: Array<{ right: number }> = [];
        for (const l of placed) {
          const peakTop = Math.min(top + height, l.cy) - 4 * dpr;
          let level = levels.findIndex((lv) => lv.right + gap < l.cx - l.w / 2);
          if (level === -1) level = levels.length < 4 ? levels.length : 3;
          levels[level] = { right: l.cx + l.w / 2 };
          const y = Math.max(top + lineH, peakTop - level * lineH);
          ctx.fillStyle = '#0f172a';
          ctx.fillText(l.text, l.cx, y);
          if (level > 0 || y < peakTop) {
            ctx.strokeStyle = 'rgba(15, 118, 110, 0.45)';
            ctx.beginPath();
            ctx.moveTo(l.cx, y + 1 * dpr);
            ctx.lineTo(l.cx, Math.min(top + height, l.cy));
            ctx.stroke();
          }
        }
        ctx.restore();
      },
    },
  };
}

export interface SpectrumChartProps {
  spectrum: AppliedSpectrum;
  axis: SpectrumAxis;
  /** Logarithmic intensity axis (weak high orders next to the plateau); values ≤ 0 are left out. */
  logIntensity?: boolean;
  heightPx?: number;
}

/** The spectrum on the chosen axis with its 1-σ band and the harmonic labels on the detected peaks. */
export function SpectrumChart({ spectrum, axis, logIntensity = false, heightPx = 320 }: SpectrumChartProps) {
  const series = useMemo(() => axisSeries(spectrum, axis), [spectrum, axis]);
  const labels = useMemo(() => orderLabels(spectrum, axis), [spectrum, axis]);
  const data = useMemo<uPlot.AlignedData>(() => {
    const keep = (v: number) => (logIntensity && !(v > 0) ? null : v);
    return [series.x, series.y.map(keep), series.y.map((v, i) => keep(v + series.ySigma[i])), series.y.map((v, i) => keep(v - series.ySigma[i]))];
  }, [series, logIntensity]);
  const options = useMemo<Omit<uPlot.Options, 'width' | 'height'>>(
    () => ({
      scales: { x: { time: false }, y: logIntensity ? { distr: 3 } : {} },
      axes: [
        { label: series.xLabel, font: FONT, labelFont: '12px Fira Sans' },
        { label: series.yLabel, size: 70, font: FONT, labelFont: '12px Fira Sans' },
      ],
      series: [
        { label: axis === 'wavelength' ? 'λ (nm)' : 'E (eV)' },
        { label: axis === 'wavelength' ? 'counts / pixel' : 'counts / eV', stroke: '#0f766e', width: 1.25, points: { show: false } },
        { label: '+1σ', stroke: 'rgba(13, 148, 136, 0.25)', width: 0.5, points: { show: false } },
        { label: '−1σ', stroke: 'rgba(13, 148, 136, 0.25)', width: 0.5, points: { show: false } },
      ],
      bands: [{ series: [2, 3], fill: 'rgba(45, 212, 191, 0.18)' }],
      plugins: [orderLabelsPlugin(labels)],
    }),
    [series.xLabel, series.yLabel, axis, labels, logIntensity],
  );
  return (
    <div data-testid="spectrum-chart" data-axis={axis} data-log={logIntensity} data-labels={labels.map((l) => l.text).join(' ')}>
      <UplotChart options={options} data={data} heightPx={heightPx} label={`Spectrum against ${series.xLabel} with harmonic labels`} />
    </div>
  );
}
