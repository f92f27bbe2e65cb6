/**
 * /api/session — sign in, who am I, sign out.
 * GET is always 200 (`user: null` when signed out) so the client can get a CSRF token first.
 * POST regenerates the session (no fixation) and issues a new CSRF token; DELETE destroys the
 * session row and clears the cookie. Failed sign-ins are rate-limited per (IP, e-mail).
 */
import { Router, type NextFunction, type Request, type Response } from 'express';
import { ipKeyGenerator, rateLimit } from 'express-rate-limit';
import type { PassportStatic } from 'passport';
import { signInSchema, type SessionUser } from '../../../shared/api/session.ts';
import type { Db } from '../../db/client.ts';
import { randomSecret } from '../../auth/secrets.ts';
import { HttpError, UnauthenticatedError } from '../../lib/errors.ts';
import { validated } from '../../lib/validate.ts';
import { sessionInfo } from './service.ts';

export const SESSION_COOKIE = 'orderly.sid';

function authenticate(passport: PassportStatic, req: Request, res: Response, next: NextFunction): Promise<SessionUser | false> {
  return new Promise((resolve, reject) => {
    passport.authenticate('local', { session: false }, (error: unknown, user: SessionUser | false) =>
      error ? reject(error) : resolve(user),
    )(req, res, next);
  });
}

function logIn(req: Request, user: SessionUser): Promise<void> {
  return new Promise((resolve, reject) => req.logIn(user, (error) => (error ? reject(error) : resolve())));
}

/** Sign `user` in on this request: new session id, new CSRF token. Also used after accepting an invitation. */
export async function startSession(req: Request, user: SessionUser): Promise<string> {
  await logIn(req, user);
  req.session.csrfToken = randomSecret();
  return req.session.csrfToken;
}

export function sessionRouter(db: Db, passport: PassportStatic, signInLimitPerMinute: number): Router {
  const router = Router();

  const signInLimiter = rateLimit({
    windowMs: 60_000,
    limit: signInLimitPerMinute,
    skipSuccessfulRequests: true,
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    keyGenerator: (req) => `${ipKeyGenerator(req.ip ?? 'unknown')}|${String(req.body?.email ?? '').trim().toLowerCase()}`,
    handler: (_req, _res, next) =>
      next(new HttpError(429, 'rate_limited', 'Too many sign-in attempts for this e-mail; wait a minute and try again.')),
  });

  router.get('/', async (req, res) => {
    req.session.csrfToken ??= randomSecret();
    res.json(await sessionInfo(db, req.user, req.session.csrfToken));
  });

  router.post(
    '/',
    signInLimiter,
    validated({ body: signInSchema }, async (req, res) => {
      const user = await authenticate(passport, req, res, () => undefined);
      if (!user) throw new UnauthenticatedError('Wrong e-mail or password.');
      const csrfToken = await startSession(req, user);
      res.json(await sessionInfo(db, user, csrfToken));
    }),
  );

  router.delete('/', async (req, res) => {
    await new Promise<void>((resolve, reject) => req.session.destroy((error) => (error ? reject(error) : resolve())));
    res.clearCookie(SESSION_COOKIE, { path: '/' });
    res.status(204).end();
  });

  return router;
}
