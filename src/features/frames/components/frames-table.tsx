import { Link } from 'react-router-dom';
import {
  createColumnHelper,
  rowPaginationFeature,
  rowSelectionFeature,
  rowSortingFeature,
  tableFeatures,
  useTable,
  type PaginationState,
  type RowSelectionState,
  type SortingState,
  type Updater,
} from '@tanstack/react-table';
import { frameSortKeys, type Frame, type FrameSortKey } from '../../../../shared/api/frames.ts';
import { Button } from '@/components/button';

const features = tableFeatures({ rowSortingFeature, rowPaginationFeature, rowSelectionFeature });
const helper = createColumnHelper<typeof features, Frame>();
const sortable = new Set<string>(frameSortKeys);

const columns = helper.columns([
  helper.display({
    id: 'select',
    header: ({ table }) => (
      <input
        type="checkbox"
        aria-label="Select every frame on this page"
        checked={table.getIsAllPageRowsSelected()}
        ref={(el) => {
          if (el) el.indeterminate = !table.getIsAllPageRowsSelected() && table.getIsSomePageRowsSelected();
        }}
        onChange={table.getToggleAllPageRowsSelectedHandler()}
      />
    ),
    cell: ({ row }) => (
      <input type="checkbox" aria-label={`Select ${row.original.originalName}`} checked={row.getIsSelected()} disabled={!row.getCanSelect()} onChange={row.getToggleSelectedHandler()} />
    ),
  }),
  helper.accessor('originalName', {
    header: 'File',
    cell: ({ row }) => (
      <Link className="font-medium whitespace-nowrap text-accent-700 hover:underline" to={`/frames/${row.original.id}`}>
        {row.original.originalName}
        {row.original.pageCount > 1 ? ` [${row.original.page + 1}/${row.original.pageCount}]` : ''}
      </Link>
    ),
  }),
  helper.accessor('instrumentName', { header: 'Instrument', enableSorting: false }),
  helper.accessor('kind', { header: 'Kind', enableSorting: false }),
  helper.accessor('takenAt', { header: 'Taken', cell: ({ getValue }) => new Date(getValue()).toLocaleString() }),
  helper.accessor('exposureS', { header: 'Exposure (s)', enableSorting: false, cell: ({ getValue }) => getValue() ?? '—' }),
  helper.accessor('driverNm', { header: 'Driver (nm)', cell: ({ getValue }) => getValue() ?? '—' }),
  helper.accessor('filters', { header: 'Filters', enableSorting: false, cell: ({ getValue }) => getValue().join(', ') || '—' }),
  helper.accessor('scanValue', {
    header: 'Scan',
    cell: ({ row }) => (row.original.scanVariable ? `${row.original.scanVariable} = ${row.original.scanValue ?? '—'}` : '—'),
  }),
  helper.accessor('tags', {
    header: 'Tags',
    enableSorting: false,
    cell: ({ getValue }) => (
      <span className="flex flex-wrap gap-1">
        {getValue().map((t) => (
          <span key={t} className="rounded bg-slate-100 px-1.5 py-0.5 text-xs text-slate-700">
            {t}
          </span>
        ))}
      </span>
    ),
  }),
  helper.accessor('createdAt', { header: 'Uploaded', cell: ({ getValue }) => new Date(getValue()).toLocaleDateString() }),
]);

export interface FramesTableProps {
  frames: Frame[];
  total: number;
  sort: FrameSortKey;
  order: 'asc' | 'desc';
  page: number;
  pageSize: number;
  onSortChange(sort: FrameSortKey, order: 'asc' | 'desc'): void;
  onPageChange(page: number, pageSize: number): void;
  selection: RowSelectionState;
  onSelectionChange(selection: RowSelectionState): void;
  /** Whether the user may select rows for a bulk edit. */
  selectable: boolean;
}

const apply = <T,>(updater: Updater<T>, current: T): T => (typeof updater === 'function' ? (updater as (old: T) => T)(current) : updater);

/**
 * The frames table: rows come sorted and paged from the server (manual sorting and pagination);
 * the table owns only the markup, the sort toggles and the row selection (kept across pages).
 */
export function FramesTable({ frames, total, sort, order, page, pageSize, onSortChange, onPageChange, selection, onSelectionChange, selectable }: FramesTableProps) {
  const sorting: SortingState = [{ id: sort, desc: order === 'desc' }];
  const pagination: PaginationState = { pageIndex: page - 1, pageSize };
  const table = useTable({
    features,
    columns,
    data: frames,
    getRowId: (row) => row.id,
    manualSorting: true,
    manualPagination: true,
    rowCount: total,
    enableMultiSort: false,
    enableSortingRemoval: false,
    enableRowSelection: selectable,
    state: { sorting, pagination, rowSelection: selection },
    onSortingChange: (updater) => {
      const next = apply(updater, sorting)[0];
      if (next && sortable.has(next.id)) onSortChange(next.id as FrameSortKey, next.desc ? 'desc' : 'asc');
    },
    onPaginationChange: (updater) => {
      const next = apply(updater, pagination);
      onPageChange(next.pageIndex + 1, next.pageSize);
    },
    onRowSelectionChange: (updater) => onSelectionChange(apply(updater, selection)),
  });
  const pageCount = Math.max(1, Math.ceil(total / pageSize));

  return (
    <div className="flex flex-col gap-3">
      <div className="overflow-x-auto rounded-md border border-slate-200">
        <table className="w-full text-sm" aria-label="Frames">
          <thead className="bg-slate-50">
            {table.getHeaderGroups().map((group) => (
              <tr key={group.id}>
                {group.headers.map((header) => {
                  const canSort = header.column.getCanSort() && sortable.has(header.column.id);
                  const dir = header.column.getIsSorted();
                  return (
                    <th
                      key={header.id}
                      className={`border-b border-slate-200 px-3 py-2 text-left font-medium whitespace-nowrap text-slate-600 ${selectable || header.column.id !== 'select' ? '' : 'hidden'}`}
                      aria-sort={dir === 'asc' ? 'ascending' : dir === 'desc' ? 'descending' : undefined}
                    >
                      {canSort ? (
                        <button type="button" className="inline-flex items-center gap-1 hover:text-slate-900" onClick={header.column.getToggleSortingHandler()}>
                          <table.FlexRender header={header} />
                          <span aria-hidden className="text-xs text-accent-700">
                            {dir === 'asc' ? '▲' : dir === 'desc' ? '▼' : '↕'}
                          </span>
                        </button>
                      ) : (
                        <table.FlexRender header={header} />
                      )}
                    </th>
                  );
                })}
              </tr>
            ))}
          </thead>
          <tbody>
            {table.getRowModel().rows.map((row) => (
              <tr key={row.id} className={`border-b border-slate-100 ${row.getIsSelected() ? 'bg-accent-50' : 'hover:bg-slate-50'}`} data-testid="frame-row">
                {row.getAllCells().map((cell) => (
                  <td key={cell.id} className={`px-3 py-2 align-top ${selectable || cell.column.id !== 'select' ? '' : 'hidden'}`}>
                    <table.FlexRender cell={cell} />
                  </td>
                ))}
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      <div className="flex flex-wrap items-center justify-between gap-3 text-sm text-slate-600">
        <span data-testid="frames-total">
          {total} frame{total === 1 ? '' : 's'} · page {page} of {pageCount}
        </span>
        <div className="flex items-center gap-2">
          <label className="flex items-center gap-1">
            rows per page
            <select className="rounded border border-slate-300 px-1.5 py-1" value={pageSize} onChange={(e) => table.setPageSize(Number(e.target.value))}>
              {[10, 25, 50, 100].map((n) => (
                <option key={n} value={n}>
                  {n}
                </option>
              ))}
            </select>
          </label>
          <Button variant="secondary" disabled={page <= 1} onClick={() => table.previousPage()}>
            Previous
          </Button>
          <Button variant="secondary" disabled={page >= pageCount} onClick={() => table.nextPage()}>
            Next
          </Button>
        </div>
      </div>
    </div>
  );
}
