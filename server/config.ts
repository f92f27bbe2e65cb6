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
  // Frames (issue 4): the local frame folder and the largest accepted upload file.
  FRAME_STORAGE_DIR: z.string().min(1).default('.data/frames'),
  FRAME_MAX_BYTES: z.coerce.number().int().min(1024).default(256 * 1024 * 1024),
  SIGN_IN_LIMIT_PER_MINUTE: z.coerce.number().int().min(1).default(10),
  // Frame storage backend (issue 5): the local folder, or an S3-compatible object store.
  FRAME_STORAGE: z.enum(['local', 's3']).default('local'),
  S3_ENDPOINT: z.url().optional(),
  S3_BUCKET: z.string().min(1).optional(),
  S3_REGION: z.string().min(1).default('us-east-1'),
  S3_ACCESS_KEY_ID: z.string().min(1).optional(),
  S3_SECRET_ACCESS_KEY: z.string().min(1).optional(),
  S3_FORCE_PATH_STYLE: z.enum(['true', 'false']).default('true'),
  S3_PREFIX: z.string().default(''),
  // Apply workers (pg-boss): inside the server process, and how many jobs each process runs at once.
  WORKERS_IN_PROCESS: z.enum(['true', 'false']).default('true'),
  WORKER_CONCURRENCY: z.coerce.number().int().min(1).max(16).default(1),
  APPLY_JOB_EXPIRE_S: z.coerce.number().int().min(1).max(3600).default(300),
  QUEUE_MAINTENANCE_S: z.coerce.number().int().min(1).max(3600).default(30),
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
  /** Folder of the local frame store (files sharded ab/cd/<sha256>). */
  frameStorageDir: string;
  /** Largest frame file accepted by the upload route, bytes. */
  frameMaxBytes: number;
  /** Failed sign-ins allowed per minute per (IP, e-mail) before 429. */
  signInLimitPerMinute: number;
  /** Where frame files live: `local` (the frames folder) or `s3` (the `s3` settings). */
  frameStorage: 'local' | 's3';
  s3: S3Config | null;
  /** Run apply workers inside the server process (default true); `npm run worker` runs them alone. */
  workersInProcess: boolean;
  workerConcurrency: number;
  /** An active apply job older than this is taken as lost (its worker died) and retried. */
  applyJobExpireS: number;
  /** How often the queue looks for expired jobs. */
  queueMaintenanceS: number;
}

export interface S3Config {
  endpoint?: string;
  bucket: string;
  region: string;
  accessKeyId: string;
  secretAccessKey: string;
  forcePathStyle: boolean;
  prefix: string;
}

function s3Config(e: z.infer<typeof envSchema>): S3Config | null {
  if (e.FRAME_STORAGE !== 's3') return null;
  const missing = (['S3_BUCKET', 'S3_ACCESS_KEY_ID', 'S3_SECRET_ACCESS_KEY'] as const).filter((k) => !e[k]);
  if (missing.length > 0) throw new Error(`FRAME_STORAGE=s3 needs ${missing.join(', ')}`);
  return {
    endpoint: e.S3_ENDPOINT,
    bucket: e.S3_BUCKET!,
    region: e.S3_REGION,
    accessKeyId: e.S3_ACCESS_KEY_ID!,
    secretAccessKey: e.S3_SECRET_ACCESS_KEY!,
    forcePathStyle: e.S3_FORCE_PATH_STYLE === 'true',
    prefix: e.S3_PREFIX,
  };
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
    frameStorageDir: e.FRAME_STORAGE_DIR,
    frameMaxBytes: e.FRAME_MAX_BYTES,
    signInLimitPerMinute: e.SIGN_IN_LIMIT_PER_MINUTE,
    frameStorage: e.FRAME_STORAGE,
    s3: s3Config(e),
    workersInProcess: e.WORKERS_IN_PROCESS === 'true',
    workerConcurrency: e.WORKER_CONCURRENCY,
    applyJobExpireS: e.APPLY_JOB_EXPIRE_S,
    queueMaintenanceS: e.QUEUE_MAINTENANCE_S,
  };
}
