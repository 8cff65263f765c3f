import type { Db, Tx } from '@/db/connection';

/** What a handler gets while it runs. */
export type JobContext<P = unknown> = {
  jobId: number;
  payload: P;
  db: Db;
  attempt: number;
  /** Aborted when the job is cancelled or the worker is shutting down. */
  signal: AbortSignal;
  /** Reports progress (0-100) with a message, renews the lease, and checks for cancellation. */
  progress: (pct: number, message?: string) => Promise<void>;
};

/**
 * A handler computes without writing its results, then returns a writer that the queue runs in the
 * same transaction that marks the job succeeded. Throw an AppError for a permanent failure (no
 * retry); any other error is retried up to the job's max attempts.
 */
export type JobHandler<P = unknown> = (ctx: JobContext<P>) => Promise<(tx: Tx) => Promise<unknown>>;
