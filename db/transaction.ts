import type { Db, Tx } from './connection';
import { isRetryableLockError } from './errors';

/**
 * Runs `work` in a transaction and runs it again, from the start, when MariaDB chose it as the
 * victim of a deadlock or its lock wait timed out. InnoDB rolls the whole transaction back in that
 * case, so nothing of the failed attempt remains and running it again is safe; the second attempt
 * sees what the winner committed (and, for a lost race, refuses with the winner's state, as a 409).
 * `work` must do nothing outside the transaction that it cannot repeat.
 */
export async function transactionWithRetry<T>(db: Db, work: (tx: Tx) => Promise<T>, { attempts = 5 } = {}): Promise<T> {
  for (let attempt = 1; ; attempt++) {
    try {
      return await db.transaction(work);
    } catch (err) {
      if (attempt >= attempts || !isRetryableLockError(err)) throw err;
      // A short, growing, jittered pause so that the losers do not collide again in step.
      await new Promise((r) => setTimeout(r, 5 * attempt + Math.floor(Math.random() * 20 * attempt)));
    }
  }
}
