// Values tests/support/db-global-setup.ts hands to the api and e2e tests via `inject(...)`.
import 'vitest';

declare module 'vitest' {
  export interface ProvidedContext {
    /** URL of this run's freshly migrated PostgreSQL database. */
    databaseUrl: string;
  }
}
