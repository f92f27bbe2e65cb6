/** Environment, parsed once with zod at start-up (see /tmp/webcontract.md for the variables). */
import { randomBytes } from 'node:crypto';
import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { dirname, resolve } from 'node:path';
import { z } from 'zod';

const envSchema = z.object({
  PORT: z.coerce.number().int().min(0).max(65_535).default(5480),
  HOST: z.string().min(1).default('127.0.0.1'),
  DATABASE_URL: z.string().min(1).default('postgres://postgres@127.0.0.1:5479/orderly'),
  SESSION_SECRET: z.string().min(16, { message: 'SESSION_SECRET must be at least 16 characters' }).optional(),
  APP_URL: z.url().default('http://127.0.0.1:5480'),
  SMTP_URL: z.string().min(1).default('smtp://127.0.0.1:5425'),
  MAIL_SINK: z.enum(['on', 'off']).default('on'),
  MAIL_FROM: z.string().min(1).default('Orderly <orderly@localhost>'),
  STORAGE_DIR: z.string().min(1).default('.data/storage'),
  STATIC_DIR: z.string().min(1).default('dist/client'),
  SIGN_IN_LIMIT_PER_MINUTE: z.coerce.number().int().min(1).default(10),
});

/** Everything the server reads from the environment, resolved. */
export interface Config {
  port: number;
  host: string;
  databaseUrl: string;
  sessionSecret: string;
  appUrl: string;
  smtpUrl: string;
  /** True: run the in-process SMTP sink on SMTP_URL's port and store mails in PostgreSQL. */
  mailSink: boolean;
  mailFrom: string;
  storageDir: string;
  staticDir: string;
  /** Failed sign-ins allowed per minute per (IP, e-mail) before 429. */
  signInLimitPerMinute: number;
}

/** The secret in `.data/session-secret`, made on first use so sessions survive restarts. */
function storedSessionSecret(file = resolve('.data/session-secret')): string {
  if (existsSync(file)) return readFileSync(file, 'utf8').trim();
  const secret = randomBytes(32).toString('base64url');
  mkdirSync(dirname(file), { recursive: true });
  writeFileSync(file, `${secret}\n`, { mode: 0o600 });
  return secret;
}

/** Parse `env` (default `process.env`); throws a ZodError naming the bad variable. */
export function loadConfig(env: NodeJS.ProcessEnv = process.env): Config {
  const e = envSchema.parse(env);
  return {
    port: e.PORT,
    host: e.HOST,
    databaseUrl: e.DATABASE_URL,
    sessionSecret: e.SESSION_SECRET ?? storedSessionSecret(),
    appUrl: e.APP_URL.replace(/\/$/, ''),
    smtpUrl: e.SMTP_URL,
    mailSink: e.MAIL_SINK === 'on',
    mailFrom: e.MAIL_FROM,
    storageDir: e.STORAGE_DIR,
    staticDir: e.STATIC_DIR,
    signInLimitPerMinute: e.SIGN_IN_LIMIT_PER_MINUTE,
  };
}
