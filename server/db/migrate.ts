/** Apply the generated migrations in `drizzle/` (idempotent: applied ones are skipped). */
import { fileURLToPath } from 'node:url';
import { migrate } from 'drizzle-orm/node-postgres/migrator';
import { createDb, createPool } from './client.ts';

export const migrationsFolder = fileURLToPath(new URL('../../drizzle', import.meta.url));

/** Run every pending migration against `databaseUrl` with a short-lived pool. */
export async function runMigrations(databaseUrl: string): Promise<void> {
  const pool = createPool(databaseUrl, 1);
  try {
    await migrate(createDb(pool), { migrationsFolder });
  } finally {
    await pool.end();
  }
}
