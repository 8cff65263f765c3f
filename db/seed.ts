/**
 * `npm run db:seed` (and `npm start`, and the e2e test database): the demo organisation
 * (lib/demo/seed) on an empty database, with the worker's job runner for the demo fit. This entry
 * only composes; the seed itself lives in lib/demo/seed.
 */
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { seedDemoOrganisation, type SeedOptions, type SeedResult } from '@/lib/demo/seed';
import { runJobHere } from '@/workers/run-job-here';
import { closeDb, getDb, type Db } from './connection';

export type { SeedResult };

export function seedDemo(db: Db, opts: Omit<SeedOptions, 'runJob'> = {}): Promise<SeedResult> {
  return seedDemoOrganisation(db, { ...opts, runJob: runJobHere });
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
