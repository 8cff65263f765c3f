/**
 * `fit` handler: reads the fit run and its dataset's panels (lib/dal/fit-runs.ts), fits every
 * segment with the engine (lib/fits/run.ts -> lib/engine's fitPanelParallel, the bootstrap on
 * worker threads) while reporting progress, and returns a writer that stores the results in the
 * job's completion transaction. Nothing is written before then, so a worker killed in the middle of
 * a bootstrap leaves the run untouched for the next worker, which recomputes the same numbers from
 * the seeds. Cancellation and a lost lease reach the engine through ctx.signal and through
 * ctx.progress, which throws once the job is stopped.
 */
import { z } from 'zod';
import type { Tx } from '@/db/connection';
import { loadFitJob, storeFitResults } from '@/lib/dal/fit-runs';
import { defaultThreads } from '@/lib/engine';
import { computeFitRun } from '@/lib/fits/run';
import type { FitPayload } from '@/lib/jobs/kinds/fit';
import type { JobContext } from '../job-handler';

/** FIT_THREADS: worker threads per fit job for the bootstrap (0 = the job's own thread); default: the cores, at most 2. */
const threadsSchema = z.coerce.number().int().min(0).max(64).optional();

function fitThreads(): number {
  const parsed = threadsSchema.safeParse(process.env.FIT_THREADS || undefined);
  if (!parsed.success) throw new Error(`FIT_THREADS must be a whole number from 0 to 64; got "${process.env.FIT_THREADS}".`);
  return parsed.data ?? Math.min(2, defaultThreads());
}

export async function fitHandler(ctx: JobContext<FitPayload>) {
  await ctx.progress(1, 'Reading the panels');
  const { request, panels } = await loadFitJob(ctx.db, ctx.payload);
  const results = await computeFitRun(panels, request, {
    threads: fitThreads(),
    signal: ctx.signal,
    onProgress: (pct, message) => ctx.progress(Math.max(1, Math.round(pct * 10) / 10), message),
  });
  return async (tx: Tx) => {
    await storeFitResults(tx, ctx.payload.fitRunId, results);
    return { fitRunId: ctx.payload.fitRunId, segments: results.segments.length };
  };
}
