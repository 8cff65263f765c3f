import 'server-only';
import { eq } from 'drizzle-orm';
import type { DbOrTx } from '@/db/connection';
import { evidenceBacktests } from '@/db/schema';

/**
 * The write of a monitoring backtest that ended without a result (the monitor-backtest job kind's
 * give-up, lib/jobs/kinds/monitor-backtest.ts): apart from the evidence store, which queues those
 * jobs, so that the queue's map of kinds does not import back the store that uses the queue.
 */
export async function markBacktestFailed(tx: DbOrTx, backtestId: number, error: string): Promise<void> {
  await tx.update(evidenceBacktests).set({ status: 'failed', error: error.slice(0, 2000), finishedAt: new Date() }).where(eq(evidenceBacktests.id, backtestId));
}
