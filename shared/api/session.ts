/** Sign-in, the session and personal API tokens. */
import { z } from 'zod';
import type { Role } from './members.ts';

/** POST /api/session */
export const signInSchema = z.object({
  email: z.string({ error: 'email is required' }).trim().toLowerCase().min(1, { message: 'email is required' }),
  password: z.string({ error: 'password is required' }).min(1, { message: 'password is required' }),
});
export type SignInInput = z.infer<typeof signInSchema>;

export interface SessionUser {
  id: string;
  email: string;
  name: string;
  isAdmin: boolean;
}

/**
 * GET /api/session. Always 200: signed out gives `user: null` with a CSRF token, so the client
 * can fetch a token before signing in. `csrfToken` must be sent as `X-CSRF-Token` on every
 * POST/PATCH/PUT/DELETE that relies on the session cookie. Sign-in regenerates the session, so
 * the client must use the `csrfToken` returned by POST /api/session afterwards.
 */
export interface SessionInfo {
  user: SessionUser | null;
  memberships: { instrumentId: string; role: Role }[];
  csrfToken: string;
}

/** POST /api/tokens */
export const createTokenSchema = z.object({
  name: z.string({ error: 'name is required' }).trim().min(1, { message: 'name must not be empty' }).max(100, { message: 'name must be at most 100 characters' }),
});
export type CreateTokenInput = z.infer<typeof createTokenSchema>;

/** One row of GET /api/tokens (never the secret). */
export interface ApiTokenInfo {
  id: string;
  name: string;
  createdAt: string;
  lastUsedAt: string | null;
  revokedAt: string | null;
}

/** 201 of POST /api/tokens: the secret `token` (`orderly_...`) is shown this once. */
export interface ApiTokenCreated extends ApiTokenInfo {
  token: string;
}
