// @vitest-environment happy-dom
import { afterEach, describe, expect, it, vi } from 'vitest';
import { cleanup, fireEvent, render, screen, within } from '@testing-library/react';
import { QueryClient, QueryClientProvider } from '@tanstack/react-query';
import type { ReactNode } from 'react';
import { InstrumentForm } from '@/features/instruments/components/instrument-form';
import { toFormValues } from '@/features/instruments/components/profile-form';
import { MembersTable } from '@/features/members/components/members-table';
import { linksIn, OutboxView } from '@/features/outbox/components/outbox-view';
import { ApiError } from '@/lib/api-client';
import { roleOn, canManageInstrument } from '@/features/auth/api/get-session';
import type { Member } from '../../../shared/api/members.ts';
import type { SessionInfo } from '../../../shared/api/session.ts';

afterEach(cleanup);

function withQuery(ui: ReactNode) {
  const client = new QueryClient({ defaultOptions: { queries: { retry: false } } });
  return render(<QueryClientProvider client={client}>{ui}</QueryClientProvider>);
}

/** The message element a field points at through aria-describedby. */
function messageOf(input: HTMLElement): string | null {
  const id = input.getAttribute('aria-describedby');
  return id ? (document.getElementById(id)?.textContent ?? null) : null;
}

function fill(label: RegExp, value: string) {
  fireEvent.change(screen.getByLabelText(label), { target: { value } });
}

describe('InstrumentForm', () => {
  it('shows the schema message beside the field and does not submit', () => {
    const onSubmit = vi.fn();
    render(<InstrumentForm initialValues={toFormValues()} submitLabel="Create" onSubmit={onSubmit} />);
    fill(/^name$/i, 'Invented test spectrometer');
    fill(/groove density/i, '1200');
    fill(/incidence angle/i, '95');
    fill(/distance/i, '235');
    fill(/pixel pitch/i, '13.5');
    fill(/pixel count/i, '2048');
    fireEvent.click(screen.getByRole('button', { name: 'Create' }));

    expect(onSubmit).not.toHaveBeenCalled();
    const incidence = screen.getByLabelText(/incidence angle/i);
    expect(incidence.getAttribute('aria-invalid')).toBe('true');
    expect(messageOf(incidence)).toBe('incidenceAngleDeg must be between 0 and 90 degrees');

    // Fixing the value clears the message while typing.
    fill(/incidence angle/i, '87');
    expect(messageOf(screen.getByLabelText(/incidence angle/i))).not.toMatch(/between/);
    fireEvent.click(screen.getByRole('button', { name: 'Create' }));
    expect(onSubmit).toHaveBeenCalledTimes(1);
    expect(onSubmit.mock.calls[0][0].profile.incidenceAngleDeg).toBe(87);
  });

  it('puts the server 400 field messages beside their fields', () => {
    const serverError = new ApiError(400, 'validation', 'Check the highlighted fields', {
      issues: [{ path: 'profile.pixelCount', message: 'pixelCount must be at most 65536' }],
    });
    render(<InstrumentForm initialValues={toFormValues()} submitLabel="Create" serverError={serverError} onSubmit={() => {}} />);
    expect(messageOf(screen.getByLabelText(/pixel count/i))).toBe('pixelCount must be at most 65536');
  });

  it('shows a non-field server error as an alert', () => {
    const serverError = new ApiError(403, 'forbidden', 'Only site admins create instruments');
    render(<InstrumentForm initialValues={toFormValues()} submitLabel="Create" serverError={serverError} onSubmit={() => {}} />);
    expect(screen.getByRole('alert').textContent).toContain('Only site admins create instruments');
  });
});

const members: Member[] = [
  { userId: 'u1', email: 'owner@example.test', name: 'Invented Owner', role: 'owner', createdAt: '2026-01-01T00:00:00Z' },
  { userId: 'u2', email: 'viewer@example.test', name: 'Invented Viewer', role: 'viewer', createdAt: '2026-01-02T00:00:00Z' },
];

describe('MembersTable', () => {
  it('shows roles as text and no controls when the user cannot manage', () => {
    withQuery(<MembersTable instrumentId="i1" members={members} canManage={false} />);
    const rows = screen.getAllByTestId('member-row');
    expect(rows).toHaveLength(2);
    expect(within(rows[1]).getByText('viewer')).toBeTruthy();
    expect(screen.queryByRole('combobox')).toBeNull();
    expect(screen.queryByRole('button', { name: /remove/i })).toBeNull();
  });

  it('offers a role select and remove for managers', () => {
    withQuery(<MembersTable instrumentId="i1" members={members} canManage currentUserId="u1" />);
    const select = screen.getByLabelText('Role of Invented Viewer') as HTMLSelectElement;
    expect(select.value).toBe('viewer');
    expect(Array.from(select.options).map((o) => o.value)).toEqual(['owner', 'scientist', 'student', 'viewer']);
    expect(screen.getAllByRole('button', { name: /remove/i })).toHaveLength(2);
    expect(screen.getByText('(you)')).toBeTruthy();
  });
});

describe('OutboxView', () => {
  it('lists mails and opens one with its link', () => {
    const text = 'You were invited.\n\nOpen http://127.0.0.1:5480/invite/abc123 within 7 days.';
    render(
      <OutboxView
        mails={[{ id: 'm1', from: 'Orderly <orderly@localhost>', to: 'new@example.test', subject: 'Invitation', text, html: null, receivedAt: '2026-12-01T10:00:00Z' }]}
      />,
    );
    fireEvent.click(screen.getByRole('button', { name: /invitation/i }));
    expect(screen.getByTestId('mail-link').getAttribute('href')).toBe('http://127.0.0.1:5480/invite/abc123');
  });

  it('finds each link once, without trailing punctuation the URL grammar excludes', () => {
    expect(linksIn('see https://a.test/x) and https://a.test/x again, http://b.test/y')).toEqual(['https://a.test/x', 'http://b.test/y']);
  });
});

describe('role helpers', () => {
  const session = (isAdmin: boolean, role?: 'owner' | 'viewer'): SessionInfo => ({
    user: { id: 'u', email: 'u@example.test', name: 'U', isAdmin },
    memberships: role ? [{ instrumentId: 'i1', role }] : [],
    csrfToken: 't',
  });
  it.each([
    [false, 'owner', true],
    [false, 'viewer', false],
    [true, undefined, true],
    [false, undefined, false],
  ] as const)('admin=%s role=%s → can manage %s', (isAdmin, role, expected) => {
    expect(canManageInstrument(session(isAdmin, role), 'i1')).toBe(expected);
    expect(roleOn(session(isAdmin, role), 'i1')).toBe(role ?? null);
  });
});
