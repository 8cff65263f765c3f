import type { Db } from '@/db/connection';
import { AppError } from '@/lib/errors';
import { kindSpec } from '@/lib/jobs/kinds';
import { claimJob, completeJob, DEFAULT_LEASE_MS, failJob, markCancelled, releaseJob, reportProgress } from '@/lib/jobs/queue';
import { handlerFor, jobHandlers, type JobHandlers } from './handlers';

export type JobLoopOptions = {
  db: Db;
  workerId: string;
  signal: AbortSignal;
  /** How long to wait between polls when the queue is empty. */
  idleMs?: number;
  leaseMs?: number;
  /** The handlers by kind (default: every kind's, workers/handlers); tests pass their own. */
  handlers?: JobHandlers;
  /** Restrict to these kinds (default: every kind with a handler). */
  kinds?: string[];
  log?: (msg: string) => void;
};

class JobStopped extends Error {
  constructor(readonly why: 'cancel' | 'lost' | 'shutdown') {
    super(`job stopped: ${why}`);
  }
}

function sleep(ms: number, signal: AbortSignal): Promise<void> {
  return new Promise((resolve) => {
    if (signal.aborted) return resolve();
    const onAbort = () => {
      clearTimeout(t);
      resolve();
    };
    const t = setTimeout(() => {
      signal.removeEventListener('abort', onAbort);
      resolve();
    }, ms);
    signal.addEventListener('abort', onAbort, { once: true });
  });
}

/** Runs one claimed job to its end (succeeded, failed, retried, cancelled or released). */
async function runOne(opts: JobLoopOptions, job: { id: number; kind: string; payload: unknown; attempt: number }) {
  const { db, workerId } = opts;
  const leaseMs = opts.leaseMs ?? DEFAULT_LEASE_MS;
  const log = opts.log ?? ((m: string) => console.log(`[worker] ${m}`));
  const handler = handlerFor(job.kind, opts.handlers);
  const schema = kindSpec(job.kind)?.schema;
  if (!handler || !schema) {
    await failJob(db, job.id, workerId, `No handler for job kind "${job.kind}" in this worker.`, true);
    return;
  }
  const parsed = schema.safeParse(job.payload);
  if (!parsed.success) {
    await failJob(db, job.id, workerId, `The job's payload is not valid: ${parsed.error.issues[0]?.message ?? 'unknown'}`, true);
    return;
  }
  const local = new AbortController();
  let stopped: JobStopped | null = null;
  const stop = (why: JobStopped['why']) => {
    if (!stopped) {
      stopped = new JobStopped(why);
      local.abort(stopped);
    }
  };
  const onShutdown = () => stop('shutdown');
  opts.signal.addEventListener('abort', onShutdown, { once: true });

  // Renew the lease in the background too, so long computations between progress reports keep it.
  const renew = async (pct: number | null, message: string | null) => {
    const r = await reportProgress(db, job.id, workerId, pct, message, leaseMs);
    if (r !== 'ok') stop(r);
  };
  const timer = setInterval(() => void renew(null, null).catch(() => undefined), Math.max(1000, leaseMs / 3));
  const t0 = Date.now();
  try {
    const writer = await handler({
      jobId: job.id,
      payload: parsed.data,
      db,
      attempt: job.attempt,
      signal: local.signal,
      progress: async (pct, message) => {
        if (stopped) throw stopped;
        await renew(pct, message ?? null);
        if (stopped) throw stopped;
      },
    });
    if (stopped) throw stopped;
    const done = await completeJob(db, job.id, workerId, writer);
    log(done ? `job ${job.id} (${job.kind}) succeeded in ${Date.now() - t0} ms` : `job ${job.id} (${job.kind}) was taken over or cancelled; results discarded`);
    if (!done) {
      const r = await reportProgress(db, job.id, workerId, null, null, leaseMs).catch(() => 'lost' as const);
      if (r === 'cancel') await markCancelled(db, job.id);
    }
  } catch (err) {
    const why = stopped ? (stopped as JobStopped).why : null;
    if (why === 'shutdown') {
      await releaseJob(db, job.id, workerId);
      log(`job ${job.id} released for another worker (shutting down)`);
    } else if (why === 'cancel') {
      await markCancelled(db, job.id);
      log(`job ${job.id} cancelled`);
    } else if (why === 'lost') {
      log(`job ${job.id} lost its lease to another worker; stopped`);
    } else {
      const permanent = err instanceof AppError;
      const message = err instanceof Error ? err.message : String(err);
      const status = await failJob(db, job.id, workerId, message, permanent);
      log(`job ${job.id} (${job.kind}) ${status === 'queued' ? 'failed, will retry' : 'failed'}: ${message}`);
      if (!permanent) console.error(err);
    }
  } finally {
    clearInterval(timer);
    opts.signal.removeEventListener('abort', onShutdown);
  }
}

/**
 * The worker's loop: claim a job, run it, repeat; wait `idleMs` when the queue is empty. Returns
 * when `signal` is aborted (a running job is released for another worker).
 */
export async function runJobLoop(opts: JobLoopOptions): Promise<void> {
  const kinds = opts.kinds ?? Object.keys(opts.handlers ?? jobHandlers);
  const idleMs = opts.idleMs ?? 1000;
  while (!opts.signal.aborted) {
    let job = null;
    try {
      job = await claimJob(opts.db, opts.workerId, kinds, opts.leaseMs ?? DEFAULT_LEASE_MS);
    } catch (err) {
      console.error('[worker] claiming a job failed:', err instanceof Error ? err.message : err);
      await sleep(Math.max(idleMs, 2000), opts.signal);
      continue;
    }
    if (!job) {
      await sleep(idleMs, opts.signal);
      continue;
    }
    await runOne(opts, job);
  }
}
