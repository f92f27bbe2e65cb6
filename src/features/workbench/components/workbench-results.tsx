import type { WorkbenchRun } from '../../../../shared/api/workbench.ts';
import { anchorKindWords } from '../../../../shared/engine/scale-note.ts';
import { Panel } from '@/components/page';
import { withKnownLine, type KnownLine } from '../lib/known-lines.ts';
import type { Pin } from '../lib/pins.ts';
import { AmbiguityBanner } from './ambiguity-banner.tsx';
import { HypothesesTable } from './hypotheses-table.tsx';
import { LineoutOrdersPlot } from './lineout-orders-plot.tsx';
import { MapPlot } from './map-plot.tsx';
import { PeaksTable } from './peaks-table.tsx';
import { ResidualsPlot } from './residuals-plot.tsx';
import { ScaleStatement } from './scale-statement.tsx';

export interface WorkbenchResultsProps {
  run: WorkbenchRun;
  lineoutCounts: Float64Array | null;
  /** Present when the user may pin: adds pins and reruns. */
  onPins?: (pins: Pin[]) => void;
  /** Present when the user may run: sets the known lines and reruns. */
  onKnownLines?: (lines: KnownLine[]) => void;
}

/** Everything one run says: verdict, hypotheses, peaks, and the three plots. */
export function WorkbenchResults({ run, lineoutCounts, onPins, onKnownLines }: WorkbenchResultsProps) {
  const { result } = run;
  const best = result.hypotheses[0] ?? null;
  // Runs stored before known lines existed have none in their inputs.
  const knownLines = run.inputs.knownLines ?? [];
  return (
    <div className="flex flex-col gap-6">
      <AmbiguityBanner result={result} />
      {result.calibration ? <ScaleStatement calibration={result.calibration} /> : null}
      {result.perFrame && result.perFrame.length > 1 ? (
        <ul className="text-sm text-slate-700" aria-label="Per-frame results">
          {result.perFrame.map((f) => (
            <li key={f.frameId}>
              frame {f.frameId.slice(0, 8)}: <strong>{f.status}</strong> — {f.message}
            </li>
          ))}
        </ul>
      ) : null}
      {result.calibration && result.calibration.notes.length > 0 ? (
        <ul className="list-disc pl-5 text-sm text-slate-600" aria-label="Engine notes">
          {result.calibration.notes.map((n, i) => (
            <li key={i}>{n}</li>
          ))}
        </ul>
      ) : null}
      <Panel title="Lineout with order labels">
        <LineoutOrdersPlot countsPerPixel={lineoutCounts} peaks={result.peaks} best={result.status === 'unique' ? null : best} />
      </Panel>
      <Panel title="Hypotheses (ranked)">
        <HypothesesTable hypotheses={result.hypotheses} peaks={result.peaks} onUse={onPins && result.status !== 'unique' ? (pins) => onPins([...run.inputs.pins, ...pins]) : undefined} />
      </Panel>
      <Panel title="Peaks">
        <PeaksTable
          peaks={result.peaks}
          calibration={result.calibration}
          best={best}
          pins={run.inputs.pins}
          onPin={onPins ? (pin) => onPins([...run.inputs.pins.filter((p) => Math.abs(p.pixel - pin.pixel) >= 1), pin]) : undefined}
          knownLines={knownLines}
          onKnownLine={onKnownLines ? (line) => onKnownLines(withKnownLine(knownLines, line)) : undefined}
        />
      </Panel>
      {result.calibration ? (
        <div className="grid gap-6 lg:grid-cols-2">
          <Panel title="Residuals">
            <ResidualsPlot calibration={result.calibration} />
          </Panel>
          <Panel title="Map with uncertainty band">
            <MapPlot calibration={result.calibration} />
            <p className="mt-2 text-xs text-slate-500">
              Absolute scale: {result.calibration.absoluteScale === 'anchored' ? `anchored by ${anchorKindWords(result.calibration.anchors ?? [])}` : 'driver tolerance only'} (±
              {(result.calibration.scaleSigmaRelative * 100).toPrecision(2)} %, 1σ) · rms residual{' '}
              {(result.calibration.residualRmsNm * 1000).toFixed(1)} pm · model {result.calibration.model}
            </p>
          </Panel>
        </div>
      ) : null}
    </div>
  );
}
