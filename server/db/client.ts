/** The pg pool and the Drizzle database over it. */
import pg from 'pg';
import { drizzle, type NodePgDatabase, type NodePgQueryResultHKT } from 'drizzle-orm/node-postgres';
import type { PgDatabase } from 'drizzle-orm/pg-core';
import type { ExtractTablesWithRelations } from 'drizzle-orm';
import * as schema from './schema/index.ts';

export type Schema = typeof schema;
export type Db = NodePgDatabase<Schema>;
/** A database or a transaction: what `queries` modules take, so services can compose them in one transaction. */
export type Executor = PgDatabase<NodePgQueryResultHKT, Schema, ExtractTablesWithRelations<Schema>>;

/** A pool with a small size and an error listener (an idle client's error must not crash the process). */
export function createPool(databaseUrl: string, max = 10): pg.Pool {
  const pool = new pg.Pool({ connectionString: databaseUrl, max });
  pool.on('error', (error) => console.error('postgres pool error:', error.message));
  return pool;
}

export function createDb(pool: pg.Pool): Db {
  return drizzle(pool, { schema });
}
