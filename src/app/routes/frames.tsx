import { useState } from 'react';
import { Link, useSearchParams } from 'react-router-dom';
import type { RowSelectionState } from '@tanstack/react-table';
import { frameSortKeys, type FrameSortKey, type ListFramesQuery } from '../../../shared/api/frames.ts';
import { useSession } from '@/features/auth/api/get-session';
import { useInstruments } from '@/features/instruments/api/get-instruments';
import { useFrames } from '@/features/frames/api/get-frames';
import { BulkEditForm } from '@/features/frames/components/bulk-edit-form';
import { FrameUpload } from '@/features/frames/components/frame-upload';
import { FramesFilters, type FramesFilterValues } from '@/features/frames/components/frames-filters';
import { FramesTable } from '@/features/frames/components/frames-table';
import { StartRunButton } from '@/features/runs/components/start-run-button';
import { ErrorAlert } from '@/components/alert';
import { SelectField } from '@/components/field';
import { EmptyState, Loading, PageHeader, Panel } from '@/components/page';

/** Local day (yyyy-mm-dd) → ISO time of its midnight; `nextDay` gives the following midnight (exclusive end). */
function dayToIso(day: string, nextDay = false): string | undefined {
  if (!day) return undefined;
  const d = new Date(`${day}T00:00:00`);
  if (Number.isNaN(d.getTime())) return undefined;
  if (nextDay) d.setDate(d.getDate() + 1);
  return d.toISOString();
}

/** /frames[?instrumentId=…] — upload, filter, sort, page and bulk-edit frames. */
export function FramesRoute() {
  const [params, setParams] = useSearchParams();
  const session = useSession();
  const instruments = useInstruments();
  const [selection, setSelection] = useState<RowSelectionState>({});

  const filters: FramesFilterValues = {
    instrumentId: params.get('instrumentId') ?? '',
    kind: params.get('kind') ?? '',
    tag: params.get('tag') ?? '',
    fromDate: params.get('from') ?? '',
    toDate: params.get('to') ?? '',
    q: params.get('q') ?? '',
  };
  const sortParam = params.get('sort') ?? 'takenAt';
  const sort: FrameSortKey = (frameSortKeys as readonly string[]).includes(sortParam) ? (sortParam as FrameSortKey) : 'takenAt';
  const order = params.get('order') === 'asc' ? 'asc' : 'desc';
  const page = Math.max(1, Number(params.get('page') ?? 1) || 1);
  const pageSize = Math.min(200, Math.max(1, Number(params.get('pageSize') ?? 25) || 25));

  const query: ListFramesQuery = {
    instrumentId: filters.instrumentId || undefined,
    kind: (filters.kind || undefined) as ListFramesQuery['kind'],
    tag: filters.tag || undefined,
    from: dayToIso(filters.fromDate),
    to: dayToIso(filters.toDate, true),
    q: filters.q || undefined,
    sort,
    order,
    page,
    pageSize,
  };
  const frames = useFrames(query);

  const update = (changes: Record<string, string | number | undefined>) => {
    const next = new URLSearchParams(params);
    for (const [k, v] of Object.entries(changes)) {
      if (v === undefined || v === '') next.delete(k);
      else next.set(k, String(v));
    }
    setParams(next, { replace: true });
  };

  const isAdmin = Boolean(session.data?.user?.isAdmin);
  const uploadable = (instruments.data ?? []).filter((i) => isAdmin || (i.myRole !== null && i.myRole !== 'viewer'));
  const mayEditSome = uploadable.length > 0;
  const [uploadTarget, setUploadTarget] = useState('');
  // On one instrument's frames, upload only there (and only when the role allows it).
  const target = filters.instrumentId
    ? uploadable.some((i) => i.id === filters.instrumentId)
      ? filters.instrumentId
      : ''
    : (uploadable.find((i) => i.id === uploadTarget)?.id ?? uploadable[0]?.id ?? '');
  const selectedIds = Object.keys(selection);
  const current = instruments.data?.find((i) => i.id === filters.instrumentId);

  return (
    <>
      <PageHeader title={current ? `Frames · ${current.name}` : 'Frames'} subtitle="Camera frames with their metadata; the server decodes every file before it keeps it." />
      <div className="flex flex-col gap-6">
        {target ? (
          <Panel title="Upload frames">
            {!filters.instrumentId && uploadable.length > 1 ? (
              <div className="mb-4 max-w-sm">
                <SelectField label="Upload to instrument" value={target} onChange={(e) => setUploadTarget(e.target.value)} options={uploadable.map((i) => ({ value: i.id, label: i.name }))} />
              </div>
            ) : null}
            <FrameUpload key={target} instrumentId={target} />
          </Panel>
        ) : null}
        <Panel title="Frames">
          <div className="flex flex-col gap-4">
            <FramesFilters
              values={filters}
              instruments={instruments.data ?? []}
              onChange={(v) => update({ instrumentId: v.instrumentId, kind: v.kind, tag: v.tag, from: v.fromDate, to: v.toDate, q: v.q, page: undefined })}
            />
            {mayEditSome && selectedIds.length > 0 ? <BulkEditForm ids={selectedIds} onClear={() => setSelection({})} /> : null}
            {filters.instrumentId && selectedIds.length > 0 && selectedIds.length <= 8 ? (
              <p className="text-sm">
                <Link className="font-medium text-accent-700 hover:underline" to={`/instruments/${filters.instrumentId}/workbench?frames=${selectedIds.join(',')}`}>
                  Open the {selectedIds.length} selected frame{selectedIds.length === 1 ? '' : 's'} in the workbench
                </Link>
              </p>
            ) : null}
            {filters.instrumentId && selectedIds.length > 0 && uploadable.some((i) => i.id === filters.instrumentId) ? (
              <div>
                <StartRunButton instrumentId={filters.instrumentId} input={{ frameIds: selectedIds }} label={`Make spectra of the ${selectedIds.length} selected`} />
              </div>
            ) : null}
            {frames.isPending ? <Loading what="Loading frames" /> : null}
            <ErrorAlert error={frames.error} title="Could not load the frames" />
            {frames.data && frames.data.total === 0 ? <EmptyState>No frames match. Upload some above.</EmptyState> : null}
            {frames.data && frames.data.total > 0 ? (
              <FramesTable
                frames={frames.data.items}
                total={frames.data.total}
                sort={sort}
                order={order}
                page={page}
                pageSize={pageSize}
                onSortChange={(s, o) => update({ sort: s, order: o, page: undefined })}
                onPageChange={(p, size) => update({ page: p > 1 ? p : undefined, pageSize: size !== 25 ? size : undefined })}
                selection={selection}
                onSelectionChange={setSelection}
                selectable={mayEditSome}
              />
            ) : null}
          </div>
        </Panel>
      </div>
    </>
  );
}
