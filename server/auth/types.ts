/** Request typing: the signed-in user (passport's `req.user`) and what the session holds. */
import type { SessionUser } from '../../shared/api/session.ts';
import type {} from 'express-session';

declare global {
  // eslint-disable-next-line @typescript-eslint/no-namespace
  namespace Express {
    // eslint-disable-next-line @typescript-eslint/no-empty-object-type
    interface User extends SessionUser {}
    interface Request {
      /** How this request was authenticated: the session cookie or a personal API token. */
      authVia?: 'session' | 'token';
    }
  }
}

declare module 'express-session' {
  interface SessionData {
    csrfToken?: string;
  }
}

export {};
