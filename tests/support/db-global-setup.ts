/**
 * vitest globalSetup for the api and e2e projects: one fresh PostgreSQL database per project run,
 * migrated from drizzle/, handed to the tests as `inject('databaseUrl')` and dropped at the end.
 *
 * The cluster comes from TEST_PG_URL (scripts/test.sh starts a throwaway one on 127.0.0.1:5489
 * and exports it); this file only makes and removes databases inside it.
 */
import { existsSync } from 'node:fs';
import { join } from 'node:path';
import pg from 'pg';
import { drizzle } from 'drizzle-orm/node-postgres';
import { migrate } from 'drizzle-orm/node-postgres/migrator';
import type { TestProject } from 'vitest/node';

/** Where the tests' PostgreSQL cluster is when TEST_PG_URL is not set (scripts/test.sh's port). */
export const DEFAULT_TEST_PG_URL = 'postgres://postgres@127.0.0.1:5489/postgres';

/** The drizzle-kit output folder; the journal exists once the first migration is generated. */
const MIGRATIONS_FOLDER = 'drizzle';

/** A database name unique to this process and moment, safe to put in SQL unquoted. */
export function testDatabaseName(pid: number = process.pid, timeMs: number = Date.now()): string {
  return `test_${pid}_${timeMs}`;
}

/** The URL of database `name` on the same server as `serverUrl`. */
export function databaseUrlFor(serverUrl: string, name: string): string {
  const url = new URL(serverUrl);
  url.pathname = `/${name}`;
  return url.toString();
}

async function connect(url: string): Promise<pg.Client> {
  const client = new pg.Client({ connectionString: url, connectionTimeoutMillis: 5_000 });
  try {
    await client.connect();
  } catch (error) {
    const reason = error instanceof Error ? error.message : String(error);
    throw new Error(
      `cannot reach the test PostgreSQL server at ${url} (${reason}). ` +
        'Run the tests with `npm test`, which starts a throwaway cluster on 127.0.0.1:5489, ' +
        'or point TEST_PG_URL at a server where this user may create databases.',
    );
  }
  return client;
}

/** Creates and migrates the database, provides its URL, and returns the teardown that drops it. */
export default async function setup(project: TestProject): Promise<() => Promise<void>> {
  const serverUrl = process.env.TEST_PG_URL || DEFAULT_TEST_PG_URL;
  const name = testDatabaseName();
  const admin = await connect(serverUrl);
  try {
    await admin.query(`CREATE DATABASE ${name}`);
  } finally {
    await admin.end();
  }
  const url = databaseUrlFor(serverUrl, name);

  if (existsSync(join(MIGRATIONS_FOLDER, 'meta', '_journal.json'))) {
    const pool = new pg.Pool({ connectionString: url, max: 1 });
    try {
      await migrate(drizzle(pool), { migrationsFolder: MIGRATIONS_FOLDER });
    } finally {
      await pool.end();
    }
  }

  project.provide('databaseUrl', url);

  return async () => {
    const client = await connect(serverUrl);
    try {
      // FORCE also ends connections the tests left open (pools, job queues).
      await client.query(`DROP DATABASE IF EXISTS ${name} WITH (FORCE)`);
    } finally {
      await client.end();
    }
  };
}
