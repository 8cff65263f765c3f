import type { Db } from '@/db/connection';

/**
 * The job loop. Until the job queue lands (lib/jobs/queue.ts) it only waits for the stop signal;
 * the heartbeat in workers/index.ts is what /api/health reports.
 */
export async function runJobLoop(opts: { db: Db; workerId: string; signal: AbortSignal }): Promise<void> {
  await new Promise<void>((resolve) => {
    if (opts.signal.aborted) return resolve();
    opts.signal.addEventListener('abort', () => resolve(), { once: true });
  });
}
