/**
 * Shared set-up for the API tests: the real app (createApp) over this run's PostgreSQL database
 * (`inject('databaseUrl')`), with the real SMTP sink on a free port and nodemailer talking to it.
 * Every test makes its own users and instruments with unique names, so files can share the database.
 */
import { randomUUID } from 'node:crypto';
import request from 'supertest';
import { inject } from 'vitest';
import type { Express } from 'express';
import type { InstrumentProfileInput } from '../../shared/api/instrument-profile.ts';
import type { Role } from '../../shared/api/members.ts';
import { paths } from '../../shared/api/paths.ts';
import { createApp, type AppDeps } from '../../server/app.ts';
import { createDb, createPool, type Db } from '../../server/db/client.ts';
import { createMailer } from '../../server/mail/mailer.ts';
import { startMailSink } from '../../server/mail/sink.ts';
import { createUser } from '../../server/modules/users/service.ts';
import { insertMembership } from '../../server/modules/members/queries.ts';
import { insertInstrument } from '../../server/modules/instruments/queries.ts';
import type pg from 'pg';

export interface TestApp {
  app: Express;
  db: Db;
  pool: pg.Pool;
  databaseUrl: string;
  close(): Promise<void>;
}

export async function startTestApp(options: { signInLimitPerMinute?: number; frames?: AppDeps['frames'] } = {}): Promise<TestApp> {
  const databaseUrl = inject('databaseUrl');
  const pool = createPool(databaseUrl, 5);
  const db = createDb(pool);
  const sink = await startMailSink(db, { port: 0 });
  const mailer = createMailer(`smtp://127.0.0.1:${sink.port}`, 'Orderly tests <orderly@localhost>', true);
  const app = createApp({
    config: {
      sessionSecret: 'api-test-session-secret-0123456789',
      appUrl: 'http://127.0.0.1:5480',
      staticDir: '/nonexistent-static-dir',
      signInLimitPerMinute: options.signInLimitPerMinute ?? 10,
    },
    db,
    pool,
    mailer,
    log: () => undefined,
    frames: options.frames,
  });
  return {
    app,
    db,
    pool,
    databaseUrl,
    async close() {
      mailer.close();
      await sink.close();
      await pool.end();
    },
  };
}

/** A unique lowercase e-mail for one test. */
export function uniqueEmail(label: string): string {
  return `${label}-${randomUUID().slice(0, 8)}@lab.test`;
}

export const PASSWORD = 'correct-horse-battery';

export async function makeUser(db: Db, label: string, isAdmin = false) {
  return createUser(db, { email: uniqueEmail(label), name: `${label} tester`, password: PASSWORD, isAdmin });
}

/**
 * A valid nominal profile (invented test values of a realistic size: 1200 l/mm flat-field
 * grating at 87° incidence, 235 mm, 13.5 µm pixels, 2048 px).
 */
export function validProfile(): InstrumentProfileInput {
  return {
    spectralAxis: 'x',
    grooveDensityPerMm: 1200,
    incidenceAngleDeg: 87,
    detectorDistanceMm: 235,
    pixelPitchUm: 13.5,
    wavelengthIncreasesWithPixel: false,
    detectorCenterPixel: 1023.5,
    detectorAngleDeg: 77.1,
    pixelCount: 2048,
  };
}

/** An instrument with the given members, made directly in the database. */
export async function makeInstrument(db: Db, members: [string, Role][]) {
  const profile = validProfile();
  const row = await insertInstrument(db, { name: `Test spectrometer ${randomUUID()}`, profile, pixelCount: profile.pixelCount });
  for (const [userId, role] of members) await insertMembership(db, { userId, instrumentId: row.id, role });
  return row;
}

export interface Client {
  agent: ReturnType<typeof request.agent>;
  csrf: string;
}

/** Sign in through the API like the browser does: GET the CSRF token, POST the credentials. */
export async function signIn(app: Express, email: string, password = PASSWORD): Promise<Client> {
  const agent = request.agent(app);
  const session = await agent.get(paths.session()).expect(200);
  const res = await agent.post(paths.session()).set('X-CSRF-Token', session.body.csrfToken).send({ email, password });
  if (res.status !== 200) throw new Error(`sign-in of ${email} failed: ${res.status} ${JSON.stringify(res.body)}`);
  return { agent, csrf: res.body.csrfToken };
}
