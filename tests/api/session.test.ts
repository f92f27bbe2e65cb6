/**
 * Sign-in, sessions, CSRF and the sign-in rate limit, against the real app and PostgreSQL.
 * Expected behaviour is the contract in /tmp/webcontract.md and OWASP session practice
 * (regenerate at sign-in, destroy at sign-out, CSRF token on state changes) — common practice.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { sql } from 'drizzle-orm';
import { paths } from '../../shared/api/paths.ts';
import { makeInstrument, makeUser, PASSWORD, signIn, startTestApp, type TestApp } from './helpers.ts';

let t: TestApp;
beforeAll(async () => {
  t = await startTestApp({ signInLimitPerMinute: 10 });
});
afterAll(async () => {
  await t.close();
});

function sessionCookie(res: request.Response): string | undefined {
  const cookies = res.headers['set-cookie'] as unknown as string[] | undefined;
  return cookies?.find((c) => c.startsWith('orderly.sid='))?.split(';')[0];
}

describe('health and unknown routes', () => {
  it('GET /api/health answers {ok:true}', async () => {
    const res = await request(t.app).get(paths.health()).expect(200);
    expect(res.body).toEqual({ ok: true });
  });

  it('an unknown /api route is a JSON 404 in the error shape', async () => {
    const res = await request(t.app).get('/api/no-such-thing').expect(404);
    expect(res.body.error.code).toBe('not_found');
    expect(res.body.error.message).toContain('/api/no-such-thing');
  });

  it('a body that is not JSON is a 400 validation error, not a 500', async () => {
    const agent = request.agent(t.app);
    const { body } = await agent.get(paths.session());
    const res = await agent.post(paths.session()).set('X-CSRF-Token', body.csrfToken).set('Content-Type', 'application/json').send('{"email":');
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('validation');
  });
});

describe('sign-in', () => {
  it('signed out, GET /api/session is 200 with user null and a CSRF token', async () => {
    const res = await request(t.app).get(paths.session()).expect(200);
    expect(res.body.user).toBeNull();
    expect(res.body.memberships).toEqual([]);
    expect(typeof res.body.csrfToken).toBe('string');
    expect(res.body.csrfToken.length).toBeGreaterThanOrEqual(32);
  });

  it('a wrong password does not sign in (401) and leaves the session signed out', async () => {
    const user = await makeUser(t.db, 'wrongpass');
    const agent = request.agent(t.app);
    const { body } = await agent.get(paths.session());
    const res = await agent.post(paths.session()).set('X-CSRF-Token', body.csrfToken).send({ email: user.email, password: 'not-the-password' });
    expect(res.status).toBe(401);
    expect(res.body.error.code).toBe('unauthenticated');
    expect((await agent.get(paths.session())).body.user).toBeNull();
    expect((await agent.get(paths.instruments())).status).toBe(401);
  });

  it('an unknown e-mail is the same 401 as a wrong password', async () => {
    const agent = request.agent(t.app);
    const { body } = await agent.get(paths.session());
    const res = await agent.post(paths.session()).set('X-CSRF-Token', body.csrfToken).send({ email: 'nobody-here@lab.test', password: PASSWORD });
    expect(res.status).toBe(401);
    expect(res.body.error.message).toBe('Wrong e-mail or password.');
  });

  it('the right password signs in, in any letter case of the e-mail, with memberships listed', async () => {
    const user = await makeUser(t.db, 'casey');
    const instrument = await makeInstrument(t.db, [[user.id, 'student']]);
    const { agent } = await signIn(t.app, user.email.toUpperCase());
    const res = await agent.get(paths.session()).expect(200);
    expect(res.body.user).toEqual({ id: user.id, email: user.email, name: user.name, isAdmin: false });
    expect(res.body.memberships).toEqual([{ instrumentId: instrument.id, role: 'student' }]);
  });

  it('sign-in regenerates the session: new cookie id and new CSRF token', async () => {
    const user = await makeUser(t.db, 'fixation');
    const agent = request.agent(t.app);
    const before = await agent.get(paths.session());
    const cookieBefore = sessionCookie(before);
    expect(cookieBefore).toBeDefined();
    const res = await agent.post(paths.session()).set('X-CSRF-Token', before.body.csrfToken).send({ email: user.email, password: PASSWORD });
    expect(res.status).toBe(200);
    const cookieAfter = sessionCookie(res);
    expect(cookieAfter).toBeDefined();
    expect(cookieAfter).not.toBe(cookieBefore);
    expect(res.body.csrfToken).not.toBe(before.body.csrfToken);
    // The pre-login cookie is not signed in.
    const replay = await request(t.app).get(paths.session()).set('Cookie', cookieBefore!);
    expect(replay.body.user).toBeNull();
  });

  it('the session cookie is HttpOnly and SameSite=Lax, not Secure on http', async () => {
    const res = await request(t.app).get(paths.session());
    const cookie = (res.headers['set-cookie'] as unknown as string[]).find((c) => c.startsWith('orderly.sid='))!;
    expect(cookie).toMatch(/HttpOnly/i);
    expect(cookie).toMatch(/SameSite=Lax/i);
    expect(cookie).not.toMatch(/Secure/i);
  });
});

describe('sign-out', () => {
  it('destroys the session: the old cookie no longer works and the row is gone', async () => {
    const user = await makeUser(t.db, 'signout');
    const agent = request.agent(t.app);
    const first = await agent.get(paths.session());
    const signedIn = await agent.post(paths.session()).set('X-CSRF-Token', first.body.csrfToken).send({ email: user.email, password: PASSWORD });
    const cookie = sessionCookie(signedIn)!;
    expect((await request(t.app).get(paths.instruments()).set('Cookie', cookie)).status).toBe(200);
    const sid = decodeURIComponent(cookie.split('=')[1]!).slice(2).split('.')[0]!;
    const rowsBefore = await t.db.execute(sql`select sid from sessions where sid = ${sid}`);
    expect(rowsBefore.rows).toHaveLength(1);

    await agent.delete(paths.session()).set('X-CSRF-Token', signedIn.body.csrfToken).expect(204);

    const replay = await request(t.app).get(paths.instruments()).set('Cookie', cookie);
    expect(replay.status).toBe(401);
    expect((await request(t.app).get(paths.session()).set('Cookie', cookie)).body.user).toBeNull();
    const rowsAfter = await t.db.execute(sql`select sid from sessions where sid = ${sid}`);
    expect(rowsAfter.rows).toHaveLength(0);
  });
});

describe('CSRF', () => {
  it('a state-changing request with the session cookie but no X-CSRF-Token is refused (403 csrf) and changes nothing', async () => {
    const user = await makeUser(t.db, 'csrf');
    const { agent } = await signIn(t.app, user.email);
    const name = `CSRF probe ${Date.now()}`;
    const res = await agent.post(paths.instruments()).send({ name, profile: { ...(await import('./helpers.ts')).validProfile() } });
    expect(res.status).toBe(403);
    expect(res.body.error.code).toBe('csrf');
    const list = await agent.get(paths.instruments());
    expect(list.body.map((i: { name: string }) => i.name)).not.toContain(name);
  });

  it('a wrong X-CSRF-Token is refused too, on PATCH and DELETE', async () => {
    const user = await makeUser(t.db, 'csrf2');
    const instrument = await makeInstrument(t.db, [[user.id, 'owner']]);
    const { agent } = await signIn(t.app, user.email);
    const patch = await agent.patch(paths.instrument(instrument.id)).set('X-CSRF-Token', 'forged-token-value').send({ description: 'forged' });
    expect(patch.status).toBe(403);
    expect(patch.body.error.code).toBe('csrf');
    const del = await agent.delete(paths.instrument(instrument.id)).send();
    expect(del.status).toBe(403);
    expect((await agent.get(paths.instrument(instrument.id))).body.description).toBe('');
  });

  it('sign-in itself needs the token (no login CSRF)', async () => {
    const user = await makeUser(t.db, 'logincsrf');
    const res = await request(t.app).post(paths.session()).send({ email: user.email, password: PASSWORD });
    expect(res.status).toBe(403);
    expect(res.body.error.code).toBe('csrf');
  });
});

describe('sign-in rate limit', () => {
  it('after 10 failed attempts for one e-mail the 11th is 429, even with the right password', async () => {
    const user = await makeUser(t.db, 'ratelimit');
    const agent = request.agent(t.app);
    const { body } = await agent.get(paths.session());
    for (let i = 0; i < 10; i++) {
      const res = await agent.post(paths.session()).set('X-CSRF-Token', body.csrfToken).send({ email: user.email, password: `wrong-${i}` });
      expect(res.status).toBe(401);
    }
    const blocked = await agent.post(paths.session()).set('X-CSRF-Token', body.csrfToken).send({ email: user.email, password: PASSWORD });
    expect(blocked.status).toBe(429);
    expect(blocked.body.error.code).toBe('rate_limited');
    // Another e-mail from the same address is not blocked.
    const other = await makeUser(t.db, 'ratelimit-other');
    await signIn(t.app, other.email);
  });
});
