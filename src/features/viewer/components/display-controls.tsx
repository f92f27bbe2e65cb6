import { SelectField, TextField } from '@/components/field';
import { COLOUR_MAPS, type ColourMapName } from '@/lib/frame-worker/colour-maps';
import type { DisplayScaling } from '@/lib/frame-worker/scaling';

/** What the user chose for the display; the limits are in counts. */
export interface DisplaySettings {
  scaling: DisplayScaling;
  colourMap: ColourMapName;
  /** Percentile pair the limits came from, or 'manual' once a limit was typed. */
  preset: string;
  loCounts: number;
  hiCounts: number;
}

/** Percentile pairs offered for the contrast limits (low %, high %). */
export const CONTRAST_PRESETS: Record<string, [number, number]> = {
  '1–99.5 %': [1, 99.5],
  '0.5–99.9 %': [0.5, 99.9],
  '5–99 %': [5, 99],
  'min–max': [0, 100],
};

export interface DisplayControlsProps {
  settings: DisplaySettings;
  onPreset(preset: string): void;
  onChange(settings: DisplaySettings): void;
}

/** Scaling, colour map and contrast limits (a percentile preset, or typed limits). */
export function DisplayControls({ settings, onPreset, onChange }: DisplayControlsProps) {
  const number = (value: string, fallback: number) => {
    const n = Number(value);
    return value.trim() !== '' && Number.isFinite(n) ? n : fallback;
  };
  return (
    <div className="grid grid-cols-2 gap-3 sm:grid-cols-5">
      <SelectField
        label="Scaling"
        value={settings.scaling}
        onChange={(e) => onChange({ ...settings, scaling: e.target.value as DisplayScaling })}
        options={[
          { value: 'linear', label: 'linear' },
          { value: 'log', label: 'log' },
          { value: 'asinh', label: 'asinh' },
        ]}
      />
      <SelectField
        label="Colour map"
        value={settings.colourMap}
        onChange={(e) => onChange({ ...settings, colourMap: e.target.value as ColourMapName })}
        options={COLOUR_MAPS.map((name) => ({ value: name, label: name }))}
      />
      <SelectField
        label="Contrast from histogram"
        value={settings.preset}
        onChange={(e) => onPreset(e.target.value)}
        options={[...Object.keys(CONTRAST_PRESETS).map((k) => ({ value: k, label: k })), { value: 'manual', label: 'manual' }]}
      />
      <TextField
        label="Low limit (counts)"
        type="number"
        value={String(Number(settings.loCounts.toPrecision(6)))}
        onChange={(e) => onChange({ ...settings, preset: 'manual', loCounts: number(e.target.value, settings.loCounts) })}
      />
      <TextField
        label="High limit (counts)"
        type="number"
        value={String(Number(settings.hiCounts.toPrecision(6)))}
        onChange={(e) => onChange({ ...settings, preset: 'manual', hiCounts: number(e.target.value, settings.hiCounts) })}
      />
    </div>
  );
}
