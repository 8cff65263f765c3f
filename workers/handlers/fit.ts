/**
 * `fit` handler: one segment of a fit run per job (lib/dal/fits.ts queues one per segment, so every
 * worker, on any machine, takes its share of a run through the queue). Reads the run and the
 * segment's panel (lib/dal/fit-runs.ts), computes the segment with the engine
 * (lib/fits/run.ts computeFitSegment: fitPanelParallel, the bootstrap on worker threads, the window
 * comparison) while reporting progress, and returns a writer that stores the segment's outcome in
 * the job's completion transaction, where the last segment of the run assembles its results
 * (storeSegmentOutcome: exactly once, under the lock of the run's row). Nothing is written before
 * then, so a worker killed in the middle of a bootstrap leaves the run untouched for the next worker,
 * which recomputes the same numbers from the seeds. Cancellation and a lost lease reach the engine
 * through ctx.signal and through ctx.progress, which throws once the job is stopped.
 *
 * A job queued before runs were split (no segment in its payload) computes the whole run.
 */
import { z } from 'zod';
import type { Tx } from '@/db/connection';
import { loadFitJob, storeFitResults, storeSegmentOutcome } from '@/lib/dal/fit-runs';
import { AppError } from '@/lib/errors';
import { defaultThreads } from '@/lib/engine';
import { computeFitRun, computeFitSegment } from '@/lib/fits/run';
import type { FitPayload } from '@/lib/jobs/kinds/fit-payload';
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
  const onProgress = (pct: number, message: string) => ctx.progress(Math.max(1, Math.round(pct * 10) / 10), message);
  const { segment, fitRunId } = ctx.payload;
  if (!segment) {
    const results = await computeFitRun(panels, request, { threads: fitThreads(), signal: ctx.signal, onProgress });
    return async (tx: Tx) => {
      await storeFitResults(tx, fitRunId, results);
      return { fitRunId, segments: results.segments.length };
    };
  }
  const panel = panels[segment.position];
  if (!panel || panel.segment !== segment.name) {
    throw new AppError('invalid:fit-segment', `Segment ${segment.position + 1} of fit run ${fitRunId} is not ${segment.name} in its dataset any more; start a new fit.`);
  }
  const outcome = await computeFitSegment(panel, segment.position, request, { threads: fitThreads(), signal: ctx.signal, onProgress });
  return async (tx: Tx) => {
    const stored = await storeSegmentOutcome(tx, fitRunId, segment.position, outcome);
    return { fitRunId, position: segment.position, segment: segment.name, ...stored };
  };
}
