/**
 * The Express app, built from its dependencies so tests (supertest) and the runtime share it.
 * Order matters: log → JSON body → session → passport → bearer token → CSRF → routes → JSON 404
 * for /api → static files + SPA fallback → error handler.
 */
import { existsSync } from 'node:fs';
import { resolve } from 'node:path';
import express, { type Express } from 'express';
import session from 'express-session';
import connectPgSimple from 'connect-pg-simple';
import type pg from 'pg';
import type { Config } from './config.ts';
import type { Db } from './db/client.ts';
import type { Mailer } from './mail/mailer.ts';
import './auth/types.ts';
import { createPassport } from './auth/passport.ts';
import { bearerAuth, csrfProtection } from './auth/middleware.ts';
import { apiNotFound, errorHandler } from './lib/error-handler.ts';
import { requestLog } from './lib/request-log.ts';
import { SESSION_COOKIE, sessionRouter } from './modules/session/routes.ts';
import { tokensRouter } from './modules/tokens/routes.ts';
import { instrumentsRouter } from './modules/instruments/routes.ts';
import { invitationsRouter, membersRouter } from './modules/members/routes.ts';
import { outboxRouter } from './modules/outbox/routes.ts';
import { auditRouter } from './modules/audit/routes.ts';
import { framesRouter, instrumentFramesRouter } from './modules/frames/routes.ts';
import { instrumentVersionsRouter, versionsRouter, workbenchRouter } from './modules/versions/routes.ts';
import { createLocalStore } from './storage/local-store.ts';
import type { FrameStore } from './storage/frame-store.ts';
import { frameSpectraRouter, instrumentSpectraRouter, runsRouter } from './modules/spectra/routes.ts';
import { instrumentRunsListRouter } from './modules/runs/routes.ts';
import { dbSources } from './modules/spectra/sources.ts';
import type { ApplyQueue } from './modules/runs/queue.ts';
import { unavailableQueue } from './modules/runs/unavailable-queue.ts';
import { afterVersionTransition } from './modules/notices/service.ts';

export interface AppDeps {
  config: Pick<Config, 'sessionSecret' | 'appUrl' | 'staticDir' | 'signInLimitPerMinute'>;
  db: Db;
  /** The pool behind `db`, shared with the session store. */
  pool: pg.Pool;
  mailer: Mailer;
  /** Request log sink; default console.info. */
  log?: (line: string) => void;
  /** Frame storage and upload limit; default a local store in .data/frames and 256 MiB. */
  frames?: { store: FrameStore; maxBytes: number };
  /** The apply job queue (issue 5); without it, starting a run answers 503. */
  applyQueue?: ApplyQueue;
}

const DEFAULT_FRAME_MAX_BYTES = 256 * 1024 * 1024;

const SESSION_MAX_AGE_MS = 14 * 24 * 3600 * 1000;

export function createApp(deps: AppDeps): Express {
  const { config, db, pool, mailer } = deps;
  const app = express();
  app.disable('x-powered-by');

  app.use(requestLog(deps.log));
  app.use(express.json({ limit: '1mb' }));

  const PgStore = connectPgSimple(session);
  app.use(
    session({
      name: SESSION_COOKIE,
      store: new PgStore({ pool, tableName: 'sessions', createTableIfMissing: false }),
      secret: config.sessionSecret,
      resave: false,
      saveUninitialized: false,
      rolling: true,
      cookie: {
        httpOnly: true,
        sameSite: 'lax',
        // Secure cookies only over https: on the http loopback the browser would drop them.
        secure: config.appUrl.startsWith('https:'),
        maxAge: SESSION_MAX_AGE_MS,
        path: '/',
      },
    }),
  );
  const passport = createPassport(db);
  app.use(passport.initialize());
  app.use(passport.session());
  app.use('/api', bearerAuth(db));
  app.use('/api', csrfProtection);

  app.get('/api/health', (_req, res) => {
    res.json({ ok: true });
  });
  app.use('/api/session', sessionRouter(db, passport, config.signInLimitPerMinute));
  app.use('/api/tokens', tokensRouter(db));
  app.use('/api/instruments', instrumentsRouter(db));
  app.use('/api/instruments', membersRouter({ db, mailer, appUrl: config.appUrl }));
  app.use('/api/invitations', invitationsRouter(db));
  app.use('/api/outbox', outboxRouter(db));
  app.use('/api/audit', auditRouter(db));
  const frameDeps = { db, store: deps.frames?.store ?? createLocalStore('.data/frames'), maxBytes: deps.frames?.maxBytes ?? DEFAULT_FRAME_MAX_BYTES };
  app.use('/api/instruments', instrumentFramesRouter(frameDeps));
  app.use('/api/frames', framesRouter(frameDeps));
  app.use('/api/instruments', instrumentVersionsRouter(frameDeps));
  app.use('/api/versions', versionsRouter(frameDeps, (t, v, actorId, comment) => afterVersionTransition({ db, mailer, appUrl: config.appUrl }, t, v, actorId, comment)));
  app.use('/api/workbench', workbenchRouter(frameDeps));
  const spectraDeps = { db, store: frameDeps.store, sources: dbSources, mailer, appUrl: config.appUrl, queue: deps.applyQueue ?? unavailableQueue };
  app.use('/api/frames', frameSpectraRouter(spectraDeps));
  app.use('/api/instruments', instrumentSpectraRouter(spectraDeps));
  app.use('/api/instruments', instrumentRunsListRouter(db));
  app.use('/api/runs', runsRouter(spectraDeps));
  app.use('/api', apiNotFound);

  const staticDir = resolve(config.staticDir);
  if (existsSync(staticDir)) {
    app.use(express.static(staticDir, { index: false }));
    app.get('/{*splat}', (_req, res) => {
      res.sendFile(resolve(staticDir, 'index.html'));
    });
  }

  app.use(errorHandler);
  return app;
}
