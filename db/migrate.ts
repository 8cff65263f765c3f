/**
 * Applies the committed migrations in db/migrations with drizzle-orm's migrator. Run by `npm start`
 * and `npm test` (never inside `next build`). MariaDB DDL is not transactional: if a migration
 * fails half way, the error names the file; fix the database by hand (or drop the dev database)
 * and run again. `__drizzle_migrations` lists what has been applied.
 */
import { migrate } from 'drizzle-orm/mysql2/migrator';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { closeDb, getDb } from './connection';

const here = path.dirname(fileURLToPath(import.meta.url));

export async function runMigrations(): Promise<void> {
  await migrate(getDb(), { migrationsFolder: path.join(here, 'migrations') });
}

if (process.argv[1] && path.resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
  runMigrations()
    .then(async () => {
      console.log(`[migrate] database ${process.env.DB_NAME ?? 'rhobook'} is up to date`);
      await closeDb();
    })
    .catch(async (err) => {
      console.error('[migrate] failed:', err instanceof Error ? err.message : err);
      await closeDb();
      process.exit(1);
    });
}
