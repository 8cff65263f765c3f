import type { Db } from '@/db/connection';
import { kindSpec } from '@/lib/jobs/kinds';
import { claimJob, completeJob } from '@/lib/jobs/queue';
import { handlerFor } from './handlers';

/**
 * Runs one queued job to completion in this process, exactly as the job loop does (claim, the
 * kind's handler, the completion transaction), for scripts that need a job's result before they go
 * on: the demo seed drafts its assumptions from the fit it requests. Throws when the job cannot be
 * claimed (another worker took it) or fails.
 */
export async function runJobHere(db: Db, jobId: number, kind: string): Promise<void> {
  const workerId = `inline-${process.pid}`;
  const claimed = await claimJob(db, workerId, [kind]);
  if (!claimed || claimed.id !== jobId) throw new Error(`Job ${jobId} (${kind}) could not be claimed here (is a worker running on this database?).`);
  const handler = handlerFor(kind);
  const spec = kindSpec(kind);
  if (!handler || !spec) throw new Error(`There is no job kind "${kind}" with a handler.`);
  const write = await handler({
    jobId: claimed.id,
    payload: spec.schema.parse(claimed.payload),
    db,
    attempt: claimed.attempt,
    signal: new AbortController().signal,
    progress: async () => undefined,
  });
  if (!(await completeJob(db, claimed.id, workerId, write))) throw new Error(`Job ${jobId} (${kind}) was taken over before it finished.`);
}
