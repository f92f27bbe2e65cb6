import { useState } from 'react';
import { TextField } from '@/components/field';
import { StartRunButton } from './start-run-button';

/**
 * Start a run over a whole scan: every signal frame of the instrument with this scan variable.
 * `period` is the scan variable's period for the modulation fit (empty: the server's default 2π,
 * i.e. the variable is a phase in rad).
 */
export function ScanRunForm({ instrumentId, suggestions }: { instrumentId: string; suggestions: string[] }) {
  const [variable, setVariable] = useState(suggestions[0] ?? '');
  const [period, setPeriod] = useState('');
  const p = Number(period);
  const periodValue = period.trim() === '' ? undefined : period.trim() === 'detect' ? ('detect' as const) : Number.isFinite(p) && p > 0 ? p : undefined;
  return (
    <form aria-label="Run a scan" className="flex flex-wrap items-end gap-4" onSubmit={(e) => e.preventDefault()}>
      <div className="w-64">
        <TextField label="Scan variable" value={variable} list="scan-variables" onChange={(e) => setVariable(e.target.value)} hint="As entered on the frames, e.g. two-colour phase (rad)." />
        <datalist id="scan-variables">
          {suggestions.map((s) => (
            <option key={s} value={s} />
          ))}
        </datalist>
      </div>
      <div className="w-48">
        <TextField label="Modulation period" value={period} onChange={(e) => setPeriod(e.target.value)} placeholder="2π" hint='Scan units; "detect" to search.' />
      </div>
      <div className="pb-5">
        {variable.trim() ? <StartRunButton instrumentId={instrumentId} input={{ scanVariable: variable.trim(), period: periodValue }} label="Run the scan" /> : null}
      </div>
    </form>
  );
}
