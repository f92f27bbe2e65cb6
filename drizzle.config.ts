import { defineConfig } from 'drizzle-kit';

// Migrations are generated from server/db/schema (npx drizzle-kit generate) and never edited by hand.
export default defineConfig({
  dialect: 'postgresql',
  schema: './server/db/schema/index.ts',
  out: './drizzle',
  dbCredentials: { url: process.env.DATABASE_URL ?? 'postgres://postgres@127.0.0.1:5479/orderly' },
});
