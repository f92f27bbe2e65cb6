import { SelectField } from '@/components/field';
import { NumberField } from '@/components/number-field';
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
      <NumberField label="Low limit (counts)" value={settings.loCounts} format={(v) => String(Number(v.toPrecision(6)))} onCommit={(loCounts) => onChange({ ...settings, preset: 'manual', loCounts })} />
      <NumberField label="High limit (counts)" value={settings.hiCounts} format={(v) => String(Number(v.toPrecision(6)))} onCommit={(hiCounts) => onChange({ ...settings, preset: 'manual', hiCounts })} />
    </div>
  );
}
