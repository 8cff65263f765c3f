/**
 * Prepared drizzle queries, built once per database handle (the pool's, or an open transaction's)
 * and kept for the handle's life: the queries on the consumer API's path run hundreds of times a
 * second, and building a query's SQL from its builder (drizzle walks every column and condition)
 * cost more CPU than sending it (measured: 3.2 ms of CPU per answer before, lib/bench/consumer-api.ts).
 * Values are bound by `sql.placeholder(name)` and passed to `execute({ name: value })`; the driver
 * escapes them as it does any parameter.
 *
 * @example
 * const q = prepared(db, 'token-by-hash', () => db.select().from(apiTokens).where(eq(apiTokens.tokenHash, sql.placeholder('hash'))).prepare());
 * const rows = await q.execute({ hash });
 */
const byHandle = new WeakMap<object, Map<string, unknown>>();

/** The query `key` of `db`, built by `build` the first time it is asked for on that handle. */
export function prepared<T>(db: object, key: string, build: () => T): T {
  let queries = byHandle.get(db);
  if (!queries) {
    queries = new Map();
    byHandle.set(db, queries);
  }
  let q = queries.get(key) as T | undefined;
  if (q === undefined) {
    q = build();
    queries.set(key, q);
  }
  return q;
}
