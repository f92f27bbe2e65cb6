/** Authentication middleware: bearer tokens, CSRF, and the signed-in guards. */
import type { RequestHandler } from 'express';
import type { Db } from '../db/client.ts';
import { CsrfError, ForbiddenError, UnauthenticatedError } from '../lib/errors.ts';
import { userForApiToken } from '../modules/tokens/service.ts';
import { toSessionUser } from '../modules/users/service.ts';
import { API_TOKEN_PREFIX, safeEqual } from './secrets.ts';

/**
 * `Authorization: Bearer orderly_...` makes the request act as the token's owner, replacing any
 * session user. A bad, unknown or revoked token is a 401 (it never falls back to the cookie).
 */
export function bearerAuth(db: Db): RequestHandler {
  return async (req, _res, next) => {
    const header = req.get('authorization');
    if (!header) {
      if (req.user) req.authVia = 'session';
      return next();
    }
    const match = /^Bearer\s+(\S+)$/i.exec(header);
    if (!match || !match[1]!.startsWith(API_TOKEN_PREFIX)) throw new UnauthenticatedError('Malformed Authorization header; use "Bearer orderly_...".');
    const row = await userForApiToken(db, match[1]!);
    if (!row) throw new UnauthenticatedError('This API token is unknown or revoked.');
    req.user = toSessionUser(row);
    req.authVia = 'token';
    next();
  };
}

const UNSAFE = new Set(['POST', 'PUT', 'PATCH', 'DELETE']);

/**
 * Every state-changing request that relies on the session cookie must carry the session's CSRF
 * token in `X-CSRF-Token` (sign-in included, against login CSRF). Bearer-token requests are
 * exempt: a browser never attaches them by itself.
 */
export const csrfProtection: RequestHandler = (req, _res, next) => {
  if (!UNSAFE.has(req.method) || req.authVia === 'token') return next();
  const expected = req.session?.csrfToken;
  const sent = req.get('x-csrf-token');
  if (!expected || !sent || !safeEqual(sent, expected)) throw new CsrfError();
  next();
};

/** 401 unless signed in (by session or token). */
export const requireUser: RequestHandler = (req, _res, next) => {
  if (!req.user) throw new UnauthenticatedError();
  next();
};

/** 401 unless signed in, 403 unless a site admin. */
export const requireAdmin: RequestHandler = (req, _res, next) => {
  if (!req.user) throw new UnauthenticatedError();
  if (!req.user.isAdmin) throw new ForbiddenError('Only site administrators may do that.');
  next();
};
