import { useState } from 'react';
import type { WorkbenchModel } from '../../../../shared/api/workbench.ts';
import { driverPresets, knownFilterMaterials } from '../../../../shared/engine/references.ts';
import { Button } from '@/components/button';
import { SelectField, TextField } from '@/components/field';
import { knownLineText, parseKnownLine, withKnownLine, type KnownLine } from '../lib/known-lines.ts';
import type { Pin } from '../lib/pins.ts';

/** The workbench inputs as the form holds them. */
export interface WorkbenchSettings {
  driverNm: number;
  /** 1σ of the measured driver wavelength, percent. */
  driverTolerancePct: number;
  /** Ionisation blue shift allowed below it, percent. */
  blueShiftPct: number;
  parity: 'odd' | 'all';
  filters: string[];
  model: WorkbenchModel;
  pins: Pin[];
  /** Peaks of known first-order photon energy: absolute anchors of the scale. */
  knownLines: KnownLine[];
  darkFrameId: string;
}

export interface WorkbenchFormProps {
  settings: WorkbenchSettings;
  onChange(settings: WorkbenchSettings): void;
  onRun(): void;
  running: boolean;
  darkFrames: { id: string; name: string }[];
  /** False for roles that may not run the engine: the form is shown read-only. */
  mayRun: boolean;
}

const PRESETS = driverPresets();
const MATERIALS = knownFilterMaterials();

function modelValue(model: WorkbenchModel): string {
  if (model === 'auto' || model === 'grating') return model;
  return `poly:${model.polynomialDegree}`;
}

function parseModel(value: string): WorkbenchModel {
  if (value === 'auto' || value === 'grating') return value;
  const degree = value.slice('poly:'.length);
  return { polynomialDegree: degree === 'auto' ? 'auto' : Number(degree) };
}

/** Driver, tolerance, parity, filters, model, pins and known lines, and the Run button. */
export function WorkbenchForm({ settings, onChange, onRun, running, darkFrames, mayRun }: WorkbenchFormProps) {
  const [pinText, setPinText] = useState({ pixel: '', harmonic: '' });
  const [lineText, setLineText] = useState({ pixel: '', energyEv: '', label: '' });
  const [lineErrors, setLineErrors] = useState<Partial<Record<'pixel' | 'energyEv' | 'label', string>>>({});
  const set = <K extends keyof WorkbenchSettings>(key: K, value: WorkbenchSettings[K]) => onChange({ ...settings, [key]: value });
  const preset = PRESETS.find((p) => p.wavelengthNm === settings.driverNm);
  const toggleFilter = (material: string) => {
    const has = settings.filters.some((f) => f.split(/[:\s]/)[0].toLowerCase() === material.toLowerCase());
    set('filters', has ? settings.filters.filter((f) => f.split(/[:\s]/)[0].toLowerCase() !== material.toLowerCase()) : [...settings.filters, material]);
  };

  return (
    <form
      className="flex flex-col gap-4"
      aria-label="Workbench settings"
      onSubmit={(e) => {
        e.preventDefault();
        onRun();
      }}
    >
      <fieldset disabled={!mayRun} className="grid grid-cols-2 gap-3 md:grid-cols-4">
        <SelectField
          label="Driver preset"
          value={preset?.id ?? ''}
          onChange={(e) => {
            const p = PRESETS.find((x) => x.id === e.target.value);
            // A preset's tolerance is the spread of a nameplate over systems and days: taken as ±2σ.
            if (p) onChange({ ...settings, driverNm: p.wavelengthNm, driverTolerancePct: Number(((100 * p.toleranceNm) / 2 / p.wavelengthNm).toFixed(2)) });
          }}
          options={[{ value: '', label: 'custom' }, ...PRESETS.map((p) => ({ value: p.id, label: p.label }))]}
        />
        <TextField label="Driver wavelength (nm)" type="number" step="any" min="1" value={String(settings.driverNm)} onChange={(e) => set('driverNm', Number(e.target.value))} />
        <TextField label="Driver σ (%)" title="1σ of the measured driver wavelength (symmetric)" type="number" step="any" min="0.01" max="5" value={String(settings.driverTolerancePct)} onChange={(e) => set('driverTolerancePct', Number(e.target.value))} />
        <TextField label="Blue shift allowed (%)" title="How far ionisation may shift the harmonics below the driver (an assumption)" type="number" step="any" min="0" max="9.99" value={String(settings.blueShiftPct)} onChange={(e) => set('blueShiftPct', Number(e.target.value))} />
        <SelectField
          label="Parity"
          value={settings.parity}
          onChange={(e) => set('parity', e.target.value as 'odd' | 'all')}
          options={[
            { value: 'odd', label: 'odd orders (one-colour driver)' },
            { value: 'all', label: 'all orders (two-colour, solids)' },
          ]}
        />
        <SelectField
          label="Model"
          value={modelValue(settings.model)}
          onChange={(e) => set('model', parseModel(e.target.value))}
          options={[
            { value: 'auto', label: 'auto (grating equation)' },
            { value: 'grating', label: 'grating equation' },
            { value: 'poly:auto', label: 'polynomial, degree by the data' },
            ...[1, 2, 3, 4, 5].map((d) => ({ value: `poly:${d}`, label: `polynomial, degree ${d}` })),
          ]}
        />
        <SelectField label="Dark frame" value={settings.darkFrameId} onChange={(e) => set('darkFrameId', e.target.value)} options={[{ value: '', label: 'none' }, ...darkFrames.map((d) => ({ value: d.id, label: d.name }))]} />
        <div className="col-span-2">
          <TextField
            label="Filters in the beam"
            value={settings.filters.join(', ')}
            onChange={(e) => set('filters', e.target.value.split(',').map((s) => s.trim()).filter(Boolean))}
            hint="engine notation: Al, Zr:200 (200 nm); edges and transmissions from the reference tables"
          />
          <div className="mt-1.5 flex flex-wrap gap-1" aria-label="Filter materials">
            {MATERIALS.map((m) => {
              const on = settings.filters.some((f) => f.split(/[:\s]/)[0].toLowerCase() === m.toLowerCase());
              return (
                <button
                  key={m}
                  type="button"
                  aria-pressed={on}
                  onClick={() => toggleFilter(m)}
                  className={`rounded-full px-2 py-0.5 text-xs ring-1 ${on ? 'bg-accent-700 text-white ring-accent-700' : 'bg-white text-slate-700 ring-slate-300 hover:bg-slate-50'}`}
                >
                  {m}
                </button>
              );
            })}
          </div>
        </div>
      </fieldset>
      <div>
        <p className="text-sm font-medium text-slate-700">Pins (a peak fixed to a harmonic order)</p>
        <ul className="mt-1 flex flex-wrap gap-2" aria-label="Pins">
          {settings.pins.length === 0 ? <li className="text-sm text-slate-500">none</li> : null}
          {settings.pins.map((p) => (
            <li key={p.pixel} className="flex items-center gap-1 rounded bg-accent-100 px-2 py-0.5 text-sm text-accent-800">
              pixel {p.pixel} = q{p.harmonic}
              {mayRun ? (
                <button type="button" aria-label={`Remove pin at pixel ${p.pixel}`} className="ml-1 text-accent-800 hover:text-red-700" onClick={() => set('pins', settings.pins.filter((x) => x !== p))}>
                  ×
                </button>
              ) : null}
            </li>
          ))}
        </ul>
        {mayRun ? (
          <div className="mt-2 flex items-end gap-2">
            <TextField label="Pin pixel" type="number" step="any" value={pinText.pixel} onChange={(e) => setPinText((t) => ({ ...t, pixel: e.target.value }))} />
            <TextField label="Pin order q" type="number" step="1" min="1" value={pinText.harmonic} onChange={(e) => setPinText((t) => ({ ...t, harmonic: e.target.value }))} />
            <Button
              variant="secondary"
              onClick={() => {
                const pixel = Number(pinText.pixel);
                const harmonic = Number(pinText.harmonic);
                if (pinText.pixel !== '' && Number.isFinite(pixel) && Number.isInteger(harmonic) && harmonic > 0) {
                  set('pins', [...settings.pins.filter((p) => Math.abs(p.pixel - pixel) >= 1), { pixel, harmonic }]);
                  setPinText({ pixel: '', harmonic: '' });
                }
              }}
            >
              Add pin
            </Button>
          </div>
        ) : null}
      </div>
      <div>
        <p className="text-sm font-medium text-slate-700">Known lines (a peak of known photon energy: an absolute anchor of the scale)</p>
        <p className="text-xs text-slate-500">
          An emission or absorption line of known energy, or a harmonic measured elsewhere (E = q·hc/λ0), in first diffraction order. A pin fixes an order; a known line (or a filter edge
          the engine locates on a continuum) fixes the absolute scale. Use <em>Known energy…</em> in the peaks table to take a peak&apos;s pixel.
        </p>
        <ul className="mt-1 flex flex-wrap gap-2" aria-label="Known lines">
          {settings.knownLines.length === 0 ? <li className="text-sm text-slate-500">none</li> : null}
          {settings.knownLines.map((line) => (
            <li key={line.pixel} className="flex items-center gap-1 rounded bg-accent-100 px-2 py-0.5 text-sm text-accent-800">
              {knownLineText(line)}
              {mayRun ? (
                <button
                  type="button"
                  aria-label={`Remove the known line at pixel ${line.pixel}`}
                  className="ml-1 text-accent-800 hover:text-red-700"
                  onClick={() => set('knownLines', settings.knownLines.filter((x) => x !== line))}
                >
                  ×
                </button>
              ) : null}
            </li>
          ))}
        </ul>
        {mayRun ? (
          // No min/max on these: the browser would then block the Run button over a half-typed line; the schema checks them on Add.
          <div className="mt-2 flex flex-wrap items-start gap-2">
            <TextField label="Line pixel" type="number" step="any" value={lineText.pixel} error={lineErrors.pixel} onChange={(e) => setLineText((t) => ({ ...t, pixel: e.target.value }))} />
            <TextField
              label="Line energy (eV)"
              type="number"
              step="any"
              value={lineText.energyEv}
              error={lineErrors.energyEv}
              onChange={(e) => setLineText((t) => ({ ...t, energyEv: e.target.value }))}
            />
            <TextField label="Line label (optional)" value={lineText.label} error={lineErrors.label} placeholder="e.g. Ar II, H23" onChange={(e) => setLineText((t) => ({ ...t, label: e.target.value }))} />
            <Button
              variant="secondary"
              className="mt-6"
              onClick={() => {
                const parsed = parseKnownLine(lineText);
                if ('errors' in parsed) {
                  setLineErrors(parsed.errors);
                  return;
                }
                set('knownLines', withKnownLine(settings.knownLines, parsed.line));
                setLineText({ pixel: '', energyEv: '', label: '' });
                setLineErrors({});
              }}
            >
              Add known line
            </Button>
          </div>
        ) : null}
      </div>
      {mayRun ? (
        <div>
          <Button type="submit" pending={running}>
            Run the engine
          </Button>
        </div>
      ) : (
        <p className="text-sm text-slate-500">Your role may look at the workbench but not run it.</p>
      )}
    </form>
  );
}
