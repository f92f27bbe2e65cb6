/** Known lines (a peak of known first-order photon energy) as the workbench form holds them. */
import { knownLineSchema, type KnownLineInput } from '../../../../shared/api/workbench.ts';

export type KnownLine = KnownLineInput;

/** Adds or replaces the known line on a peak (lines closer than 1 px are the same peak), sorted by pixel. */
export function withKnownLine(lines: readonly KnownLine[], line: KnownLine): KnownLine[] {
  return [...lines.filter((l) => Math.abs(l.pixel - line.pixel) >= 1), line].sort((a, b) => a.pixel - b.pixel);
}

/**
 * The form's text fields as a known line, checked with the API's own schema: the line, or the
 * message for each field that is wrong.
 */
export function parseKnownLine(text: { pixel: string; energyEv: string; label: string }): { line: KnownLine } | { errors: Partial<Record<'pixel' | 'energyEv' | 'label', string>> } {
  const candidate = {
    pixel: text.pixel.trim() === '' ? undefined : Number(text.pixel),
    energyEv: text.energyEv.trim() === '' ? undefined : Number(text.energyEv),
    ...(text.label.trim() ? { label: text.label.trim() } : {}),
  };
  const parsed = knownLineSchema.safeParse(candidate);
  if (parsed.success) return { line: parsed.data };
  const errors: Partial<Record<'pixel' | 'energyEv' | 'label', string>> = {};
  for (const issue of parsed.error.issues) {
    const key = issue.path[0] as 'pixel' | 'energyEv' | 'label';
    errors[key] ??= issue.message;
  }
  return { errors };
}

/** "Ar II: px 812.4 = 26.81 eV" for lists. */
export function knownLineText(line: KnownLine): string {
  return `${line.label ? `${line.label}: ` : ''}px ${line.pixel} = ${line.energyEv} eV`;
}
