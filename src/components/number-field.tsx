import { useState } from 'react';
import { TextField } from './field.tsx';

export interface NumberFieldProps {
  label: string;
  value: number;
  /** How the value is shown when not being edited. */
  format?: (value: number) => string;
  onCommit(value: number): void;
  disabled?: boolean;
  hint?: string;
  step?: string;
}

/**
 * A number input that commits on Enter or blur, so typing "0." or "-" is not reformatted away
 * mid-entry; a new outside value (e.g. from dragging a handle) replaces the shown text.
 */
export function NumberField({ label, value, format = String, onCommit, disabled, hint, step = 'any' }: NumberFieldProps) {
  const shown = format(value);
  const [draft, setDraft] = useState<{ base: string; text: string } | null>(null);
  const text = draft && draft.base === shown ? draft.text : shown;
  const commit = () => {
    if (!draft) return;
    const n = Number(draft.text);
    setDraft(null);
    if (draft.text.trim() !== '' && Number.isFinite(n) && n !== value) onCommit(n);
  };
  return (
    <TextField
      label={label}
      type="number"
      step={step}
      disabled={disabled}
      hint={hint}
      value={text}
      onChange={(e) => setDraft({ base: shown, text: e.target.value })}
      onBlur={commit}
      onKeyDown={(e) => {
        if (e.key === 'Enter') {
          e.preventDefault();
          commit();
        }
      }}
    />
  );
}
