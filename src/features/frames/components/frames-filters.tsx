import { SelectField, TextField } from '@/components/field';

export interface FramesFilterValues {
  instrumentId: string;
  kind: string;
  tag: string;
  /** yyyy-mm-dd, local day; inclusive. */
  fromDate: string;
  /** yyyy-mm-dd, local day; inclusive (the query's `to` is the next midnight). */
  toDate: string;
  q: string;
}

export interface FramesFiltersProps {
  values: FramesFilterValues;
  instruments: { id: string; name: string }[];
  onChange(values: FramesFilterValues): void;
}

/** Filters of the frames table; each change goes to the server as a new query. */
export function FramesFilters({ values, instruments, onChange }: FramesFiltersProps) {
  const set = (key: keyof FramesFilterValues) => (e: { target: { value: string } }) => onChange({ ...values, [key]: e.target.value });
  return (
    <div className="grid grid-cols-2 gap-3 md:grid-cols-6" role="search" aria-label="Frame filters">
      <SelectField label="Instrument" value={values.instrumentId} onChange={set('instrumentId')} options={[{ value: '', label: 'all I can read' }, ...instruments.map((i) => ({ value: i.id, label: i.name }))]} />
      <SelectField label="Kind" value={values.kind} onChange={set('kind')} options={[{ value: '', label: 'any' }, { value: 'signal', label: 'signal' }, { value: 'dark', label: 'dark' }]} />
      <TextField label="Tag" value={values.tag} onChange={set('tag')} />
      <TextField label="Taken from" type="date" value={values.fromDate} onChange={set('fromDate')} />
      <TextField label="Taken until" type="date" value={values.toDate} onChange={set('toDate')} />
      <TextField label="Search" value={values.q} onChange={set('q')} hint="name, target, notes" />
    </div>
  );
}
