/** Every table and relation, for drizzle(…, { schema }) and drizzle-kit. */
export * from './enums.ts';
export * from './users.ts';
export * from './sessions.ts';
export * from './instruments.ts';
export * from './memberships.ts';
export * from './invitations.ts';
export * from './api-tokens.ts';
export * from './audit-events.ts';
export * from './mails.ts';
export * from './frames.ts';
export * from './workbench-runs.ts';
export * from './calibration-versions.ts';
export * from './spectra.ts';
export * from './runs.ts';
export * from './drift-episodes.ts';
