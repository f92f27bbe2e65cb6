/** Random secrets (API tokens, invitation tokens, CSRF tokens) and their stored SHA-256 form. */
import { createHash, randomBytes, timingSafeEqual } from 'node:crypto';

export const API_TOKEN_PREFIX = 'orderly_';

/** 32 random bytes as base64url (256 bits). */
export function randomSecret(): string {
  return randomBytes(32).toString('base64url');
}

/** A new personal API token: `orderly_<random>`. */
export function newApiToken(): string {
  return `${API_TOKEN_PREFIX}${randomSecret()}`;
}

/** SHA-256 hex: what the database keeps instead of a token (a fast hash suffices for 256-bit random secrets). */
export function sha256Hex(secret: string): string {
  return createHash('sha256').update(secret).digest('hex');
}

/** Constant-time string comparison for secrets. */
export function safeEqual(a: string, b: string): boolean {
  const left = Buffer.from(a);
  const right = Buffer.from(b);
  return left.length === right.length && timingSafeEqual(left, right);
}
