/**
 * Drops and recreates the TEST database, applies the migrations and (with --seed) seeds the demo
 * organisation. Refuses any database whose name does not end in `_test`, so the demo data of
 * `npm start` is never touched by the tests.
 */
import mysql from 'mysql2/promise';
import { env } from '@/lib/env';
import { closeDb, getDb } from '@/db/connection';
import { runMigrations } from '@/db/migrate';
import { seedDemo } from '@/db/seed';

export async function resetTestDatabase(opts: { seed?: boolean; withData?: boolean } = {}): Promise<void> {
  const e = env();
  if (!e.DB_NAME.endsWith('_test')) {
    throw new Error(`Refusing to reset ${e.DB_NAME}: only databases whose name ends in _test are reset by tests.`);
  }
  const conn = await mysql.createConnection({ host: e.DB_HOST, port: e.DB_PORT, user: e.DB_USER, password: e.DB_PASSWORD });
  try {
    await conn.query(`DROP DATABASE IF EXISTS \`${e.DB_NAME}\``);
    await conn.query(`CREATE DATABASE \`${e.DB_NAME}\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci`);
  } finally {
    await conn.end();
  }
  await closeDb();
  await runMigrations();
  if (opts.seed) await seedDemo(getDb(), { withData: opts.withData ?? true });
}

if (process.argv[1]?.endsWith('reset-database.ts')) {
  resetTestDatabase({ seed: process.argv.includes('--seed') })
    .then(() => closeDb())
    .catch(async (err) => {
      console.error('[reset-database] failed:', err instanceof Error ? err.stack : err);
      await closeDb();
      process.exit(1);
    });
}
