// @vitest-environment happy-dom
/**
 * The frames table delegates sorting, paging and selection to its owner (the server sorts and
 * pages): clicking a header asks for the new order, a checkbox reports the selected frame ids,
 * and rows render in the order the server sent them.
 */
import { afterEach, describe, expect, it, vi } from 'vitest';
import { cleanup, fireEvent, render, screen } from '@testing-library/react';
import { MemoryRouter } from 'react-router-dom';
import type { Frame } from '../../../shared/api/frames.ts';
import { FramesTable, type FramesTableProps } from '@/features/frames/components/frames-table';

afterEach(cleanup);

function frame(id: string, name: string, takenAt: string): Frame {
  return {
    id, instrumentId: 'i1', instrumentName: 'Invented XUV', sha256: id.repeat(8), sizeBytes: 1, originalName: name, format: 'tiff', page: 0, pageCount: 1,
    width: 4, height: 2, sampleFormat: 'uint', bitsPerSample: 16, kind: 'signal', takenAt, takenAtSource: 'entered', exposureS: 0.5, accumulations: null,
    target: 'Ar', pressureMbar: null, filters: ['Al'], driverNm: 800, parity: 'odd', scanVariable: null, scanValue: null, tags: ['t'], notes: '', regions: null,
    uploadedBy: null, createdAt: takenAt, updatedAt: takenAt,
  };
}

function renderTable(overrides: Partial<FramesTableProps> = {}) {
  const props: FramesTableProps = {
    frames: [frame('b', 'second.tif', '2026-12-01T10:00:00Z'), frame('a', 'first.tif', '2026-11-30T10:00:00Z')],
    total: 60,
    sort: 'takenAt',
    order: 'desc',
    page: 1,
    pageSize: 25,
    onSortChange: vi.fn(),
    onPageChange: vi.fn(),
    selection: {},
    onSelectionChange: vi.fn(),
    selectable: true,
    ...overrides,
  };
  render(
    <MemoryRouter>
      <FramesTable {...props} />
    </MemoryRouter>,
  );
  return props;
}

describe('FramesTable', () => {
  it('keeps the server order and shows the total with the page count', () => {
    renderTable();
    const rows = screen.getAllByTestId('frame-row');
    expect(rows.map((r) => r.textContent?.includes('second.tif'))).toEqual([true, false]);
    expect(screen.getByTestId('frames-total').textContent).toBe('60 frames · page 1 of 3');
  });

  it('asks the owner for the opposite order when the sorted header is clicked, and for a new key on another', () => {
    const props = renderTable();
    fireEvent.click(screen.getByRole('button', { name: /Taken/ }));
    expect(props.onSortChange).toHaveBeenLastCalledWith('takenAt', 'asc');
    fireEvent.click(screen.getByRole('button', { name: /File/ }));
    expect(props.onSortChange).toHaveBeenCalledTimes(2);
    expect((props.onSortChange as ReturnType<typeof vi.fn>).mock.calls[1][0]).toBe('originalName');
  });

  it('reports selected frame ids and pages through the owner', () => {
    const props = renderTable();
    fireEvent.click(screen.getByRole('checkbox', { name: 'Select first.tif' }));
    expect(props.onSelectionChange).toHaveBeenLastCalledWith({ a: true });
    fireEvent.click(screen.getByRole('button', { name: 'Next' }));
    expect(props.onPageChange).toHaveBeenLastCalledWith(2, 25);
  });

  it('offers no selection to a role that may not edit', () => {
    renderTable({ selectable: false });
    expect(screen.getByRole('checkbox', { name: 'Select first.tif' }).hasAttribute('disabled')).toBe(true);
  });
});
