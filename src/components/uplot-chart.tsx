import { useEffect, useRef } from 'react';
import uPlot from 'uplot';
import 'uplot/dist/uPlot.min.css';

export interface UplotChartProps {
  /** uPlot options without the size; a new object rebuilds the chart, so memoise it. */
  options: Omit<uPlot.Options, 'width' | 'height'>;
  data: uPlot.AlignedData;
  heightPx: number;
  /** Accessible name of the chart (the canvas itself has none). */
  label: string;
  className?: string;
  testId?: string;
}

/**
 * A uPlot chart sized to its container's width. New `data` goes through setData (fast, keeps the
 * zoom); new `options` rebuild the chart. Axes and ticks are uPlot's own.
 */
export function UplotChart({ options, data, heightPx, label, className = '', testId }: UplotChartProps) {
  const holder = useRef<HTMLDivElement>(null);
  const chart = useRef<uPlot | null>(null);
  const latestData = useRef(data);
  latestData.current = data;

  useEffect(() => {
    const el = holder.current;
    if (!el) return;
    // A static legend (series names only): live cursor values crowd small charts.
    const plot = new uPlot({ ...options, legend: { live: false, ...options.legend }, width: Math.max(200, el.clientWidth), height: heightPx }, latestData.current, el);
    chart.current = plot;
    const observer = new ResizeObserver(() => plot.setSize({ width: Math.max(200, el.clientWidth), height: heightPx }));
    observer.observe(el);
    return () => {
      observer.disconnect();
      plot.destroy();
      chart.current = null;
    };
  }, [options, heightPx]);

  useEffect(() => {
    chart.current?.setData(data);
  }, [data]);

  return <div ref={holder} role="img" aria-label={label} className={`w-full ${className}`} data-testid={testId} />;
}
