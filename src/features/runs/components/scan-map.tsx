import { useEffect, useMemo, useRef, useState } from 'react';
import { interpolateCividis } from 'd3-scale-chromatic';
import type { ScanResponse } from '../../../../shared/api/runs.ts';
import { niceTicks, tickLabel } from '../lib/ticks';

type Scale = 'row' | 'log';

const MARGIN = { left: 64, right: 90, top: 12, bottom: 44 };
const FONT = '11px Fira Sans, sans-serif';

/** Cell value in [0, 1] for the colour map and the colour bar's range in data units. */
function normalise(map: ScanResponse['yieldMap'], scale: Scale) {
  if (scale === 'row') {
    // Each order from its own minimum (0) to maximum (1) over the scan: a 15 % modulation fills the colour range.
    const cells = map.map((row) => {
      const seen = row.filter((v): v is number => v !== null);
      const min = Math.min(...seen);
      const max = Math.max(...seen);
      return row.map((v) => (v === null || !(max > min) ? null : (v - min) / (max - min)));
    });
    return { cells, lo: 0, hi: 1, label: 'yield, each order scaled from its minimum (0) to maximum (1)' };
  }
  const logs = map.flat().filter((v): v is number => v !== null && v > 0).map(Math.log10);
  const lo = logs.length ? Math.min(...logs) : 0;
  const hi = logs.length ? Math.max(...logs) : 1;
  const span = hi - lo || 1;
  const cells = map.map((row) => row.map((v) => (v === null || !(v > 0) ? null : (Math.log10(v) - lo) / span)));
  return { cells, lo, hi, label: 'log₁₀ yield (counts)' };
}

/**
 * The order-versus-scan-variable map on a canvas: one row per harmonic, one column per scan value
 * (cells span half-way to the neighbouring values), cividis colours with a labelled colour bar.
 */
export function ScanMap({ scan }: { scan: ScanResponse }) {
  const holder = useRef<HTMLDivElement>(null);
  const canvas = useRef<HTMLCanvasElement>(null);
  const [widthPx, setWidthPx] = useState(640);
  const [scale, setScale] = useState<Scale>('row');
  const heightPx = Math.max(220, Math.min(480, 22 * scan.harmonics.length + MARGIN.top + MARGIN.bottom));
  const norm = useMemo(() => normalise(scan.yieldMap, scale), [scan.yieldMap, scale]);

  useEffect(() => {
    const el = holder.current;
    if (!el) return;
    const observer = new ResizeObserver(() => setWidthPx(Math.max(320, el.clientWidth)));
    observer.observe(el);
    setWidthPx(Math.max(320, el.clientWidth));
    return () => observer.disconnect();
  }, []);

  useEffect(() => {
    const c = canvas.current;
    const ctx = c?.getContext('2d');
    if (!c || !ctx) return;
    const dpr = window.devicePixelRatio || 1;
    c.width = Math.round(widthPx * dpr);
    c.height = Math.round(heightPx * dpr);
    ctx.setTransform(dpr, 0, 0, dpr, 0, 0);
    ctx.clearRect(0, 0, widthPx, heightPx);
    const plotW = widthPx - MARGIN.left - MARGIN.right;
    const plotH = heightPx - MARGIN.top - MARGIN.bottom;
    const { values, harmonics } = scan;
    const vMin = values[0];
    const vMax = values[values.length - 1];
    // Column edges half-way between values; the outer ones mirror the first/last step.
    const edges = values.map((v, i) => (i === 0 ? v - ((values[1] ?? v + 1) - v) / 2 : (values[i - 1] + v) / 2));
    edges.push(values.length > 1 ? vMax + (vMax - values[values.length - 2]) / 2 : vMax + 0.5);
    const x0 = edges[0];
    const x1 = edges[edges.length - 1];
    const xPos = (v: number) => MARGIN.left + ((v - x0) / (x1 - x0 || 1)) * plotW;
    const rowH = plotH / Math.max(1, harmonics.length);
    // Highest harmonic at the top, as energy increases upwards.
    const yRow = (h: number) => MARGIN.top + (harmonics.length - 1 - h) * rowH;
    ctx.fillStyle = '#f1f5f9';
    ctx.fillRect(MARGIN.left, MARGIN.top, plotW, plotH);
    norm.cells.forEach((row, h) =>
      row.forEach((cell, v) => {
        if (cell === null) return;
        ctx.fillStyle = interpolateCividis(cell);
        const xa = xPos(edges[v]);
        ctx.fillRect(xa, yRow(h), Math.ceil(xPos(edges[v + 1]) - xa), Math.ceil(rowH));
      }),
    );
    ctx.strokeStyle = '#94a3b8';
    ctx.strokeRect(MARGIN.left + 0.5, MARGIN.top + 0.5, plotW, plotH);
    // Axes: x ticks at nice values of the scan variable, y a label per harmonic (thinned when dense).
    ctx.fillStyle = '#334155';
    ctx.font = FONT;
    ctx.textAlign = 'center';
    ctx.textBaseline = 'top';
    for (const t of niceTicks(vMin, vMax, Math.max(3, Math.floor(plotW / 90)))) {
      const x = xPos(t);
      ctx.fillRect(x, MARGIN.top + plotH, 1, 4);
      ctx.fillText(tickLabel(t), x, MARGIN.top + plotH + 6);
    }
    ctx.font = '12px Fira Sans, sans-serif';
    ctx.fillText(scan.scanVariable ?? 'scan value', MARGIN.left + plotW / 2, MARGIN.top + plotH + 24);
    ctx.font = FONT;
    ctx.textAlign = 'right';
    ctx.textBaseline = 'middle';
    const every = Math.max(1, Math.ceil(14 / rowH));
    harmonics.forEach((q, h) => {
      if (h % every !== 0) return;
      ctx.fillText(`H${q}`, MARGIN.left - 6, yRow(h) + rowH / 2);
    });
    // Colour bar.
    const barX = widthPx - MARGIN.right + 18;
    const barW = 14;
    for (let i = 0; i < plotH; i++) {
      ctx.fillStyle = interpolateCividis(1 - i / plotH);
      ctx.fillRect(barX, MARGIN.top + i, barW, 1.5);
    }
    ctx.strokeStyle = '#94a3b8';
    ctx.strokeRect(barX + 0.5, MARGIN.top + 0.5, barW, plotH);
    ctx.fillStyle = '#334155';
    ctx.textAlign = 'left';
    for (const t of niceTicks(norm.lo, norm.hi, 4)) {
      const y = MARGIN.top + (1 - (t - norm.lo) / (norm.hi - norm.lo || 1)) * plotH;
      ctx.fillRect(barX + barW, y, 4, 1);
      ctx.fillText(tickLabel(t), barX + barW + 6, y);
    }
  }, [scan, norm, widthPx, heightPx]);

  return (
    <div className="flex flex-col gap-2">
      <div className="flex items-center justify-between gap-4 text-sm print:hidden">
        <span className="text-slate-600">
          Colour: {norm.label}. Grey: no line at that value.
        </span>
        <label className="flex items-center gap-2">
          Scale
          <select className="rounded-md border border-slate-300 px-2 py-1 text-sm" value={scale} onChange={(e) => setScale(e.target.value as Scale)}>
            <option value="row">per order (modulation)</option>
            <option value="log">log yield (all orders)</option>
          </select>
        </label>
      </div>
      <div ref={holder} className="w-full">
        <canvas
          ref={canvas}
          role="img"
          aria-label={`Yield of ${scan.harmonics.length} orders against ${scan.scanVariable ?? 'the scan value'} at ${scan.values.length} values`}
          style={{ width: widthPx, height: heightPx }}
          data-testid="scan-map"
        />
      </div>
    </div>
  );
}
