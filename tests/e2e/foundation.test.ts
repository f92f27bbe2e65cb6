/**
 * The foundation in a real browser: the built client (dist/client) served by the real server,
 * on a fresh migrated database, with the in-process mail sink. Build first: `npx vite build`.
 *
 * Story: an admin signs in, creates an instrument through the form (after the form refuses an
 * out-of-range angle), invites a scientist by e-mail, reads the mail in the Outbox, and the
 * invitee follows the link, chooses a name and password and lands on the instrument as
 * scientist. A viewer then sees no edit or invite controls, and the server refuses the edit
 * anyway. All people, addresses and instrument values are invented.
 */
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import type { Page } from 'playwright-core';
import { signIn, startE2eServer, type E2eServer } from '../support/e2e-server.ts';
import { createDb, createPool } from '../../server/db/client.ts';
import { createUser } from '../../server/modules/users/service.ts';
import { findUserByEmail } from '../../server/modules/users/queries.ts';
import { insertMembership } from '../../server/modules/members/queries.ts';
import { launchBrowser, screenshot, type LaunchedBrowser } from '../support/browser.ts';

const ADMIN = { email: 'e2e-admin@example.test', password: 'e2e-admin-password', name: 'Ada Admin (invented)' };
const INVITEE = { email: 'e2e-scientist@example.test', password: 'e2e-scientist-password', name: 'Sami Scientist (invented)' };
const VIEWER = { email: 'e2e-viewer@example.test', password: 'e2e-viewer-password', name: 'Vera Viewer (invented)' };
const INSTRUMENT = 'E2E flat-field XUV (invented)';


/** The text of the message a form field points at through aria-describedby. */
async function fieldMessage(page: Page, label: RegExp): Promise<string> {
  const id = await page.getByLabel(label).getAttribute('aria-describedby');
  if (!id) return '';
  // React's useId ids hold characters CSS selectors would need escaped; look the id up directly.
  return page.evaluate((describedBy) => document.getElementById(describedBy)?.textContent ?? '', id);
}

describe('foundation in the browser', () => {
  let server: E2eServer;
  let browser: LaunchedBrowser;
  let pool: ReturnType<typeof createPool>;
  let instrumentId = '';

  beforeAll(async () => {
    const databaseUrl = inject('databaseUrl');
    server = await startE2eServer(databaseUrl, 'foundation');
    pool = createPool(databaseUrl, 2);
    const db = createDb(pool);
    await createUser(db, { ...ADMIN, isAdmin: true });
    browser = await launchBrowser();
  });

  afterAll(async () => {
    await browser?.close();
    await pool?.end();
    await server?.close();
  });

  it('admin creates an instrument, invites a scientist by mail, and the invitee joins as scientist', async () => {
    const { page } = browser;
    const base = server.url;

    // Signed out, a protected page sends you to sign-in; a wrong password shows the API's message.
    await page.goto(`${base}/instruments`);
    await page.waitForURL(/\/sign-in\?next=/);
    await page.getByLabel('E-mail').fill(ADMIN.email);
    await page.getByLabel('Password').fill('not-the-password');
    await page.getByRole('button', { name: 'Sign in' }).click();
    await expect.poll(() => page.getByRole('alert').first().textContent()).toContain('Wrong e-mail or password');

    await page.getByLabel('Password').fill(ADMIN.password);
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.getByRole('heading', { name: 'Instruments', exact: true }).waitFor();
    expect(await page.getByTestId('signed-in-user').textContent()).toContain(ADMIN.name);
    expect(await page.getByRole('link', { name: 'Outbox' }).count()).toBe(1);

    // Create an instrument; an out-of-range incidence angle is refused beside its field first.
    await page.getByRole('link', { name: 'New instrument' }).click();
    await page.getByLabel('Name', { exact: true }).fill(INSTRUMENT);
    await page.getByLabel('Description').fill('Grazing-incidence flat-field spectrometer, invented for the browser test.');
    await page.getByLabel(/Groove density/).fill('1200');
    await page.getByLabel(/Incidence angle/).fill('95');
    await page.getByLabel(/distance/).fill('235');
    await page.getByLabel(/Pixel pitch/).fill('13.5');
    await page.getByLabel(/Spectral pixel count/).fill('2048');
    await page.getByLabel(/Wavelength along the pixels/).selectOption('false');
    await page.getByRole('button', { name: 'Create instrument' }).click();
    await expect.poll(() => fieldMessage(page, /Incidence angle/)).toBe('incidenceAngleDeg must be between 0 and 90 degrees');
    expect(await page.getByLabel(/Incidence angle/).getAttribute('aria-invalid')).toBe('true');
    expect(page.url()).toMatch(/\/instruments\/new$/);
    await screenshot(page, 'instrument-form-error');

    await page.getByLabel(/Incidence angle/).fill('87');
    await page.getByRole('button', { name: 'Create instrument' }).click();
    await page.getByRole('heading', { name: INSTRUMENT, exact: true }).waitFor();
    instrumentId = /\/instruments\/([0-9a-f-]{36})$/.exec(page.url())?.[1] ?? '';
    expect(instrumentId).not.toBe('');
    const caution = page.getByRole('complementary', { name: 'Safety caution' });
    expect(await caution.textContent()).toContain('Class 4 lasers');
    expect(await page.getByText('No calibration versions yet.').count()).toBe(1);
    expect(await page.getByText('1200 lines/mm').count()).toBe(1);
    expect(await page.getByRole('link', { name: 'Edit profile' }).count()).toBe(1);
    await screenshot(page, 'instrument');

    // The list shows it with the creator's role and the spectrometer in one line.
    await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Instruments' }).click();
    const row = page.getByRole('row', { name: new RegExp(INSTRUMENT.replace(/[()]/g, '\\$&')) });
    await row.waitFor();
    expect(await row.textContent()).toContain('1200 lines/mm · 87° incidence');
    expect(await row.getByTestId('my-role').textContent()).toBe('owner');
    await screenshot(page, 'instruments');

    // Invite a scientist.
    await row.getByRole('link', { name: INSTRUMENT }).click();
    await page.getByRole('link', { name: 'Members' }).click();
    await page.getByRole('form', { name: 'Invite a member' }).waitFor();
    await page.getByLabel('E-mail').fill(INVITEE.email);
    await page.getByLabel('Role', { exact: true }).selectOption('scientist');
    await page.getByRole('button', { name: 'Send invitation' }).click();
    await page.getByText(`Invitation sent to ${INVITEE.email} as scientist`).waitFor();
    await page.getByTestId('invitation-row').filter({ hasText: INVITEE.email }).waitFor();
    await screenshot(page, 'members');

    // The Outbox holds the mail (it arrives through SMTP, so poll); open it and read the link.
    await page.getByRole('link', { name: 'Outbox' }).click();
    const mailButton = page.getByRole('list', { name: 'Captured mails' }).getByRole('button', { name: new RegExp(INVITEE.email) });
    await mailButton.waitFor({ timeout: 20_000 });
    await mailButton.click();
    const link = page.getByTestId('mail-link').filter({ hasText: '/invite/' });
    const href = await link.getAttribute('href');
    expect(href).toMatch(new RegExp(`^${base}/invite/[^/]+$`));
    await screenshot(page, 'outbox');

    // Follow it. The admin is still signed in on this browser, so the page asks to sign out first.
    await link.click();
    await page.getByText(`You are signed in as ${ADMIN.email}`).waitFor();
    await page.getByRole('button', { name: 'Sign out' }).last().click();
    await page.getByLabel('Your name').fill(INVITEE.name);
    await page.getByLabel('Choose a password').fill('short');
    await page.getByRole('button', { name: 'Create account and join' }).click();
    await expect.poll(() => fieldMessage(page, /Choose a password/)).toBe('password must be at least 10 characters');
    await page.getByLabel('Choose a password').fill(INVITEE.password);
    await page.getByRole('button', { name: 'Create account and join' }).click();

    await page.getByRole('heading', { name: INSTRUMENT, exact: true }).waitFor();
    expect(page.url()).toBe(`${base}/instruments/${instrumentId}`);
    expect(await page.getByTestId('signed-in-user').textContent()).toContain(INVITEE.name);
    expect(await page.getByTestId('instrument-role').textContent()).toContain('scientist');
    expect(await page.getByRole('link', { name: 'Edit profile' }).count()).toBe(0);
    expect(await page.getByRole('link', { name: 'Outbox' }).count()).toBe(0);

    await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Instruments' }).click();
    const ownRow = page.getByRole('row', { name: new RegExp(INSTRUMENT.replace(/[()]/g, '\\$&')) });
    await ownRow.waitFor();
    expect(await ownRow.getByTestId('my-role').textContent()).toBe('scientist');
  });

  it('a viewer sees no edit, invite or member controls, the server refuses the edit anyway, and API tokens work until revoked', async () => {
    expect(instrumentId).not.toBe('');
    const db = createDb(pool);
    const viewer = await createUser(db, VIEWER);
    await insertMembership(db, { userId: viewer.id, instrumentId, role: 'viewer' });
    expect((await findUserByEmail(db, VIEWER.email))?.id).toBe(viewer.id);

    const { page } = browser;
    const base = server.url;
    await page.getByRole('button', { name: 'Sign out' }).click();
    await page.waitForURL(/\/sign-in/);
    await signIn(page, base, VIEWER);

    await page.goto(`${base}/instruments/${instrumentId}`);
    await page.getByRole('heading', { name: INSTRUMENT, exact: true }).waitFor();
    expect(await page.getByTestId('instrument-role').textContent()).toContain('viewer');
    expect(await page.getByRole('link', { name: 'Edit profile' }).count()).toBe(0);
    expect(await page.getByRole('button', { name: 'Delete instrument' }).count()).toBe(0);

    await page.getByRole('link', { name: 'Members' }).click();
    await page.getByTestId('member-row').first().waitFor();
    expect(await page.getByTestId('member-row').count()).toBe(3);
    expect(await page.getByRole('form', { name: 'Invite a member' }).count()).toBe(0);
    expect(await page.getByRole('combobox').count()).toBe(0);
    expect(await page.getByRole('button', { name: 'Remove' }).count()).toBe(0);

    // Hiding is not protection: the same edit sent from this browser session is refused.
    const answer = await page.evaluate(async (id) => {
      const session = await (await fetch('/api/session')).json();
      const res = await fetch(`/api/instruments/${id}`, {
        method: 'PATCH',
        headers: { 'Content-Type': 'application/json', 'X-CSRF-Token': session.csrfToken },
        body: JSON.stringify({ name: 'renamed by a viewer' }),
      });
      return { status: res.status, body: await res.json() };
    }, instrumentId);
    expect(answer.status).toBe(403);
    expect(answer.body.error.code).toBe('forbidden');

    // Account: a personal API token is shown once, works as a Bearer token without the cookie,
    // and stops working once revoked.
    await page.getByRole('link', { name: 'Account' }).click();
    await page.getByLabel('Token name').fill('e2e analysis script');
    await page.getByRole('button', { name: 'Create token' }).click();
    const secret = (await page.getByTestId('new-token').textContent())?.trim() ?? '';
    expect(secret).toMatch(/^orderly_/);
    const row = page.getByTestId('token-row').filter({ hasText: 'e2e analysis script' });
    await row.waitFor();
    const withToken = (token: string) =>
      page.evaluate(async (t) => (await fetch('/api/instruments', { credentials: 'omit', headers: { Authorization: `Bearer ${t}` } })).status, token);
    expect(await withToken(secret)).toBe(200);
    await row.getByRole('button', { name: 'Revoke' }).click();
    await expect.poll(() => row.textContent()).toContain('revoked');
    expect(await withToken(secret)).toBe(401);
  });
});
