/**
 * `fit` handler: reads the fit run and its dataset's panels, fits every segment with the engine
 * (lib/fits/run.ts -> lib/engine's fitPanelParallel, the bootstrap on worker threads) while
 * reporting progress, and returns a writer that stores the results in the job's completion
 * transaction. Nothing is written before then, so a worker killed in the middle of a bootstrap
 * leaves the run untouched for the next worker, which recomputes the same numbers from the seeds.
 * Cancellation and a lost lease reach the engine through ctx.signal and through ctx.progress,
 * which throws once the job is stopped.
 */
import { eq, sql } from 'drizzle-orm';
import { z } from 'zod';
import { fitRuns } from '@/db/schema';
import { defaultThreads } from '@/lib/engine';
import { AppError } from '@/lib/errors';
import { loadFittableDataset, loadPanels } from '@/lib/fits/panels';
import { fitRequestSchema } from '@/lib/fits/request';
import { computeFitRun } from '@/lib/fits/run';
import type { FitPayload } from '@/lib/jobs/kinds/fit';
import type { Tx } from '@/db/connection';
import { ENGINE_VERSION } from '@/lib/stats/version';
import type { JobContext } from '../job-handler';

/** FIT_THREADS: worker threads per fit job for the bootstrap (0 = the job's own thread); default: the cores, at most 2. */
const threadsSchema = z.coerce.number().int().min(0).max(64).optional();

function fitThreads(): number {
  const parsed = threadsSchema.safeParse(process.env.FIT_THREADS || undefined);
  if (!parsed.success) throw new Error(`FIT_THREADS must be a whole number from 0 to 64; got "${process.env.FIT_THREADS}".`);
  return parsed.data ?? Math.min(2, defaultThreads());
}

export async function fitHandler(ctx: JobContext<FitPayload>) {
  const { fitRunId, datasetId, datasetSha256 } = ctx.payload;
  const [run] = await ctx.db.select().from(fitRuns).where(eq(fitRuns.id, fitRunId));
  if (!run) throw new AppError('invalid:fit-missing', `Fit run ${fitRunId} no longer exists.`);
  let dataset;
  try {
    dataset = await loadFittableDataset(ctx.db, datasetId);
  } catch (err) {
    if (err instanceof AppError) throw new AppError('invalid:dataset-missing', `${err.message} Fit run ${fitRunId} cannot be computed.`);
    throw err;
  }
  if (dataset.sha256 !== datasetSha256 || run.datasetId !== datasetId) {
    throw new AppError('invalid:dataset-changed', `Dataset ${datasetId} is not the file this fit was requested on (hash differs); start a new fit.`);
  }
  if (run.engineVersion !== ENGINE_VERSION) {
    throw new AppError(
      'invalid:engine-version',
      `Fit run ${fitRunId} was requested with engine ${run.engineVersion}; this worker runs engine ${ENGINE_VERSION}, which could give other numbers. Start a new fit.`,
    );
  }
  const request = fitRequestSchema.parse(run.request);
  await ctx.progress(1, 'Reading the panels');
  const panels = await loadPanels(ctx.db, request);
  const results = await computeFitRun(panels, request, {
    threads: fitThreads(),
    signal: ctx.signal,
    onProgress: (pct, message) => ctx.progress(Math.max(1, Math.round(pct * 10) / 10), message),
  });
  return async (tx: Tx) => {
    await tx
      .update(fitRuns)
      .set({ results, status: 'succeeded', error: null, finishedAt: sql`CURRENT_TIMESTAMP(3)` })
      .where(eq(fitRuns.id, fitRunId));
    return { fitRunId, segments: results.segments.length };
  };
}
