/**
 * Idempotent demo seed: `node --import tsx server/scripts/seed.ts` (DATABASE_URL as the server).
 * The "Lindqvist Attosecond Lab", its people and both instruments are INVENTED demo data.
 * Runs in one transaction and only inserts what is missing (ON CONFLICT DO NOTHING, or
 * check-then-insert), so running it twice neither duplicates nor wipes anything.
 */
import { pathToFileURL } from 'node:url';
import { and, eq, sql } from 'drizzle-orm';
import { instrumentProfileSchema } from '../../shared/api/instrument-profile.ts';
import { createDb, createPool, type Db } from '../db/client.ts';
import { runMigrations } from '../db/migrate.ts';
import { instruments, memberships, users } from '../db/schema/index.ts';
import { hashPassword } from '../auth/password.ts';
import { loadConfig } from '../config.ts';
import { frameStoreFromConfig } from '../storage/from-config.ts';
import { seedDemoSpectra, seedDemoStories } from './demo/seed-story.ts';
import { demoInstruments } from './demo/instruments.ts';
import { createMailer } from '../mail/mailer.ts';
import { startMailSink } from '../mail/sink.ts';
import { pgBossQueue, startBoss } from '../modules/runs/queue.ts';

/** The fixed demo sign-ins (the README lists them). */
export const demoAccounts = [
  { email: 'admin@orderly.test', password: 'admin-demo-pass', name: 'Astrid Admin (demo)', isAdmin: true },
  { email: 'owner@orderly.test', password: 'owner-demo-pass', name: 'Olof Owner (demo)', isAdmin: false },
  { email: 'scientist@orderly.test', password: 'scientist-demo-pass', name: 'Saga Scientist (demo)', isAdmin: false },
  { email: 'student@orderly.test', password: 'student-demo-pass', name: 'Sten Student (demo)', isAdmin: false },
  { email: 'viewer@orderly.test', password: 'viewer-demo-pass', name: 'Vera Viewer (demo)', isAdmin: false },
] as const;

/** Insert whatever of the demo is missing; returns how many rows were added. */
export async function seedDemo(db: Db): Promise<{ users: number; instruments: number; memberships: number }> {
  const added = { users: 0, instruments: 0, memberships: 0 };
  const hashes = await Promise.all(demoAccounts.map((a) => hashPassword(a.password)));
  await db.transaction(async (tx) => {
    const ids = new Map<string, string>();
    for (const [i, account] of demoAccounts.entries()) {
      const inserted = await tx
        .insert(users)
        .values({ email: account.email, name: account.name, isAdmin: account.isAdmin, passwordHash: hashes[i]! })
        .onConflictDoNothing()
        .returning({ id: users.id });
      added.users += inserted.length;
      const [row] = await tx.select({ id: users.id }).from(users).where(sql`lower(${users.email}) = ${account.email}`);
      ids.set(account.email, row!.id);
    }
    for (const demo of demoInstruments) {
      const profile = instrumentProfileSchema.parse(demo.profile);
      const inserted = await tx
        .insert(instruments)
        .values({ name: demo.name, description: demo.description, profile, pixelCount: profile.pixelCount, notes: 'Invented demo data.' })
        .onConflictDoNothing({ target: instruments.name })
        .returning({ id: instruments.id });
      added.instruments += inserted.length;
      const [instrument] = await tx.select({ id: instruments.id }).from(instruments).where(eq(instruments.name, demo.name));
      for (const [email, role] of Object.entries(demo.members)) {
        const userId = ids.get(email)!;
        const rows = await tx
          .insert(memberships)
          .values({ userId, instrumentId: instrument!.id, role: role! })
          .onConflictDoNothing()
          .returning({ id: memberships.id });
        added.memberships += rows.length;
      }
    }
    // Sanity: the owner must own both demo instruments (a failed earlier run would show here).
    const owned = await tx
      .select({ id: memberships.id })
      .from(memberships)
      .where(and(eq(memberships.userId, ids.get('owner@orderly.test')!), eq(memberships.role, 'owner')));
    if (owned.length < demoInstruments.length) console.warn('warning: owner@orderly.test does not own every demo instrument (changed by hand?)');
  });
  return added;
}

async function main(): Promise<void> {
  const databaseUrl = loadConfig().databaseUrl;
  await runMigrations(databaseUrl);
  const pool = createPool(databaseUrl, 2);
  try {
    const db = createDb(pool);
    const added = await seedDemo(db);
    const config = loadConfig();
    const { store, close } = frameStoreFromConfig({ frameStorage: config.frameStorage, s3: config.s3, localDir: config.frameStorageDir });
    const started = Date.now();
    // Notices raised while seeding (drift, review requests) go through a sink of our own, into the Outbox.
    const sink = config.mailSink ? await startMailSink(db, { host: '127.0.0.1', port: 0 }) : undefined;
    const mailer = createMailer(sink ? `smtp://127.0.0.1:${sink.port}` : config.smtpUrl, config.mailFrom, config.mailSink);
    const boss = await startBoss({ databaseUrl, expireInSeconds: config.applyJobExpireS, maintenanceIntervalSeconds: config.queueMaintenanceS });
    try {
      const story = await seedDemoStories({ db, store });
      const work = await seedDemoSpectra({ db, store, mailer, appUrl: config.appUrl, queue: pgBossQueue(boss, config.applyJobExpireS) }, story.frameIds);
      console.log(
        `Seeded the invented "Lindqvist Attosecond Lab" demo: added ${added.users} users, ${added.instruments} instruments, ${added.memberships} memberships, ` +
          `${story.frames} simulated frames, ${story.versions} calibration versions, ${work.spectra} spectra, a run of ${work.runFrames} scan frames queued (${((Date.now() - started) / 1000).toFixed(1)} s).`,
      );
    } finally {
      await boss.stop({ graceful: true, wait: true });
      mailer.close();
      await sink?.close();
      close();
    }
    console.log('Demo sign-ins (invented demo accounts):');
    for (const a of demoAccounts) console.log(`  ${a.email.padEnd(24)} ${a.password}${a.isAdmin ? '   (site admin)' : ''}`);
  } finally {
    await pool.end();
  }
}

if (process.argv[1] && import.meta.url === pathToFileURL(process.argv[1]).href) {
  main().catch((error: unknown) => {
    console.error(error instanceof Error ? error.message : error);
    process.exit(1);
  });
}
