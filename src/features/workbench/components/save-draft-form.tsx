import { useState } from 'react';
import { Link } from 'react-router-dom';
import type { Version } from '../../../../shared/api/versions.ts';
import { ErrorAlert } from '@/components/alert';
import { Button } from '@/components/button';
import { TextAreaField, TextField } from '@/components/field';

export interface SaveDraftFormProps {
  /** False while the run is not unique: a draft needs decided orders. */
  unique: boolean;
  onSave(input: { validFrom: string; validUntil: string | null; note: string }): Promise<Version>;
  onSubmit(versionId: string): Promise<unknown>;
  saveError: unknown;
  submitError: unknown;
}

/** Save the run as a draft version (validity from the realignment time) and submit it for review. */
export function SaveDraftForm({ unique, onSave, onSubmit, saveError, submitError }: SaveDraftFormProps) {
  const [validFrom, setValidFrom] = useState('');
  const [validUntil, setValidUntil] = useState('');
  const [note, setNote] = useState('');
  const [saved, setSaved] = useState<Version | null>(null);
  const [submitted, setSubmitted] = useState(false);
  const [busy, setBusy] = useState(false);
  const iso = (local: string) => new Date(local).toISOString();

  if (saved) {
    return (
      <div className="flex flex-col gap-3" data-testid="saved-draft">
        <p className="text-sm text-slate-700">
          Saved as draft{' '}
          <Link className="font-medium text-accent-700 hover:underline" to={`/versions/${saved.id}`}>
            version {saved.number}
          </Link>
          {submitted ? ', submitted for review.' : '.'}
        </p>
        {!submitted ? (
          <div>
            <Button
              pending={busy}
              onClick={() => {
                setBusy(true);
                onSubmit(saved.id)
                  .then(() => setSubmitted(true))
                  .catch(() => undefined)
                  .finally(() => setBusy(false));
              }}
            >
              Submit for review
            </Button>
          </div>
        ) : null}
        <ErrorAlert error={submitError} title="Not submitted" />
      </div>
    );
  }

  return (
    <form
      className="flex flex-col gap-3"
      aria-label="Save as draft"
      onSubmit={(e) => {
        e.preventDefault();
        if (!validFrom) return;
        setBusy(true);
        onSave({ validFrom: iso(validFrom), validUntil: validUntil ? iso(validUntil) : null, note })
          .then(setSaved)
          .catch(() => undefined)
          .finally(() => setBusy(false));
      }}
    >
      <div className="grid grid-cols-1 gap-3 md:grid-cols-2">
        <TextField label="Valid from (realignment time)" type="datetime-local" required value={validFrom} onChange={(e) => setValidFrom(e.target.value)} hint="when the spectrometer was realigned; frames taken since then use this version" />
        <TextField label="Valid until (optional)" type="datetime-local" value={validUntil} onChange={(e) => setValidUntil(e.target.value)} hint="blank: until a later version takes over" />
      </div>
      <TextAreaField label="Note" value={note} onChange={(e) => setNote(e.target.value)} placeholder="what was realigned, which frames, anything a reviewer should know" />
      <ErrorAlert error={saveError} title="The draft was not saved" />
      <div>
        <Button type="submit" pending={busy} disabled={!unique || !validFrom}>
          Save as draft
        </Button>
        {!unique ? <span className="ml-3 text-sm text-amber-800">Pin an order first: a draft needs a unique result.</span> : null}
      </div>
    </form>
  );
}
