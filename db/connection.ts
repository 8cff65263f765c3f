import { drizzle, type MySql2Database } from 'drizzle-orm/mysql2';
import mysql from 'mysql2/promise';
import { env } from '@/lib/env';
import * as schema from './schema';

/**
 * One mysql2 pool per process, shared through globalThis so that Next's dev reloads do not open a
 * new pool on every edit. `db/client.ts` re-exports this with a server-only guard for app code;
 * the worker, the migrator and tests import this file directly.
 */
export type Db = MySql2Database<typeof schema>;
/** The transaction handed to `db.transaction(async (tx) => ...)`, fully typed against the schema. */
export type Tx = Parameters<Parameters<Db['transaction']>[0]>[0];
/** Either the pool-backed database or an open transaction: for helpers that run inside or outside one. */
export type DbOrTx = Db | Tx;

const g = globalThis as unknown as { __rhobookPool?: mysql.Pool; __rhobookDb?: Db };

export function getPool(): mysql.Pool {
  if (!g.__rhobookPool) {
    const e = env();
    g.__rhobookPool = mysql.createPool({
      host: e.DB_HOST,
      port: e.DB_PORT,
      user: e.DB_USER,
      password: e.DB_PASSWORD,
      database: e.DB_NAME,
      connectionLimit: 10,
      charset: 'utf8mb4_unicode_ci',
      timezone: 'Z',
      dateStrings: false,
      connectTimeout: 5000,
    });
  }
  return g.__rhobookPool;
}

export function getDb(): Db {
  if (!g.__rhobookDb) g.__rhobookDb = drizzle(getPool(), { schema, mode: 'default' });
  return g.__rhobookDb;
}

export async function closeDb(): Promise<void> {
  const pool = g.__rhobookPool;
  g.__rhobookPool = undefined;
  g.__rhobookDb = undefined;
  if (pool) await pool.end();
}
