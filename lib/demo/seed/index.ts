/**
 * Seeds the invented demo organisation into an EMPTY database: one account per role (password
 * from DEMO_PASSWORD, default rhobook-demo) and, unless asked not to, the demo lender's datasets
 * and assumption library. Never runs on a database that has users, and never in production mode
 * unless RHOBOOK_SEED_DEMO=1 is set explicitly. Everything is written through the data access
 * layer and the lifecycle's rules; the entry script (db/seed.ts) hands in the job runner, so this
 * folder imports nothing above lib/.
 */
import type { Db } from '@/db/connection';
import { hashPassword } from '@/lib/auth/password';
import { createInitialUsers } from '@/lib/dal/users';
import { env } from '@/lib/env';
import { seedDemoData } from './data';
import { seedDemoLibrary, type RunJobHere } from './library';
import { demoUsers } from './users';

export { DEMO_ORGANISATION, demoUsers } from './users';
export type { RunJobHere } from './library';

export type SeedResult = { seeded: boolean; reason: string };

export type SeedOptions = {
  /** false: the accounts only. */
  withData?: boolean;
  /** Runs the demo fit's job in this process (needed with data). */
  runJob?: RunJobHere;
  /** The seed's clock: "today" of the demo history (default now). */
  now?: Date;
};

export async function seedDemoOrganisation(db: Db, opts: SeedOptions = {}): Promise<SeedResult> {
  const e = env();
  if (e.NODE_ENV === 'production' && process.env.RHOBOOK_SEED_DEMO !== '1') {
    return { seeded: false, reason: 'production mode: set RHOBOOK_SEED_DEMO=1 to seed the demo organisation' };
  }
  const withData = opts.withData !== false;
  if (withData && !opts.runJob) throw new Error('The demo data needs a job runner for its fit (see db/seed.ts).');
  const { created, existing } = await createInitialUsers(demoUsers, await hashPassword(e.DEMO_PASSWORD));
  if (!created.length) return { seeded: false, reason: `the database already has ${existing} users` };
  if (withData) {
    const person = (email: string) => {
      const u = created.find((x) => x.email === email);
      if (!u) throw new Error(`The demo account ${email} was not created.`);
      return u;
    };
    const analyst = person('analyst@fenmoor.example');
    const validator = person('validator@fenmoor.example');
    const { cohortDatasetId } = await seedDemoData(db, analyst);
    await seedDemoLibrary(db, { analyst, validator }, cohortDatasetId, opts.runJob!, opts.now);
  }
  return { seeded: true, reason: 'empty database' };
}
