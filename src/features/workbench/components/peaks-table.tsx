import { useState } from 'react';
import type { CalibratedPeak, HypothesisSummary } from '../../../../shared/engine/calibrate.ts';
import type { Calibration } from '../../../../shared/engine/types.ts';
import { Button } from '@/components/button';
import { parseKnownLine, type KnownLine } from '../lib/known-lines.ts';
import type { Pin } from '../lib/pins.ts';

export interface PeaksTableProps {
  peaks: CalibratedPeak[];
  calibration: Calibration | null;
  /** The best hypothesis, whose tentative orders are shown while the result is ambiguous. */
  best: HypothesisSummary | null;
  pins: Pin[];
  /** Present when the user may pin: pins an order on a peak and reruns. */
  onPin?: (pin: Pin) => void;
  knownLines: KnownLine[];
  /** Present when the user may run: states the photon energy of a peak (a known line) and reruns. */
  onKnownLine?: (line: KnownLine) => void;
}

/** The known-energy cell of one peak: the line stated on it, or a small form to state one. */
function KnownEnergyCell({ peak, known, onKnownLine }: { peak: CalibratedPeak; known: KnownLine | undefined; onKnownLine?: (line: KnownLine) => void }) {
  const [text, setText] = useState<{ energyEv: string; label: string } | null>(null);
  const [error, setError] = useState<string | null>(null);
  if (known) return <span className="rounded bg-accent-100 px-1.5 py-0.5 text-xs text-accent-800">known {known.energyEv} eV{known.label ? ` (${known.label})` : ''}</span>;
  if (!onKnownLine) return null;
  const pixel = Number(peak.pixel.toFixed(2));
  if (!text) {
    return (
      <Button variant="ghost" className="px-2 py-0.5 text-xs" onClick={() => setText({ energyEv: '', label: '' })}>
        Known energy…
      </Button>
    );
  }
  return (
    <form
      className="flex flex-wrap items-center gap-1"
      onSubmit={(e) => {
        e.preventDefault();
        const parsed = parseKnownLine({ pixel: String(pixel), ...text });
        if ('errors' in parsed) {
          setError(Object.values(parsed.errors).join('; '));
          return;
        }
        onKnownLine(parsed.line);
        setText(null);
        setError(null);
      }}
    >
      <input
        aria-label={`Photon energy (eV) of the peak at pixel ${peak.pixel.toFixed(1)}`}
        className="w-20 rounded border border-slate-300 px-1.5 py-0.5"
        type="number"
        step="any"
        autoFocus
        value={text.energyEv}
        onChange={(e) => setText({ ...text, energyEv: e.target.value })}
      />
      <input
        aria-label={`Label of the peak at pixel ${peak.pixel.toFixed(1)}`}
        className="w-24 rounded border border-slate-300 px-1.5 py-0.5"
        placeholder="label"
        value={text.label}
        onChange={(e) => setText({ ...text, label: e.target.value })}
      />
      <Button type="submit" className="px-2 py-0.5 text-xs">
        Use as known line
      </Button>
      {error ? (
        <span role="alert" className="text-xs text-red-700">
          {error}
        </span>
      ) : null}
    </form>
  );
}

function residualPmFor(peak: CalibratedPeak, calibration: Calibration | null): number | null {
  const point = calibration?.points.find((p) => Math.abs(p.pixel - peak.pixel) < 0.05);
  return point ? point.residualNm * 1000 : null;
}

/** One row per peak: position, harmonic and diffraction order, wavelength, energy, residual; a pin and a known-energy field per peak. */
export function PeaksTable({ peaks, calibration, best, pins, onPin, knownLines, onKnownLine }: PeaksTableProps) {
  const [editing, setEditing] = useState<{ index: number; value: string } | null>(null);
  if (peaks.length === 0) return <p className="text-sm text-slate-500">No peaks found.</p>;
  return (
    <div className="overflow-x-auto">
      <table className="w-full text-sm tabular-nums" aria-label="Peaks">
        <thead>
          <tr className="border-b border-slate-200 text-left text-slate-500">
            <th className="py-1.5 pr-3 font-medium">pixel</th>
            <th className="py-1.5 pr-3 font-medium">harmonic q</th>
            <th className="py-1.5 pr-3 font-medium">diffraction order m</th>
            <th className="py-1.5 pr-3 font-medium">wavelength (nm)</th>
            <th className="py-1.5 pr-3 font-medium">energy (eV)</th>
            <th className="py-1.5 pr-3 font-medium">residual (pm)</th>
            <th className="py-1.5 pr-3 font-medium">SNR</th>
            <th className="py-1.5 pr-3 font-medium">pin</th>
            <th className="py-1.5 font-medium">known energy</th>
          </tr>
        </thead>
        <tbody>
          {peaks.map((peak, index) => {
            const pinned = pins.find((p) => Math.abs(p.pixel - peak.pixel) < 1);
            const tentative = peak.harmonic === null ? best?.harmonics[index] ?? null : null;
            const residual = residualPmFor(peak, calibration);
            return (
              <tr key={index} className="border-b border-slate-100" data-testid="peak-row">
                <td className="py-1.5 pr-3">
                  {peak.pixel.toFixed(2)} ± {peak.pixelSigma.toFixed(2)}
                </td>
                <td className="py-1.5 pr-3 font-medium">
                  {peak.harmonic ?? (tentative !== null ? <span className="text-amber-700" title="tentative: the best hypothesis, not decided">{tentative}?</span> : '—')}
                </td>
                <td className="py-1.5 pr-3">{peak.diffractionOrder}</td>
                <td className="py-1.5 pr-3">{peak.wavelengthNm?.toFixed(3) ?? '—'}</td>
                <td className="py-1.5 pr-3">{peak.energyEv?.toFixed(2) ?? '—'}</td>
                <td className="py-1.5 pr-3">{residual === null ? '—' : residual.toFixed(1)}</td>
                <td className="py-1.5 pr-3">{peak.snr.toFixed(0)}</td>
                <td className="py-1.5 pr-3">
                  {pinned ? <span className="rounded bg-accent-100 px-1.5 py-0.5 text-xs text-accent-800">pinned q={pinned.harmonic}</span> : null}
                  {onPin && !pinned ? (
                    editing?.index === index ? (
                      <form
                        className="flex items-center gap-1"
                        onSubmit={(e) => {
                          e.preventDefault();
                          const q = Number(editing.value);
                          if (Number.isInteger(q) && q > 0) {
                            onPin({ pixel: Number(peak.pixel.toFixed(2)), harmonic: q });
                            setEditing(null);
                          }
                        }}
                      >
                        <input
                          aria-label={`Order for the peak at pixel ${peak.pixel.toFixed(1)}`}
                          className="w-16 rounded border border-slate-300 px-1.5 py-0.5"
                          type="number"
                          min={1}
                          step={1}
                          autoFocus
                          value={editing.value}
                          onChange={(e) => setEditing({ index, value: e.target.value })}
                        />
                        <Button type="submit" className="px-2 py-0.5 text-xs">
                          Pin
                        </Button>
                      </form>
                    ) : (
                      <Button variant="ghost" className="px-2 py-0.5 text-xs" onClick={() => setEditing({ index, value: String(tentative ?? peak.harmonic ?? '') })}>
                        Pin order…
                      </Button>
                    )
                  ) : null}
                </td>
                <td className="py-1.5">
                  <KnownEnergyCell peak={peak} known={knownLines.find((l) => Math.abs(l.pixel - peak.pixel) < 1)} onKnownLine={onKnownLine} />
                </td>
              </tr>
            );
          })}
        </tbody>
      </table>
    </div>
  );
}
