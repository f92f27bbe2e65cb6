import { useMemo } from 'react';
import type uPlot from 'uplot';
import type { Version } from '../../../../shared/api/versions.ts';
import { UplotChart } from '@/components/uplot-chart';
import { STATE_STYLE } from '../lib/version-permissions.ts';

/**
 * Versions on a time axis: one bar per version over its validity [validFrom, validUntil), open
 * ends running to the right edge, coloured by state (superseded bars end where the next took
 * over). uPlot draws the axes; the bars are drawn in its coordinate system.
 */
export function VersionTimeline({ versions }: { versions: Version[] }) {
  const { data, options } = useMemo(() => {
    const nowS = Date.now() / 1000;
    const starts = versions.map((v) => Date.parse(v.validFrom) / 1000);
    const ends = versions.map((v) => (v.validUntil ? Date.parse(v.validUntil) / 1000 : Number.NaN));
    const lo = Math.min(...starts, nowS);
    const hi = Math.max(...starts, ...ends.filter(Number.isFinite), nowS);
    const pad = Math.max(3600, (hi - lo) * 0.08);
    const xMin = lo - pad;
    const xMax = hi + pad;
    const maxNumber = Math.max(1, ...versions.map((v) => v.number));
    const opts: Omit<uPlot.Options, 'width' | 'height'> = {
      legend: { show: false },
      cursor: { show: false },
      scales: { x: { time: true, range: [xMin, xMax] }, y: { range: [0.4, maxNumber + 0.6] } },
      axes: [
        { font: '11px Fira Sans', labelFont: '12px Fira Sans', label: 'validity (local time)' },
        { label: 'version', size: 50, font: '11px Fira Sans', labelFont: '12px Fira Sans', splits: () => Array.from({ length: maxNumber }, (_, i) => i + 1), values: (_u, splits) => splits.map((s) => `v${s}`) },
      ],
      series: [{}, { show: false }],
      hooks: {
        draw: [
          (u: uPlot) => {
            const ctx = u.ctx;
            const ratio = window.devicePixelRatio || 1;
            const barHalf = Math.max(6 * ratio, Math.min(11 * ratio, (u.bbox.height / (maxNumber + 1)) * 0.38));
            ctx.save();
            ctx.beginPath();
            ctx.rect(u.bbox.left, u.bbox.top, u.bbox.width, u.bbox.height);
            ctx.clip();
            versions.forEach((v, i) => {
              const x0 = u.valToPos(starts[i], 'x', true);
              const x1 = Number.isFinite(ends[i]) ? u.valToPos(ends[i], 'x', true) : u.bbox.left + u.bbox.width;
              const y = u.valToPos(v.number, 'y', true);
              const style = STATE_STYLE[v.state];
              ctx.globalAlpha = v.state === 'draft' || v.state === 'withdrawn' ? 0.45 : 0.9;
              ctx.fillStyle = style.colour;
              ctx.fillRect(x0, y - barHalf, Math.max(2, x1 - x0), 2 * barHalf);
              ctx.globalAlpha = 1;
              // The label sits inside the bar's start, in white on the state colour.
              ctx.fillStyle = v.state === 'draft' || v.state === 'withdrawn' ? '#0f172a' : '#ffffff';
              ctx.font = `500 ${11 * ratio}px Fira Sans, sans-serif`;
              ctx.textBaseline = 'middle';
              ctx.textAlign = 'left';
              ctx.fillText(`v${v.number} ${style.label}${Number.isFinite(ends[i]) ? '' : ' →'}`, Math.max(x0, u.bbox.left) + 5 * ratio, y);
            });
            // "now" marker
            const xNow = u.valToPos(nowS, 'x', true);
            ctx.strokeStyle = '#64748b';
            ctx.setLineDash([4 * ratio, 4 * ratio]);
            ctx.beginPath();
            ctx.moveTo(xNow, u.bbox.top);
            ctx.lineTo(xNow, u.bbox.top + u.bbox.height);
            ctx.stroke();
            ctx.restore();
          },
        ],
      },
    };
    return { data: [[xMin, xMax], [null, null]] as uPlot.AlignedData, options: opts };
  }, [versions]);
  return (
    <div>
      <UplotChart options={options} data={data} heightPx={Math.max(160, 80 + versions.length * 52)} label="Calibration versions on a timeline" testId="version-timeline" />
      <ul className="mt-2 flex flex-wrap gap-3 text-xs text-slate-600" aria-label="Legend">
        {Object.entries(STATE_STYLE).map(([state, s]) => (
          <li key={state} className="flex items-center gap-1">
            <span aria-hidden className="inline-block size-3 rounded-sm" style={{ background: s.colour, opacity: state === 'draft' || state === 'withdrawn' ? 0.45 : 0.9 }} />
            {s.label}
          </li>
        ))}
        <li className="flex items-center gap-1">
          <span aria-hidden className="inline-block h-3 w-4 border-l-2 border-dashed border-slate-500" />
          now
        </li>
      </ul>
    </div>
  );
}
