import type { Db } from '@/db/connection';
import { runScheduledTransitions } from '@/lib/dal/assumptions';
import { pruneChangeCounts } from '@/lib/dal/change-stamp';
import { env } from '@/lib/env';
import { sleep } from './mail-loop';

/**
 * The assumption scheduler: once a minute (SCHEDULER_INTERVAL_SECONDS) it publishes approved versions whose effective date has
 * come (the segment's previous published version becomes superseded; never a back-dated one), expires published versions
 * whose review-by date has passed, and queues the 30- and 7-day review reminders and the findings'
 * reminders (once each). It also folds the change counts of connections idle for ten minutes into the
 * consumer API's change stamp (lib/dal/change-stamp.ts), which keeps that stamp's sum over a few rows.
 * Every step is idempotent and re-checks the state under a row lock, so several workers may run it.
 */
const PRUNE_IDLE_MS = 10 * 60_000;

export async function runScheduler(opts: { db: Db; signal: AbortSignal; intervalMs?: number }): Promise<void> {
  const interval = opts.intervalMs ?? env().SCHEDULER_INTERVAL_SECONDS * 1000;
  const told = new Set<number>();
  const toldMatrices = new Set<number>();
  while (!opts.signal.aborted) {
    try {
      const r = await runScheduledTransitions(new Date(), opts.db);
      if (r.published.length || r.expired.length || r.reminders || r.findingReminders || r.matrices.published.length) {
        console.log(
          `[worker] scheduler: published ${r.published.length}, expired ${r.expired.length}, reminders queued ${r.reminders}, finding reminders ${r.findingReminders}, matrices published ${r.matrices.published.length}`,
        );
      }
      // Once per process: a person must edit these (the scheduler will not publish them).
      for (const { id, reason } of r.refused.filter((x) => !told.has(x.id))) {
        told.add(id);
        console.warn(`[worker] scheduler: version ${id} not published: ${reason}`);
      }
      for (const { id, reason } of r.matrices.refused.filter((x) => !toldMatrices.has(x.id))) {
        toldMatrices.add(id);
        console.warn(`[worker] scheduler: factor-correlation matrix version ${id} not published: ${reason}`);
      }
    } catch (err) {
      console.error('[worker] scheduler error:', err instanceof Error ? err.message : err);
    }
    try {
      await pruneChangeCounts(opts.db, new Date(Date.now() - PRUNE_IDLE_MS));
    } catch (err) {
      console.error('[worker] change-stamp pruning error:', err instanceof Error ? err.message : err);
    }
    await sleep(interval, opts.signal);
  }
}
