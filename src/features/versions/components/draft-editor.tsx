import { useState } from 'react';
import type { VersionDetail } from '../../../../shared/api/versions.ts';
import { ErrorAlert } from '@/components/alert';
import { Button } from '@/components/button';
import { TextAreaField, TextField } from '@/components/field';
import { useUpdateVersion } from '../api/update-version.ts';

/** ISO time → the value a datetime-local input shows (local time, minutes). */
function toLocalInput(iso: string | null): string {
  if (!iso) return '';
  const d = new Date(iso);
  const pad = (n: number) => String(n).padStart(2, '0');
  return `${d.getFullYear()}-${pad(d.getMonth() + 1)}-${pad(d.getDate())}T${pad(d.getHours())}:${pad(d.getMinutes())}`;
}

/** Edits a draft's note and validity (the server refuses this once the version left draft). */
export function DraftEditor({ version }: { version: VersionDetail }) {
  const [note, setNote] = useState(version.note);
  const [validFrom, setValidFrom] = useState(toLocalInput(version.validFrom));
  const [validUntil, setValidUntil] = useState(toLocalInput(version.validUntil));
  const update = useUpdateVersion(version.id);
  return (
    <form
      className="flex flex-col gap-3"
      aria-label="Edit draft"
      onSubmit={(e) => {
        e.preventDefault();
        update.mutate({ note, validFrom: new Date(validFrom).toISOString(), validUntil: validUntil ? new Date(validUntil).toISOString() : null });
      }}
    >
      <div className="grid grid-cols-1 gap-3 md:grid-cols-2">
        <TextField label="Valid from" type="datetime-local" required value={validFrom} onChange={(e) => setValidFrom(e.target.value)} />
        <TextField label="Valid until (optional)" type="datetime-local" value={validUntil} onChange={(e) => setValidUntil(e.target.value)} />
      </div>
      <TextAreaField label="Note" value={note} onChange={(e) => setNote(e.target.value)} />
      <ErrorAlert error={update.error} title="The draft was not changed" />
      {update.isSuccess ? <p className="text-sm text-accent-800" role="status">Draft updated.</p> : null}
      <div>
        <Button type="submit" variant="secondary" pending={update.isPending}>
          Save draft changes
        </Button>
      </div>
    </form>
  );
}
