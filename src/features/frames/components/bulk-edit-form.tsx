import { useState } from 'react';
import type { FrameMetadataInput } from '../../../../shared/api/frames.ts';
import { Alert, ErrorAlert } from '@/components/alert';
import { Button } from '@/components/button';
import { SelectField, TextField } from '@/components/field';
import { useBulkUpdateFrames } from '../api/bulk-update-frames.ts';

type FieldKey = 'kind' | 'tags' | 'filters' | 'target' | 'driverNm' | 'parity' | 'exposureS' | 'scanVariable' | 'notes';

const FIELDS: { key: FieldKey; label: string }[] = [
  { key: 'tags', label: 'Tags (comma-separated)' },
  { key: 'filters', label: 'Filters (comma-separated)' },
  { key: 'kind', label: 'Kind' },
  { key: 'target', label: 'Gas or target' },
  { key: 'driverNm', label: 'Driver wavelength (nm)' },
  { key: 'parity', label: 'Parity' },
  { key: 'exposureS', label: 'Exposure (s)' },
  { key: 'scanVariable', label: 'Scan variable' },
  { key: 'notes', label: 'Notes' },
];

function toSet(key: FieldKey, value: string): FrameMetadataInput {
  const list = () => value.split(',').map((s) => s.trim()).filter(Boolean);
  switch (key) {
    case 'tags':
      return { tags: list() };
    case 'filters':
      return { filters: list() };
    case 'kind':
      return { kind: value as 'signal' | 'dark' };
    case 'parity':
      return { parity: value === '' ? null : (value as 'odd' | 'all') };
    case 'driverNm':
    case 'exposureS':
      return { [key]: value.trim() === '' ? null : Number(value) };
    default:
      return { [key]: value };
  }
}

/** Sets one metadata field on every selected frame (all or nothing on the server); the selection stays until cleared. */
export function BulkEditForm({ ids, onClear }: { ids: string[]; onClear(): void }) {
  const [key, setKey] = useState<FieldKey>('tags');
  const [value, setValue] = useState('');
  const bulk = useBulkUpdateFrames();
  return (
    <form
      className="flex flex-col gap-3 rounded-md border border-accent-100 bg-accent-50/50 p-4"
      aria-label="Bulk edit"
      onSubmit={(e) => {
        e.preventDefault();
        bulk.mutate({ ids, set: toSet(key, value) });
      }}
    >
      <p className="text-sm font-medium text-slate-800">
        Edit {ids.length} selected frame{ids.length === 1 ? '' : 's'}
      </p>
      <div className="grid grid-cols-1 gap-3 md:grid-cols-[14rem_1fr_auto] md:items-end">
        <SelectField label="Field" value={key} onChange={(e) => setKey(e.target.value as FieldKey)} options={FIELDS.map((f) => ({ value: f.key, label: f.label }))} />
        {key === 'kind' ? (
          <SelectField label="New value" value={value} onChange={(e) => setValue(e.target.value)} options={[{ value: '', label: 'choose…' }, { value: 'signal', label: 'signal' }, { value: 'dark', label: 'dark' }]} />
        ) : key === 'parity' ? (
          <SelectField label="New value" value={value} onChange={(e) => setValue(e.target.value)} options={[{ value: '', label: '— (clear)' }, { value: 'odd', label: 'odd orders' }, { value: 'all', label: 'all orders' }]} />
        ) : (
          <TextField label="New value" value={value} onChange={(e) => setValue(e.target.value)} />
        )}
        <div className="flex gap-2">
          <Button type="submit" pending={bulk.isPending}>
            Apply to {ids.length}
          </Button>
          <Button variant="ghost" onClick={onClear}>
            Clear selection
          </Button>
        </div>
      </div>
      <ErrorAlert error={bulk.error} title="Nothing was changed" />
      {bulk.isSuccess ? <Alert tone="success">{bulk.data.updated} frames updated.</Alert> : null}
    </form>
  );
}
