import type { SpectrumAxis } from '../lib/spectrum-axis';

const choices: Array<{ value: SpectrumAxis; label: string }> = [
  { value: 'wavelength', label: 'Wavelength (nm)' },
  { value: 'energy', label: 'Photon energy (eV)' },
];

/** Wavelength ↔ photon-energy switch, a radio group so it reads as one choice. */
export function AxisToggle({ value, onChange }: { value: SpectrumAxis; onChange: (axis: SpectrumAxis) => void }) {
  return (
    <div role="radiogroup" aria-label="Spectrum axis" className="inline-flex rounded-md bg-slate-100 p-0.5 ring-1 ring-slate-200 print:hidden">
      {choices.map((c) => (
        <button
          key={c.value}
          type="button"
          role="radio"
          aria-checked={value === c.value}
          onClick={() => onChange(c.value)}
          className={`rounded px-3 py-1.5 text-sm font-medium ${value === c.value ? 'bg-white text-accent-800 shadow-xs ring-1 ring-slate-200' : 'text-slate-600 hover:text-slate-900'}`}
        >
          {c.label}
        </button>
      ))}
    </div>
  );
}
