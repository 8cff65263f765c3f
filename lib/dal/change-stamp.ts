import { eq, lt, sql } from 'drizzle-orm';
import type { Db, DbOrTx } from '@/db/connection';
import { consumerChangeEpoch, consumerChanges } from '@/db/schema';
import { prepared } from './prepared';

/**
 * The change stamp of what an in-force answer of the consumer API is built from.
 *
 * Triggers (db/migrations/0021_consumer_change_triggers.sql) add one, in the writer's own
 * transaction, to a per-connection count for every row written to a watched table. The stamp is
 * `epoch:total`, where total is the sum of the counts plus those pruned, read in one statement (so
 * in one snapshot): it changes exactly when a commit that wrote a watched table becomes visible,
 * and never returns to an earlier value within an epoch. The epoch is new whenever the database is
 * migrated from empty or restored from a dump, so a stamp of another database's life never matches.
 *
 * A reader takes the stamp BEFORE it reads the data: an answer built from data newer than its
 * stamp is only ever thrown away early, never served late.
 */

/** The tables an in-force answer reads, each with the triggers of migration 0021 (tests compare the two and the queries). */
export const WATCHED_TABLES = ['assumptions', 'assumption_versions', 'users', 'overdue_policy_changes', 'datasets', 'segments', 'evidence_backtests'] as const;

/**
 * Read by an in-force answer but covered by another table's triggers: a cohort row is only ever
 * written in a transaction that writes its dataset's row (lib/dal/dataset-store.ts), and a
 * foreign-key cascade from a dataset or segment fires the parent's trigger.
 */
export const COVERED_TABLES: Record<string, (typeof WATCHED_TABLES)[number]> = { cohort_rows: 'datasets' };

/** The stamp as one SQL expression, to read in another statement (the token's: ./tokens.ts). */
export const changeStampSql = sql<string>`(SELECT CONCAT(${consumerChangeEpoch.epoch}, ':', ${consumerChangeEpoch.pruned} + COALESCE((SELECT SUM(${consumerChanges.n}) FROM ${consumerChanges}), 0)) FROM ${consumerChangeEpoch} WHERE ${consumerChangeEpoch.id} = 1)`;

/** The stamp now (one statement over a handful of rows). */
export async function changeStamp(db: Db): Promise<string> {
  const [row] = await prepared(db, 'change-stamp', () => db.select({ stamp: changeStampSql }).from(sql`DUAL`).prepare()).execute();
  if (!row?.stamp) throw new Error('consumer_change_epoch has no row: run the migrations (npm run db:migrate).');
  return row.stamp;
}

/**
 * Folds the counts of connections idle since `before` into the pruned total, in one transaction, so
 * the stamp's sum stays over a handful of rows and its value does not change. Rows a writer holds
 * are skipped (SKIP LOCKED), so pruning never waits for a writer and never deadlocks with one.
 * Returns the number of rows folded. Run by the worker's scheduler.
 */
export async function pruneChangeCounts(db: Db, before: Date): Promise<number> {
  return db.transaction(
    async (tx) => {
      const rows = await tx
        .select({ connectionId: consumerChanges.connectionId, n: consumerChanges.n })
        .from(consumerChanges)
        .where(lt(consumerChanges.at, before))
        .for('update', { skipLocked: true });
      if (!rows.length) return 0;
      const sum = rows.reduce((s, r) => s + Number(r.n), 0);
      // One primary-key delete per row: a delete by a list may scan the table and wait on the row
      // of a writer in flight (InnoDB reads a locked row semi-consistently for UPDATE, not DELETE).
      for (const r of rows) await tx.delete(consumerChanges).where(eq(consumerChanges.connectionId, r.connectionId));
      await tx
        .update(consumerChangeEpoch)
        .set({ pruned: sql`${consumerChangeEpoch.pruned} + ${sum}` })
        .where(sql`${consumerChangeEpoch.id} = 1`);
      return rows.length;
    },
    { isolationLevel: 'read committed' },
  );
}

/** A new epoch (after a restore): every stamp taken before no longer matches. */
export async function renewEpoch(db: DbOrTx): Promise<void> {
  await db.update(consumerChangeEpoch).set({ epoch: sql`UUID()` }).where(sql`${consumerChangeEpoch.id} = 1`);
}
