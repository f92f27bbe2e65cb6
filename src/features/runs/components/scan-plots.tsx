import { useMemo, useState } from 'react';
import type uPlot from 'uplot';
import { interpolateCividis } from 'd3-scale-chromatic';
import type { ScanResponse } from '../../../../shared/api/runs.ts';
import { UplotChart } from '@/components/uplot-chart';
import { sinusoidAt, tickLabel } from '../lib/ticks';

const FONT = '11px Fira Sans';
/** Tick text in the short form (1.6e+14 rather than 160,000,000,000,000) so wide ranges stay readable. */
const tickValues: uPlot.Axis['values'] = (_u, splits) => splits.map((v) => (v === null || v === undefined ? '' : tickLabel(v)));
const axisX = (label: string): uPlot.Axis => ({ label, font: FONT, labelFont: '12px Fira Sans', values: tickValues, space: 70 });
const axisY = (label: string): uPlot.Axis => ({ label, size: 70, font: FONT, labelFont: '12px Fira Sans', values: tickValues });

/** Distinct colours along cividis (avoiding its palest end, which vanishes on white). */
const colourOf = (i: number, n: number) => interpolateCividis(0.05 + (0.8 * i) / Math.max(1, n - 1));

/** Per-order yield against the scan variable, one line per harmonic (the brightest eight by default). */
export function YieldCurves({ scan }: { scan: ScanResponse }) {
  const ranked = useMemo(
    () =>
      [...scan.curves]
        .map((c) => ({ c, mean: c.points.reduce((a, p) => a + p.yield, 0) / Math.max(1, c.points.length) }))
        .sort((a, b) => b.mean - a.mean)
        .slice(0, 8)
        .map((r) => r.c)
        .sort((a, b) => a.harmonic - b.harmonic),
    [scan.curves],
  );
  const data = useMemo<uPlot.AlignedData>(() => {
    const xs = scan.values;
    return [xs, ...ranked.map((c) => xs.map((x) => c.points.find((p) => p.x === x)?.yield ?? null))];
  }, [scan.values, ranked]);
  const options = useMemo<Omit<uPlot.Options, 'width' | 'height'>>(
    () => ({
      scales: { x: { time: false } },
      axes: [axisX(scan.scanVariable ?? 'scan value'), axisY('yield (counts)')],
      series: [{ label: scan.scanVariable ?? 'x' }, ...ranked.map((c, i) => ({ label: `H${c.harmonic}`, stroke: colourOf(i, ranked.length), width: 1.5, points: { show: true, size: 4 } }))],
    }),
    [ranked, scan.scanVariable],
  );
  return (
    <div data-testid="yield-curves" data-orders={ranked.map((c) => c.harmonic).join(' ')}>
      <UplotChart options={options} data={data} heightPx={280} label="Per-order yield against the scan variable" />
    </div>
  );
}

function pm(v: number, s: number, digits: number) {
  return `${v.toFixed(digits)} ± ${s.toFixed(digits)}`;
}

/**
 * The sinusoidal modulation fit y = a + b·cos(2πx/P + φ) per order (amplitude and phase with their
 * 1-σ uncertainties), and the chosen order's points with the fitted curve over them.
 */
export function ModulationFits({ scan }: { scan: ScanResponse }) {
  const fitted = scan.modulation.filter((m) => m.fit);
  const [chosen, setChosen] = useState<number | null>(null);
  const strongest = useMemo(() => [...fitted].sort((a, b) => (b.fit!.amplitude / (b.fit!.amplitudeSigma || 1)) - a.fit!.amplitude / (a.fit!.amplitudeSigma || 1))[0]?.harmonic ?? null, [fitted]);
  const harmonic = chosen ?? strongest;
  const curve = scan.curves.find((c) => c.harmonic === harmonic);
  const fit = scan.modulation.find((m) => m.harmonic === harmonic)?.fit ?? null;

  const data = useMemo<uPlot.AlignedData | null>(() => {
    if (!curve || !fit || scan.values.length < 2) return null;
    const lo = scan.values[0];
    const hi = scan.values[scan.values.length - 1];
    const dense = Array.from({ length: 200 }, (_, i) => lo + ((hi - lo) * i) / 199);
    const xs = [...new Set([...dense, ...curve.points.map((p) => p.x)])].sort((a, b) => a - b);
    const byX = new Map(curve.points.map((p) => [p.x, p]));
    return [
      xs,
      xs.map((x) => byX.get(x)?.yield ?? null),
      xs.map((x) => sinusoidAt(x, fit)),
      xs.map((x) => { const p = byX.get(x); return p ? p.yield + p.yieldSigma : null; }),
      xs.map((x) => { const p = byX.get(x); return p ? p.yield - p.yieldSigma : null; }),
    ];
  }, [curve, fit, scan.values]);
  const options = useMemo<Omit<uPlot.Options, 'width' | 'height'>>(
    () => ({
      scales: { x: { time: false } },
      axes: [axisX(scan.scanVariable ?? 'scan value'), axisY('yield (counts)')],
      series: [
        { label: scan.scanVariable ?? 'x' },
        { label: `H${harmonic} measured`, stroke: '#0f172a', width: 0, points: { show: true, size: 6, fill: '#0f172a' } },
        { label: 'fit', stroke: '#0f766e', width: 2, points: { show: false }, spanGaps: true },
        { label: '+1σ', stroke: 'rgba(15, 23, 42, 0.35)', width: 0, points: { show: true, size: 3 } },
        { label: '−1σ', stroke: 'rgba(15, 23, 42, 0.35)', width: 0, points: { show: true, size: 3 } },
      ],
    }),
    [harmonic, scan.scanVariable],
  );

  if (fitted.length === 0) {
    return <p className="text-sm text-slate-600">No order could be fitted: {scan.modulation.map((m) => m.message).filter(Boolean)[0] ?? 'too few points.'}</p>;
  }
  const period = fitted[0].fit!.period;
  return (
    <div className="flex flex-col gap-4">
      <p className="text-sm text-slate-600">
        Model y = a + b·cos(2π·x/P + φ), P = {period.toPrecision(4)} ({fitted[0].fit!.periodFrom}); σ from the yields&apos; σ (or the residuals when they are absent).
      </p>
      <div className="grid gap-6 xl:grid-cols-2">
        <div className="max-h-96 overflow-auto">
          <table className="w-full text-sm tabular-nums" aria-label="Modulation fits" data-testid="modulation-table">
            <thead className="sticky top-0 bg-white">
              <tr className="border-b border-slate-200 text-left text-xs tracking-wide text-slate-500 uppercase">
                <th className="py-2 pr-3 font-medium">order</th>
                <th className="py-2 pr-3 text-right font-medium">amplitude b</th>
                <th className="py-2 pr-3 text-right font-medium">phase φ (rad)</th>
                <th className="py-2 pr-3 text-right font-medium">depth b/a</th>
                <th className="py-2 text-right font-medium">χ²/dof</th>
              </tr>
            </thead>
            <tbody>
              {scan.modulation.map((m) => (
                <tr
                  key={m.harmonic}
                  className={`cursor-pointer border-b border-slate-100 ${m.harmonic === harmonic ? 'bg-accent-50' : 'hover:bg-slate-50'}`}
                  onClick={() => setChosen(m.harmonic)}
                  data-testid="modulation-row"
                >
                  <td className="py-1.5 pr-3 font-medium">
                    <button type="button" className="hover:underline" onClick={() => setChosen(m.harmonic)}>
                      H{m.harmonic}
                    </button>
                  </td>
                  {m.fit ? (
                    <>
                      <td className="py-1.5 pr-3 text-right">{pm(m.fit.amplitude, m.fit.amplitudeSigma, 0)}</td>
                      <td className="py-1.5 pr-3 text-right">{pm(m.fit.phaseRad, m.fit.phaseSigmaRad, 3)}</td>
                      <td className="py-1.5 pr-3 text-right">{m.fit.modulationDepth === null ? '—' : m.fit.modulationDepth.toFixed(3)}</td>
                      <td className="py-1.5 text-right">{m.fit.covarianceFrom === 'sigma' && m.fit.degreesOfFreedom > 0 ? (m.fit.chiSquare / m.fit.degreesOfFreedom).toFixed(2) : '—'}</td>
                    </>
                  ) : (
                    <td colSpan={4} className="py-1.5 text-slate-500">
                      {m.message}
                    </td>
                  )}
                </tr>
              ))}
            </tbody>
          </table>
        </div>
        <div data-testid="modulation-plot" data-harmonic={harmonic ?? ''}>
          <p className="mb-1 text-sm font-medium text-slate-700">H{harmonic}: points (±1σ) and the fitted sinusoid</p>
          {data ? <UplotChart options={options} data={data} heightPx={260} label={`Modulation of H${harmonic} with the fitted sinusoid`} /> : null}
        </div>
      </div>
    </div>
  );
}

/** Cutoff photon energy against the scan variable on log-log axes with the power-law fit E = A·x^k. */
export function CutoffPlot({ scan }: { scan: ScanResponse }) {
  const { points, fit, message } = scan.cutoff;
  const data = useMemo<uPlot.AlignedData>(() => {
    const xs = points.map((p) => p.x);
    return [xs, points.map((p) => p.cutoffEv), xs.map((x) => (fit ? fit.prefactor * x ** fit.exponent : null))];
  }, [points, fit]);
  const options = useMemo<Omit<uPlot.Options, 'width' | 'height'>>(
    () => ({
      scales: { x: { time: false, distr: 3 }, y: { distr: 3 } },
      axes: [axisX(`${scan.scanVariable ?? 'scan value'} (log)`), axisY('cutoff (eV, log)')],
      series: [
        { label: scan.scanVariable ?? 'x' },
        { label: 'cutoff', stroke: '#0f172a', width: 0, points: { show: true, size: 6, fill: '#0f172a' } },
        { label: fit ? `A·x^k, k = ${fit.exponent.toFixed(3)}` : 'fit', stroke: '#0f766e', width: 2, points: { show: false } },
      ],
    }),
    [scan.scanVariable, fit],
  );
  const positive = points.every((p) => p.x > 0 && p.cutoffEv > 0);
  return (
    <div className="flex flex-col gap-2" data-testid="cutoff-plot">
      {fit ? (
        <p className="text-sm tabular-nums text-slate-700" data-testid="cutoff-fit">
          E<sub>cutoff</sub> = A·x<sup>k</sup>: k = {fit.exponent.toFixed(3)} ± {fit.exponentSigma.toFixed(3)}, A = {fit.prefactor.toPrecision(4)} ± {fit.prefactorSigma.toPrecision(2)} eV
          {fit.covarianceFrom === 'sigma' && fit.degreesOfFreedom > 0 ? `, χ²/dof = ${(fit.chiSquare / fit.degreesOfFreedom).toFixed(2)}` : ' (σ from the scatter about the fit)'}
        </p>
      ) : (
        <p className="text-sm text-slate-600">No power-law fit: {message ?? 'too few points.'}</p>
      )}
      {points.length > 0 && positive ? <UplotChart options={options} data={data} heightPx={240} label="Cutoff against the scan variable with the power-law fit" /> : null}
    </div>
  );
}
