/**
 * Seeds the invented demo organisation into an EMPTY database: one account per role (password
 * from DEMO_PASSWORD, default rhobook-demo) and, when the data-intake feature is present, the demo
 * lender's datasets. Never runs on a database that has users, and never in production mode unless
 * RHOBOOK_SEED_DEMO=1 is set explicitly.
 */
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { count } from 'drizzle-orm';
import { hashPassword } from '@/lib/auth/password';
import { env } from '@/lib/env';
import { closeDb, getDb, type Db } from './connection';
import { demoUsers } from './demo-users';
import { users } from './schema';

export type SeedResult = { seeded: boolean; reason: string };

export async function seedDemo(db: Db, opts: { withData?: boolean } = {}): Promise<SeedResult> {
  const e = env();
  if (e.NODE_ENV === 'production' && process.env.RHOBOOK_SEED_DEMO !== '1') {
    return { seeded: false, reason: 'production mode: set RHOBOOK_SEED_DEMO=1 to seed the demo organisation' };
  }
  const [{ n }] = await db.select({ n: count() }).from(users);
  if (n > 0) return { seeded: false, reason: `the database already has ${n} users` };
  const passwordHash = await hashPassword(e.DEMO_PASSWORD);
  await db.insert(users).values(demoUsers.map((u) => ({ ...u, passwordHash })));
  if (opts.withData !== false) {
    const { seedDemoData } = await import('./seed-data');
    await seedDemoData(db);
  }
  return { seeded: true, reason: 'empty database' };
}

if (process.argv[1] && path.resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
  const withData = !process.argv.includes('--users-only');
  seedDemo(getDb(), { withData })
    .then(async (r) => {
      console.log(r.seeded ? '[seed] demo organisation created' : `[seed] skipped: ${r.reason}`);
      await closeDb();
    })
    .catch(async (err) => {
      console.error('[seed] failed:', err instanceof Error ? err.stack : err);
      await closeDb();
      process.exit(1);
    });
}
