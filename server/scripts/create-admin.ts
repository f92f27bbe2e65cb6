/**
 * `npm run create-admin -- --email E [--name N]`: create a site admin. The password comes from
 * ORDERLY_ADMIN_PASSWORD or an interactive prompt. An existing e-mail is refused (exit code 1).
 */
import { parseArgs } from 'node:util';
import { createInterface } from 'node:readline/promises';
import { emailSchema, nameSchema, passwordSchema } from '../../shared/api/members.ts';
import { createDb, createPool } from '../db/client.ts';
import { runMigrations } from '../db/migrate.ts';
import { HttpError } from '../lib/errors.ts';
import { createUser } from '../modules/users/service.ts';

async function promptPassword(): Promise<string> {
  const rl = createInterface({ input: process.stdin, output: process.stdout, terminal: true });
  try {
    return await rl.question('Password for the new admin: ');
  } finally {
    rl.close();
  }
}

async function main(): Promise<number> {
  const { values } = parseArgs({ options: { email: { type: 'string' }, name: { type: 'string' } } });
  if (!values.email) {
    console.error('usage: npm run create-admin -- --email you@lab.example [--name "Your Name"]');
    return 2;
  }
  const email = emailSchema.safeParse(values.email);
  if (!email.success) {
    console.error(`--email: ${email.error.issues[0]?.message}`);
    return 2;
  }
  const name = nameSchema.parse(values.name ?? email.data.split('@')[0]);
  const password = passwordSchema.safeParse(process.env.ORDERLY_ADMIN_PASSWORD ?? (await promptPassword()));
  if (!password.success) {
    console.error(`password: ${password.error.issues[0]?.message}`);
    return 2;
  }
  const databaseUrl = process.env.DATABASE_URL ?? 'postgres://postgres@127.0.0.1:5479/orderly';
  await runMigrations(databaseUrl);
  const pool = createPool(databaseUrl, 1);
  try {
    const user = await createUser(createDb(pool), { email: email.data, name, password: password.data, isAdmin: true });
    console.log(`Created site admin ${user.email} (${user.id}).`);
    return 0;
  } catch (error) {
    if (error instanceof HttpError && error.code === 'conflict') {
      console.error(error.message);
      return 1;
    }
    throw error;
  } finally {
    await pool.end();
  }
}

main().then(
  (code) => process.exit(code),
  (error: unknown) => {
    console.error(error instanceof Error ? error.message : error);
    process.exit(1);
  },
);
