import type { CalibratedPeak, HypothesisSummary } from '../../../../shared/engine/calibrate.ts';
import { Button } from '@/components/button';
import { pinFromHypothesis, type Pin } from '../lib/pins.ts';

export interface HypothesesTableProps {
  hypotheses: HypothesisSummary[];
  peaks: CalibratedPeak[];
  /** Hidden for roles that may not run the workbench. */
  onUse?: (pins: Pin[]) => void;
}

/** The engine's ranked hypotheses, best first, with "use this" (pins one peak to its order and reruns). */
export function HypothesesTable({ hypotheses, peaks, onUse }: HypothesesTableProps) {
  if (hypotheses.length === 0) return <p className="text-sm text-slate-500">The engine formed no hypothesis.</p>;
  return (
    <div className="overflow-x-auto">
      <table className="w-full text-sm tabular-nums" aria-label="Hypotheses">
        <thead>
          <tr className="border-b border-slate-200 text-left text-slate-500">
            <th className="py-1.5 pr-3 font-medium">rank</th>
            <th className="py-1.5 pr-3 font-medium">first order q</th>
            <th className="py-1.5 pr-3 font-medium">orders</th>
            <th className="py-1.5 pr-3 font-medium">matched peaks</th>
            <th className="py-1.5 pr-3 font-medium">2nd-order peaks</th>
            <th className="py-1.5 pr-3 font-medium">residual (px rms)</th>
            <th className="py-1.5 pr-3 font-medium">score</th>
            <th className="py-1.5 pr-3 font-medium">margin (Δscore)</th>
            <th className="py-1.5 pr-3 font-medium">driver (nm)</th>
            <th />
          </tr>
        </thead>
        <tbody>
          {hypotheses.map((h) => {
            const pin = pinFromHypothesis(h, peaks);
            return (
              <tr key={h.rank} className={`border-b border-slate-100 ${h.rank === 1 ? 'bg-accent-50/60' : ''}`} data-testid="hypothesis-row">
                <td className="py-1.5 pr-3">{h.rank}</td>
                <td className="py-1.5 pr-3 font-medium">{h.firstHarmonic}</td>
                <td className="py-1.5 pr-3">
                  {h.firstHarmonic}–{h.lastHarmonic}
                </td>
                <td className="py-1.5 pr-3">
                  {h.matchedPeaks} of {peaks.length}
                </td>
                <td className="py-1.5 pr-3">{h.secondOrderPeaks}</td>
                <td className="py-1.5 pr-3">{h.rmsResidualPx.toFixed(3)}</td>
                <td className="py-1.5 pr-3">{h.score.toFixed(1)}</td>
                <td className="py-1.5 pr-3">{h.rank === 1 ? '—' : `+${h.deltaScore.toFixed(1)}`}</td>
                <td className="py-1.5 pr-3">{h.driverNm.toFixed(2)}</td>
                <td className="py-1.5 text-right">
                  {onUse && pin ? (
                    <Button variant="secondary" className="px-2 py-1 text-xs" onClick={() => onUse([pin])} title={`Pin the peak at pixel ${pin.pixel.toFixed(1)} as order ${pin.harmonic} and run again`}>
                      Use this
                    </Button>
                  ) : null}
                </td>
              </tr>
            );
          })}
        </tbody>
      </table>
    </div>
  );
}
