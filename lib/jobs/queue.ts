import { and, eq, inArray, lt, or, sql } from 'drizzle-orm';
import type { Db, DbOrTx, Tx } from '@/db/connection';
import { jobs, type Job, type JobStatus } from '@/db/schema';
import { AppError, parseOrThrow } from '@/lib/errors';
import { kindSpec } from './kinds';

/**
 * The job queue in MariaDB.
 *
 * - Claim: a short transaction selects the oldest claimable job with `FOR UPDATE SKIP LOCKED`
 *   (queued, or running with an expired lease: its worker died) and marks it running with this
 *   worker's id and a lease. Several workers, on one machine or many, never claim the same job.
 * - Lease: the worker renews it while working (every progress report does); a job whose lease
 *   lapses is claimed again by another worker, up to `max_attempts`, then fails with the error kept.
 * - Completion: the handler's writer runs in the same transaction that marks the job succeeded, and
 *   only while this worker still holds the job; a crash leaves neither half-written results nor a
 *   duplicate.
 * - Cancel: a queued job is cancelled at once; a running one is flagged and its worker stops at its
 *   next progress report.
 * - Giving up: when a job ends failed or cancelled, its kind's give-up hook (the onGiveUp
 *   of its declaration in lib/jobs/kinds) runs in the same transaction, so what waited for the job is marked with it.
 */

export const DEFAULT_LEASE_MS = 60_000;

export type JobDto = {
  id: number;
  kind: string;
  status: JobStatus;
  progress: number;
  message: string | null;
  attempts: number;
  maxAttempts: number;
  error: string | null;
  cancelRequested: boolean;
  result: unknown;
  createdBy: number | null;
  createdAt: string;
  startedAt: string | null;
  finishedAt: string | null;
};

export function toJobDto(j: Job): JobDto {
  return {
    id: j.id,
    kind: j.kind,
    status: j.status,
    progress: j.progress,
    message: j.message,
    attempts: j.attempts,
    maxAttempts: j.maxAttempts,
    error: j.error,
    cancelRequested: j.cancelRequested,
    result: j.result ?? null,
    createdBy: j.createdBy,
    createdAt: j.createdAt.toISOString(),
    startedAt: j.startedAt?.toISOString() ?? null,
    finishedAt: j.finishedAt?.toISOString() ?? null,
  };
}

/** Validates the payload against the kind's declared schema and queues the job. */
export async function enqueueJob(
  db: DbOrTx,
  input: { kind: string; payload: unknown; createdBy?: number | null; maxAttempts?: number },
): Promise<number> {
  const schema = kindSpec(input.kind)?.schema;
  if (!schema) throw new AppError('bad_request:job-kind', `There is no job kind "${input.kind}".`);
  const payload = parseOrThrow(schema, input.payload, 'invalid:job-payload', `The ${input.kind} job's payload is not valid.`);
  const [res] = await db.insert(jobs).values({
    kind: input.kind,
    payload,
    createdBy: input.createdBy ?? null,
    maxAttempts: input.maxAttempts ?? 3,
  });
  return res.insertId;
}

export async function getJob(db: DbOrTx, id: number): Promise<JobDto | null> {
  const [row] = await db.select().from(jobs).where(eq(jobs.id, id)).limit(1);
  return row ? toJobDto(row) : null;
}

/**
 * Runs the kind's give-up hook (see JobGiveUpHook) inside `tx`, behind a savepoint: a hook that
 * throws is rolled back alone and logged, and the job still ends.
 */
async function runGiveUpHook(tx: Tx, job: Pick<Job, 'id' | 'kind' | 'payload'>, status: 'failed' | 'cancelled', error: string | null): Promise<void> {
  const hook = kindSpec(job.kind)?.onGiveUp;
  if (!hook) return;
  try {
    await tx.transaction(async (sp) => hook(sp, { jobId: job.id, payload: job.payload, status, error }));
  } catch (err) {
    console.error(`[jobs] the give-up hook of job ${job.id} (${job.kind}) failed; the job ends anyway:`, err);
  }
}

export type ClaimedJob = { id: number; kind: string; payload: unknown; attempt: number };

/**
 * Claims the oldest claimable job of the given kinds for `workerId`, or returns null. A job whose
 * lease expired and whose attempts are used up is failed here, with the reason kept.
 */
export async function claimJob(db: Db, workerId: string, kinds: string[], leaseMs = DEFAULT_LEASE_MS): Promise<ClaimedJob | null> {
  if (kinds.length === 0) return null;
  for (;;) {
    const outcome = await db.transaction(async (tx) => {
      const [row] = await tx
        .select()
        .from(jobs)
        .where(
          and(
            inArray(jobs.kind, kinds),
            or(eq(jobs.status, 'queued'), and(eq(jobs.status, 'running'), lt(jobs.leaseExpiresAt, sql`CURRENT_TIMESTAMP(3)`))),
          ),
        )
        .orderBy(jobs.id)
        .limit(1)
        .for('update', { skipLocked: true });
      if (!row) return { kind: 'none' as const };
      if (row.status === 'running' && row.attempts >= row.maxAttempts) {
        const error = `The worker running this job stopped responding ${row.attempts} times; giving up. Last worker: ${row.workerId ?? 'unknown'}.${row.error ? ` Earlier error: ${row.error}` : ''}`;
        await tx
          .update(jobs)
          .set({
            status: 'failed',
            error,
            finishedAt: sql`CURRENT_TIMESTAMP(3)`,
            updatedAt: sql`CURRENT_TIMESTAMP(3)`,
            leaseExpiresAt: null,
          })
          .where(eq(jobs.id, row.id));
        await runGiveUpHook(tx, row, 'failed', error);
        return { kind: 'retry' as const };
      }
      if (row.cancelRequested) {
        await tx
          .update(jobs)
          .set({ status: 'cancelled', finishedAt: sql`CURRENT_TIMESTAMP(3)`, updatedAt: sql`CURRENT_TIMESTAMP(3)`, leaseExpiresAt: null })
          .where(eq(jobs.id, row.id));
        await runGiveUpHook(tx, row, 'cancelled', null);
        return { kind: 'retry' as const };
      }
      await tx
        .update(jobs)
        .set({
          status: 'running',
          workerId,
          attempts: row.attempts + 1,
          leaseExpiresAt: sql`CURRENT_TIMESTAMP(3) + INTERVAL ${leaseMs * 1000} MICROSECOND`,
          startedAt: row.startedAt ?? sql`CURRENT_TIMESTAMP(3)`,
          updatedAt: sql`CURRENT_TIMESTAMP(3)`,
          message: row.status === 'running' ? 'Resumed after the previous worker stopped responding' : 'Started',
        })
        .where(eq(jobs.id, row.id));
      return { kind: 'claimed' as const, job: { id: row.id, kind: row.kind, payload: row.payload, attempt: row.attempts + 1 } };
    });
    if (outcome.kind === 'claimed') return outcome.job;
    if (outcome.kind === 'none') return null;
  }
}

/**
 * Reports progress and renews the lease. Returns 'ok', 'cancel' when cancellation was requested,
 * or 'lost' when this worker no longer holds the job (its lease lapsed and another took it).
 */
export async function reportProgress(
  db: Db,
  jobId: number,
  workerId: string,
  progress: number | null,
  message: string | null,
  leaseMs = DEFAULT_LEASE_MS,
): Promise<'ok' | 'cancel' | 'lost'> {
  const set: Record<string, unknown> = {
    leaseExpiresAt: sql`CURRENT_TIMESTAMP(3) + INTERVAL ${leaseMs * 1000} MICROSECOND`,
    updatedAt: sql`CURRENT_TIMESTAMP(3)`,
  };
  if (progress !== null) set.progress = Math.max(0, Math.min(99, Math.round(progress)));
  if (message !== null) set.message = message.slice(0, 300);
  const [res] = await db
    .update(jobs)
    .set(set)
    .where(and(eq(jobs.id, jobId), eq(jobs.workerId, workerId), eq(jobs.status, 'running')));
  if (res.affectedRows === 0) return 'lost';
  const [row] = await db.select({ cancel: jobs.cancelRequested }).from(jobs).where(eq(jobs.id, jobId));
  return row?.cancel ? 'cancel' : 'ok';
}

/**
 * Runs `write` and marks the job succeeded in one transaction, only if this worker still holds it.
 * Returns false (and writes nothing) when the job was lost or cancelled meanwhile.
 */
export async function completeJob(
  db: Db,
  jobId: number,
  workerId: string,
  write: (tx: Tx) => Promise<unknown>,
): Promise<boolean> {
  return db.transaction(async (tx) => {
    const [row] = await tx
      .select({ status: jobs.status, workerId: jobs.workerId, cancel: jobs.cancelRequested })
      .from(jobs)
      .where(eq(jobs.id, jobId))
      .for('update');
    if (!row || row.status !== 'running' || row.workerId !== workerId || row.cancel) return false;
    const result = await write(tx);
    await tx
      .update(jobs)
      .set({
        status: 'succeeded',
        progress: 100,
        message: 'Finished',
        result: result === undefined ? null : result,
        error: null,
        leaseExpiresAt: null,
        finishedAt: sql`CURRENT_TIMESTAMP(3)`,
        updatedAt: sql`CURRENT_TIMESTAMP(3)`,
      })
      .where(eq(jobs.id, jobId));
    return true;
  });
}

/**
 * Records a failure. A retryable one puts the job back in the queue while attempts remain;
 * otherwise (or when `permanent`) the job fails with the error kept.
 */
export async function failJob(db: Db, jobId: number, workerId: string, error: string, permanent: boolean): Promise<JobStatus | null> {
  return db.transaction(async (tx) => {
    const [row] = await tx.select().from(jobs).where(eq(jobs.id, jobId)).for('update');
    if (!row || row.status !== 'running' || row.workerId !== workerId) return null;
    const retry = !permanent && row.attempts < row.maxAttempts && !row.cancelRequested;
    const status: JobStatus = row.cancelRequested ? 'cancelled' : retry ? 'queued' : 'failed';
    await tx
      .update(jobs)
      .set({
        status,
        error: error.slice(0, 4000),
        message: retry ? `Attempt ${row.attempts} failed; queued to try again` : status === 'cancelled' ? 'Cancelled' : 'Failed',
        workerId: retry ? null : row.workerId,
        leaseExpiresAt: null,
        finishedAt: retry ? null : sql`CURRENT_TIMESTAMP(3)`,
        updatedAt: sql`CURRENT_TIMESTAMP(3)`,
      })
      .where(eq(jobs.id, jobId));
    if (status !== 'queued') await runGiveUpHook(tx, row, status, status === 'failed' ? error : null);
    return status;
  });
}

/** Gives a running job back to the queue without counting the attempt (clean worker shutdown). */
export async function releaseJob(db: Db, jobId: number, workerId: string): Promise<void> {
  await db
    .update(jobs)
    .set({
      status: 'queued',
      workerId: null,
      leaseExpiresAt: null,
      attempts: sql`GREATEST(${jobs.attempts} - 1, 0)`,
      message: 'Released by a worker that was shutting down; waiting for another',
      updatedAt: sql`CURRENT_TIMESTAMP(3)`,
    })
    .where(and(eq(jobs.id, jobId), eq(jobs.workerId, workerId), eq(jobs.status, 'running')));
}

/** Marks a job the worker stopped because cancellation was requested. */
export async function markCancelled(db: Db, jobId: number): Promise<void> {
  await db.transaction(async (tx) => {
    const [row] = await tx.select().from(jobs).where(eq(jobs.id, jobId)).for('update');
    if (!row || (row.status !== 'queued' && row.status !== 'running')) return;
    await tx
      .update(jobs)
      .set({ status: 'cancelled', message: 'Cancelled', leaseExpiresAt: null, finishedAt: sql`CURRENT_TIMESTAMP(3)`, updatedAt: sql`CURRENT_TIMESTAMP(3)` })
      .where(eq(jobs.id, jobId));
    await runGiveUpHook(tx, row, 'cancelled', null);
  });
}

/**
 * Cancels a job: a queued one at once, a running one by flagging it (its worker stops at its next
 * progress report). Finished jobs cannot be cancelled.
 */
export async function cancelJob(db: Db, jobId: number): Promise<JobDto> {
  return db.transaction(async (tx) => {
    const [row] = await tx.select().from(jobs).where(eq(jobs.id, jobId)).for('update');
    if (!row) throw new AppError('not_found:job', 'There is no such job.');
    if (row.status === 'queued') {
      await tx
        .update(jobs)
        .set({ status: 'cancelled', cancelRequested: true, message: 'Cancelled before it started', finishedAt: sql`CURRENT_TIMESTAMP(3)`, updatedAt: sql`CURRENT_TIMESTAMP(3)` })
        .where(eq(jobs.id, jobId));
      await runGiveUpHook(tx, row, 'cancelled', null);
    } else if (row.status === 'running') {
      await tx
        .update(jobs)
        .set({ cancelRequested: true, message: 'Cancelling…', updatedAt: sql`CURRENT_TIMESTAMP(3)` })
        .where(eq(jobs.id, jobId));
    } else {
      throw new AppError('conflict:job-finished', `This job has already ${row.status === 'succeeded' ? 'finished' : row.status}; it cannot be cancelled.`);
    }
    const [after] = await tx.select().from(jobs).where(eq(jobs.id, jobId));
    return toJobDto(after);
  });
}
