import { useState, type FormEvent } from 'react';
import { Button } from '@/components/button';
import { SelectField, TextAreaField, TextField } from '@/components/field';
import { ErrorAlert } from '@/components/alert';
import { ApiError, fieldErrorsFromDetails } from '@/lib/api-client';
import { parseInstrumentForm, type InstrumentFormBody, type InstrumentFormValues } from './profile-form';

export interface InstrumentFormProps {
  initialValues: InstrumentFormValues;
  submitLabel: string;
  pending?: boolean;
  /** The error of the last submit (a 400's `details.issues` land beside their fields). */
  serverError?: unknown;
  onSubmit: (body: InstrumentFormBody) => void;
  onCancel?: () => void;
}

type NumberField =
  | 'grooveDensityPerMm'
  | 'incidenceAngleDeg'
  | 'detectorDistanceMm'
  | 'pixelPitchUm'
  | 'detectorCenterPixel'
  | 'detectorAngleDeg'
  | 'detectorTiltDeg'
  | 'pixelCount';

const numberFields: { key: NumberField; label: string; hint: string; optional?: boolean }[] = [
  { key: 'grooveDensityPerMm', label: 'Groove density (lines/mm)', hint: 'e.g. 1200 for a flat-field XUV grating' },
  { key: 'incidenceAngleDeg', label: 'Incidence angle (deg from normal)', hint: 'grazing incidence is about 85–88°' },
  { key: 'detectorDistanceMm', label: 'Grating–detector distance (mm)', hint: 'along the central diffracted ray' },
  { key: 'pixelPitchUm', label: 'Pixel pitch (µm)', hint: 'along the spectral axis' },
  { key: 'pixelCount', label: 'Spectral pixel count', hint: 'pixels along the spectral axis' },
  { key: 'detectorCenterPixel', label: 'Detector centre pixel', hint: 'optional: where the nominal diffraction angle lands', optional: true },
  { key: 'detectorAngleDeg', label: 'Diffraction angle at centre pixel (deg)', hint: 'optional', optional: true },
  {
    key: 'detectorTiltDeg',
    label: 'Camera tilt (deg)',
    hint: 'optional: from square to the central ray, + when the long-wavelength end is farther from the grating; flat-field cameras sit near 90° − β',
    optional: true,
  },
];

/**
 * The instrument and profile form. Validates with the shared zod schema on submit and shows
 * each message beside its field; a server 400 adds its own field messages the same way.
 */
export function InstrumentForm({ initialValues, submitLabel, pending, serverError, onSubmit, onCancel }: InstrumentFormProps) {
  const [values, setValues] = useState<InstrumentFormValues>(initialValues);
  const [clientErrors, setClientErrors] = useState<Record<string, string>>({});
  const [submitted, setSubmitted] = useState(false);

  const serverFieldErrors =
    serverError instanceof ApiError && serverError.status === 400 ? fieldErrorsFromDetails(serverError.details) : {};
  const errors = { ...serverFieldErrors, ...clientErrors };
  const set = (key: keyof InstrumentFormValues) => (value: string) => {
    const next = { ...values, [key]: value };
    setValues(next);
    // After a first submit, re-check while typing so a fixed field's message goes away.
    if (submitted) {
      const parsed = parseInstrumentForm(next);
      setClientErrors(parsed.ok ? {} : parsed.errors);
    }
  };

  const handleSubmit = (event: FormEvent) => {
    event.preventDefault();
    setSubmitted(true);
    const parsed = parseInstrumentForm(values);
    if (!parsed.ok) {
      setClientErrors(parsed.errors);
      return;
    }
    setClientErrors({});
    onSubmit(parsed.body);
  };

  const shownServerError = serverError && Object.keys(serverFieldErrors).length === 0 ? serverError : null;
  const errorCount = Object.keys(errors).length;

  return (
    <form noValidate onSubmit={handleSubmit} className="flex flex-col gap-6" aria-label="Instrument">
      {errorCount > 0 ? (
        <p role="alert" className="text-sm font-medium text-red-700">
          {errorCount === 1 ? 'One field needs attention.' : `${errorCount} fields need attention.`}
        </p>
      ) : null}
      <ErrorAlert error={shownServerError} title="The instrument was not saved" />

      <fieldset className="grid gap-4">
        <legend className="mb-2 text-sm font-semibold tracking-wide text-slate-500 uppercase">Instrument</legend>
        <TextField label="Name" name="name" value={values.name} error={errors.name} onChange={(e) => set('name')(e.target.value)} autoComplete="off" />
        <TextAreaField
          label="Description"
          name="description"
          value={values.description}
          error={errors.description}
          onChange={(e) => set('description')(e.target.value)}
          hint="What it is and where it stands, for the people you invite"
        />
      </fieldset>

      <fieldset className="grid gap-4 sm:grid-cols-2">
        <legend className="mb-2 text-sm font-semibold tracking-wide text-slate-500 uppercase">Profile (nominal geometry)</legend>
        <SelectField
          label="Spectral axis of the frame"
          name="spectralAxis"
          value={values.spectralAxis}
          error={errors['profile.spectralAxis']}
          onChange={(e) => set('spectralAxis')(e.target.value)}
          options={[
            { value: 'x', label: 'x (columns)' },
            { value: 'y', label: 'y (rows)' },
          ]}
        />
        <SelectField
          label="Wavelength along the pixels"
          name="wavelengthIncreasesWithPixel"
          value={values.wavelengthIncreasesWithPixel}
          error={errors['profile.wavelengthIncreasesWithPixel']}
          onChange={(e) => set('wavelengthIncreasesWithPixel')(e.target.value)}
          options={[
            { value: 'true', label: 'increases with pixel index' },
            { value: 'false', label: 'decreases with pixel index' },
          ]}
        />
        {numberFields.map((f) => (
          <TextField
            key={f.key}
            label={f.label}
            name={f.key}
            inputMode="decimal"
            autoComplete="off"
            hint={f.hint}
            value={values[f.key]}
            error={errors[`profile.${f.key}`]}
            onChange={(e) => set(f.key)(e.target.value)}
          />
        ))}
        <div className="sm:col-span-2">
          <TextAreaField
            label="Notes"
            name="notes"
            value={values.notes}
            error={errors['profile.notes']}
            onChange={(e) => set('notes')(e.target.value)}
            hint="Optional: filters fitted, slit, camera model, anything a colleague should know"
          />
        </div>
      </fieldset>

      <div className="flex gap-3">
        <Button type="submit" pending={pending}>
          {submitLabel}
        </Button>
        {onCancel ? (
          <Button variant="secondary" onClick={onCancel}>
            Cancel
          </Button>
        ) : null}
      </div>
    </form>
  );
}
