// The test-database global setup (tests/support/db-global-setup.ts): each run gets its own
// freshly made database on the test cluster, migrated by drizzle's own migrator.
import { existsSync, readFileSync } from 'node:fs';
import pg from 'pg';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { databaseUrlFor, testDatabaseName } from '../support/db-global-setup.ts';

describe('db-global-setup', () => {
  const url = inject('databaseUrl');
  let client: pg.Client;
  beforeAll(async () => {
    client = new pg.Client({ connectionString: url });
    await client.connect();
  });
  afterAll(async () => {
    await client?.end();
  });

  it('provides a database of its own, named test_<pid>_<time>', async () => {
    const { rows } = await client.query<{ name: string }>('SELECT current_database() AS name');
    expect(rows[0].name).toMatch(/^test_\d+_\d{13}$/);
    expect(new URL(url).pathname).toBe(`/${rows[0].name}`);
  });

  it('applied every migration in drizzle/meta/_journal.json', async () => {
    const journalPath = 'drizzle/meta/_journal.json';
    // Before the first migration is generated there is nothing to apply.
    const entries: unknown[] = existsSync(journalPath) ? JSON.parse(readFileSync(journalPath, 'utf8')).entries : [];
    if (entries.length === 0) return;
    // drizzle-orm's migrator records each applied migration in drizzle.__drizzle_migrations.
    const { rows } = await client.query<{ n: string }>('SELECT count(*) AS n FROM drizzle.__drizzle_migrations');
    expect(Number(rows[0].n)).toBe(entries.length);
  });

  it('builds names and URLs the way the setup uses them', () => {
    expect(testDatabaseName(42, 1_700_000_000_000)).toBe('test_42_1700000000000');
    expect(databaseUrlFor('postgres://postgres@127.0.0.1:5489/postgres', 'test_1_2')).toBe('postgres://postgres@127.0.0.1:5489/test_1_2');
  });
});
