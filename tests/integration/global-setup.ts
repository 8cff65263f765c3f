/**
 * Integration tests run against their own database (DB_NAME=rhobook_test by default) on the
 * project's MariaDB instance: `npm test` starts the instance and resets the database before the
 * suite. Running vitest directly works too once `npm run db:start` has been run.
 */
export default async function setup() {
  process.env.DB_NAME = process.env.DB_NAME?.endsWith('_test') ? process.env.DB_NAME : 'rhobook_test';
  const { resetTestDatabase } = await import('../support/reset-database');
  await resetTestDatabase({ seed: false });
  const { closeDb } = await import('../../db/connection');
  await closeDb();
}
