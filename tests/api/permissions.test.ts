/**
 * Role rules on the server (README, "Roles"): each test would fail if the rule it names were
 * broken. The UI hides controls; these calls go around the UI on purpose.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { paths } from '../../shared/api/paths.ts';
import { makeInstrument, makeUser, signIn, startTestApp, uniqueEmail, validProfile, PASSWORD, type TestApp } from './helpers.ts';

let t: TestApp;
beforeAll(async () => {
  t = await startTestApp({ signInLimitPerMinute: 1000 });
});
afterAll(async () => t.close());

async function world() {
  const owner = await makeUser(t.db, 'owner');
  const student = await makeUser(t.db, 'student');
  const viewer = await makeUser(t.db, 'viewer');
  const outsider = await makeUser(t.db, 'outsider');
  const mine = await makeInstrument(t.db, [
    [owner.id, 'owner'],
    [student.id, 'student'],
    [viewer.id, 'viewer'],
  ]);
  const theirs = await makeInstrument(t.db, [[outsider.id, 'owner']]);
  return { owner, student, viewer, outsider, mine, theirs };
}

describe('instrument permissions', () => {
  it('a student cannot change the instrument (403) and nothing changes', async () => {
    const w = await world();
    const c = await signIn(t.app, w.student.email);
    const res = await c.agent.patch(paths.instrument(w.mine.id)).set('X-CSRF-Token', c.csrf).send({ description: 'student edit' });
    expect(res.status).toBe(403);
    expect(res.body.error.code).toBe('forbidden');
    const after = await c.agent.get(paths.instrument(w.mine.id)).expect(200);
    expect(JSON.stringify(after.body)).not.toContain('student edit');
  });

  it('the owner can change it', async () => {
    const w = await world();
    const c = await signIn(t.app, w.owner.email);
    const res = await c.agent.patch(paths.instrument(w.mine.id)).set('X-CSRF-Token', c.csrf).send({ description: 'owner edit' });
    expect(res.status).toBe(200);
    expect(JSON.stringify(res.body)).toContain('owner edit');
  });

  it('a user of one instrument cannot read another (404, no leak) nor see it in the list', async () => {
    const w = await world();
    const c = await signIn(t.app, w.owner.email);
    const res = await c.agent.get(paths.instrument(w.theirs.id));
    expect([403, 404]).toContain(res.status);
    expect(JSON.stringify(res.body)).not.toContain(w.theirs.name);
    const list = await c.agent.get(paths.instruments()).expect(200);
    expect(JSON.stringify(list.body)).not.toContain(w.theirs.id);
    expect(JSON.stringify(list.body)).toContain(w.mine.id);
    const members = await c.agent.get(paths.members(w.theirs.id));
    expect([403, 404]).toContain(members.status);
  });

  it('a viewer cannot invite (403) and no mail is sent', async () => {
    const w = await world();
    const c = await signIn(t.app, w.viewer.email);
    const email = uniqueEmail('invitee');
    const res = await c.agent.post(paths.invitations(w.mine.id)).set('X-CSRF-Token', c.csrf).send({ email, role: 'viewer' });
    expect(res.status).toBe(403);
    const admin = await makeUser(t.db, 'admin', true);
    const a = await signIn(t.app, admin.email);
    const outbox = await a.agent.get(paths.outbox()).expect(200);
    expect(JSON.stringify(outbox.body)).not.toContain(email);
  });

  it('a student cannot change roles, and only an admin reads the Outbox', async () => {
    const w = await world();
    const c = await signIn(t.app, w.student.email);
    const res = await c.agent.patch(paths.member(w.mine.id, w.student.id)).set('X-CSRF-Token', c.csrf).send({ role: 'owner' });
    expect(res.status).toBe(403);
    expect((await c.agent.get(paths.outbox())).status).toBe(403);
  });

  it('a bad profile is refused with a 400 naming the field, and nothing is stored', async () => {
    const admin = await makeUser(t.db, 'admin', true);
    const c = await signIn(t.app, admin.email);
    const name = `Refused ${uniqueEmail('x')}`;
    const res = await c.agent
      .post(paths.instruments())
      .set('X-CSRF-Token', c.csrf)
      .send({ name, description: '', profile: { ...validProfile(), grooveDensityPerMm: -3 } });
    expect(res.status).toBe(400);
    expect(JSON.stringify(res.body.error)).toContain('grooveDensityPerMm');
    const list = await c.agent.get(paths.instruments()).expect(200);
    expect(JSON.stringify(list.body)).not.toContain(name);
  });
});

describe('invitations and accounts', () => {
  it('an invitation is mailed through SMTP, accepted once, and a duplicate e-mail cannot register', async () => {
    const w = await world();
    const c = await signIn(t.app, w.owner.email);
    const email = uniqueEmail('newcomer');
    const sent = await c.agent.post(paths.invitations(w.mine.id)).set('X-CSRF-Token', c.csrf).send({ email, role: 'scientist' });
    expect(sent.status).toBeLessThan(300);
    const admin = await makeUser(t.db, 'admin', true);
    const a = await signIn(t.app, admin.email);
    let text = '';
    for (let i = 0; i < 50 && !text.includes(email); i += 1) {
      const outbox = await a.agent.get(paths.outbox()).expect(200);
      text = JSON.stringify(outbox.body);
      if (!text.includes(email)) await new Promise((r) => setTimeout(r, 100));
    }
    const token = /\/invite\/([A-Za-z0-9_-]+)/.exec(text)?.[1];
    expect(token, 'invitation link in the captured mail').toBeTruthy();

    const fresh = request.agent(t.app);
    const s = await fresh.get(paths.session()).expect(200);
    const accepted = await fresh.post(paths.acceptInvitation(token!)).set('X-CSRF-Token', s.body.csrfToken).send({ name: 'New Comer', password: PASSWORD });
    expect(accepted.status).toBeLessThan(300);
    const again = request.agent(t.app);
    const s2 = await again.get(paths.session()).expect(200);
    const reuse = await again.post(paths.acceptInvitation(token!)).set('X-CSRF-Token', s2.body.csrfToken).send({ name: 'Second', password: PASSWORD });
    expect(reuse.status).toBeGreaterThanOrEqual(400);
    expect(reuse.status).toBeLessThan(500);

    // The same e-mail invited again cannot make a second account with it.
    const second = await c.agent.post(paths.invitations(w.mine.id)).set('X-CSRF-Token', c.csrf).send({ email: email.toUpperCase(), role: 'viewer' });
    if (second.status < 300) {
      const outbox = await a.agent.get(paths.outbox()).expect(200);
      const tokens = [...JSON.stringify(outbox.body).matchAll(/\/invite\/([A-Za-z0-9_-]+)/g)].map((m) => m[1]).filter((x) => x !== token);
      for (const other of tokens) {
        const agent = request.agent(t.app);
        const s3 = await agent.get(paths.session()).expect(200);
        const r = await agent.post(paths.acceptInvitation(other)).set('X-CSRF-Token', s3.body.csrfToken).send({ name: 'Dup', password: 'another-password-123' });
        if (r.status < 300) {
          // Accepting may add the membership to the existing account, never create a second one.
          const signed = await request.agent(t.app).post(paths.session());
          expect(signed.status).not.toBe(500);
        }
      }
    } else {
      expect(second.status).toBeLessThan(500);
    }
    const rows = await t.pool.query('SELECT count(*)::int AS n FROM users WHERE lower(email) = lower($1)', [email]);
    expect(rows.rows[0].n).toBe(1);
  });

  it('a revoked API token no longer works', async () => {
    const w = await world();
    const c = await signIn(t.app, w.owner.email);
    const made = await c.agent.post(paths.tokens()).set('X-CSRF-Token', c.csrf).send({ name: 'acquisition pc' });
    expect(made.status).toBeLessThan(300);
    const secret: string = made.body.token;
    const id: string = made.body.id ?? made.body.tokenId ?? made.body.apiToken?.id;
    expect(secret).toMatch(/^orderly_/);
    await request(t.app).get(paths.instruments()).set('Authorization', `Bearer ${secret}`).expect(200);
    await c.agent.delete(paths.token(id)).set('X-CSRF-Token', c.csrf).expect((r) => expect(r.status).toBeLessThan(300));
    expect((await request(t.app).get(paths.instruments()).set('Authorization', `Bearer ${secret}`)).status).toBe(401);
  });
});
