/**
 * "Nice" axis ticks (1, 2, 5 × 10^k steps) over [min, max], about `count` of them: the usual
 * rule of plotting libraries (common practice), here for the canvas heat map whose axes uPlot
 * does not draw.
 */
export function niceTicks(min: number, max: number, count = 6): number[] {
  if (!Number.isFinite(min) || !Number.isFinite(max)) return [];
  if (min === max) return [min];
  const [lo, hi] = min < max ? [min, max] : [max, min];
  const raw = (hi - lo) / Math.max(1, count);
  const mag = 10 ** Math.floor(Math.log10(raw));
  const step = [1, 2, 5, 10].map((m) => m * mag).find((s) => s >= raw) ?? 10 * mag;
  const out: number[] = [];
  for (let t = Math.ceil(lo / step) * step; t <= hi + step * 1e-9; t += step) out.push(Math.abs(t) < step * 1e-9 ? 0 : t);
  return out;
}

/** Shortest readable form of a tick value. */
export function tickLabel(v: number): string {
  if (v === 0) return '0';
  const a = Math.abs(v);
  if (a >= 1e4 || a < 1e-2) return v.toExponential(1);
  return String(Number(v.toPrecision(4)));
}

/** y = a + b·cos(2πx/period + φ), the model of shared/analysis/sinusoid.ts. */
export function sinusoidAt(x: number, fit: { offset: number; amplitude: number; phaseRad: number; period: number }): number {
  return fit.offset + fit.amplitude * Math.cos((2 * Math.PI * x) / fit.period + fit.phaseRad);
}
