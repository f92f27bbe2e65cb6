import { createInstrumentSchema } from '../../../../shared/api/instruments.ts';
import type { Instrument } from '../../../../shared/api/instruments.ts';
import type { InstrumentProfileInput } from '../../../../shared/api/instrument-profile.ts';

/**
 * The instrument form as the browser holds it: every input as typed text, so a half-typed
 * number is never lost. `parseInstrumentForm` turns it into the API body and validates it with
 * the same zod schema the server uses.
 */
export interface InstrumentFormValues {
  name: string;
  description: string;
  spectralAxis: string;
  grooveDensityPerMm: string;
  incidenceAngleDeg: string;
  detectorDistanceMm: string;
  pixelPitchUm: string;
  wavelengthIncreasesWithPixel: string;
  detectorCenterPixel: string;
  detectorAngleDeg: string;
  detectorTiltDeg: string;
  pixelCount: string;
  notes: string;
}

/** The body of POST /api/instruments and PATCH /api/instruments/:id that the form sends. */
export interface InstrumentFormBody {
  name: string;
  description: string;
  profile: InstrumentProfileInput;
}

export type ParseResult = { ok: true; body: InstrumentFormBody } | { ok: false; errors: Record<string, string> };

const text = (n: number | undefined) => (n === undefined || n === null ? '' : String(n));

/** Form values for a new instrument (blank numbers) or for editing an existing one. */
export function toFormValues(instrument?: Pick<Instrument, 'name' | 'description' | 'profile'>): InstrumentFormValues {
  const p = instrument?.profile;
  return {
    name: instrument?.name ?? '',
    description: instrument?.description ?? '',
    spectralAxis: p?.spectralAxis ?? 'x',
    grooveDensityPerMm: text(p?.grooveDensityPerMm),
    incidenceAngleDeg: text(p?.incidenceAngleDeg),
    detectorDistanceMm: text(p?.detectorDistanceMm),
    pixelPitchUm: text(p?.pixelPitchUm),
    wavelengthIncreasesWithPixel: p ? String(p.wavelengthIncreasesWithPixel) : 'true',
    detectorCenterPixel: text(p?.detectorCenterPixel),
    detectorAngleDeg: text(p?.detectorAngleDeg),
    detectorTiltDeg: text(p?.detectorTiltDeg),
    pixelCount: text(p?.pixelCount),
    notes: p?.notes ?? '',
  };
}

/**
 * Typed text → number: blank is "not given" (undefined), anything else goes through Number so
 * "12,5" or "abc" become NaN and the schema names the field. Decimal commas are not guessed at.
 */
function numberOrUndefined(value: string): number | undefined {
  const trimmed = value.trim();
  return trimmed === '' ? undefined : Number(trimmed);
}

/** Builds the API body from the form and validates it; errors are keyed by path ("profile.pixelCount"). */
export function parseInstrumentForm(values: InstrumentFormValues): ParseResult {
  const raw = {
    name: values.name,
    description: values.description,
    profile: {
      spectralAxis: values.spectralAxis,
      grooveDensityPerMm: numberOrUndefined(values.grooveDensityPerMm),
      incidenceAngleDeg: numberOrUndefined(values.incidenceAngleDeg),
      detectorDistanceMm: numberOrUndefined(values.detectorDistanceMm),
      pixelPitchUm: numberOrUndefined(values.pixelPitchUm),
      wavelengthIncreasesWithPixel: values.wavelengthIncreasesWithPixel === 'true',
      detectorCenterPixel: numberOrUndefined(values.detectorCenterPixel),
      detectorAngleDeg: numberOrUndefined(values.detectorAngleDeg),
      detectorTiltDeg: numberOrUndefined(values.detectorTiltDeg),
      pixelCount: numberOrUndefined(values.pixelCount),
      notes: values.notes.trim() === '' ? undefined : values.notes,
    },
  };
  const result = createInstrumentSchema.safeParse(raw);
  if (result.success) {
    const { name, description, profile } = result.data;
    return { ok: true, body: { name, description, profile } };
  }
  const errors: Record<string, string> = {};
  for (const issue of result.error.issues) {
    const key = issue.path.map(String).join('.');
    if (!(key in errors)) errors[key] = issue.message;
  }
  return { ok: false, errors };
}
