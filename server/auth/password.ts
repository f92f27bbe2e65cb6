/**
 * Password hashing with node:crypto scrypt, a random 16-byte salt per user, and a constant-time
 * comparison. Stored as `scrypt$N$r$p$salt$hash` (base64url) so the cost can be raised later
 * without breaking old hashes. N = 2^15, r = 8, p = 1 is OWASP's scrypt minimum (from memory).
 */
import { randomBytes, scrypt as scryptCb, timingSafeEqual, type ScryptOptions } from 'node:crypto';

const KEY_LENGTH = 32;
const DEFAULT_COST = { N: 2 ** 15, r: 8, p: 1 };

function scrypt(password: string, salt: Buffer, keyLength: number, options: ScryptOptions): Promise<Buffer> {
  return new Promise((resolve, reject) => {
    scryptCb(password, salt, keyLength, { ...options, maxmem: 128 * options.N! * options.r! * 2 }, (error, key) =>
      error ? reject(error) : resolve(key),
    );
  });
}

/** Hash a password for storage. */
export async function hashPassword(password: string): Promise<string> {
  const salt = randomBytes(16);
  const { N, r, p } = DEFAULT_COST;
  const key = await scrypt(password, salt, KEY_LENGTH, { N, r, p });
  return ['scrypt', N, r, p, salt.toString('base64url'), key.toString('base64url')].join('$');
}

/** True when `password` matches `stored`; false for a malformed hash (never throws on input). */
export async function verifyPassword(password: string, stored: string): Promise<boolean> {
  const [scheme, n, r, p, saltText, keyText] = stored.split('$');
  if (scheme !== 'scrypt' || !saltText || !keyText) return false;
  const expected = Buffer.from(keyText, 'base64url');
  const actual = await scrypt(password, Buffer.from(saltText, 'base64url'), expected.length, {
    N: Number(n),
    r: Number(r),
    p: Number(p),
  });
  return actual.length === expected.length && timingSafeEqual(actual, expected);
}

let dummyHash: Promise<string> | undefined;
/** A hash to verify against when the e-mail is unknown, so a miss costs as long as a hit. */
export function dummyPasswordHash(): Promise<string> {
  dummyHash ??= hashPassword('orderly-dummy-password');
  return dummyHash;
}
