/**
 * `fit` handler: reads the fit run and its dataset's panels, fits every segment (lib/fits/engine.ts)
 * while reporting progress, and returns a writer that stores the results in the job's completion
 * transaction. Nothing is written before then, so a worker killed in the middle of a bootstrap
 * leaves the run untouched for the next worker, which recomputes the same numbers from the seeds.
 */
import { eq, sql } from 'drizzle-orm';
import { fitRuns } from '@/db/schema';
import { AppError } from '@/lib/errors';
import { fitSegment, FIT_ENGINE_VERSION } from '@/lib/fits/engine';
import { loadFittableDataset, loadPanels } from '@/lib/fits/panels';
import { fitRequestSchema } from '@/lib/fits/request';
import type { FitResults, SegmentResult } from '@/lib/fits/results';
import { FIT_JOB, type FitPayload } from '@/lib/jobs/kinds/fit';
import type { Tx } from '@/lib/jobs/queue';
import { registerJobHandler, type JobContext } from '../registry';

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
  if (run.engineVersion !== FIT_ENGINE_VERSION) {
    throw new AppError('invalid:engine-version', `Fit run ${fitRunId} was requested with engine ${run.engineVersion}; this worker runs ${FIT_ENGINE_VERSION}.`);
  }
  const request = fitRequestSchema.parse(run.request);
  await ctx.progress(1, 'Reading the panels');
  const panels = await loadPanels(ctx.db, request);
  const segmentsOut: SegmentResult[] = [];
  for (let i = 0; i < panels.length; i++) {
    const name = panels[i].segment;
    const base = (i / panels.length) * 98;
    const share = 98 / panels.length;
    await ctx.progress(base + 1, `Fitting ${name} (${i + 1} of ${panels.length})`);
    segmentsOut.push(
      await fitSegment(panels[i], {
        level: request.level,
        bootstrap: request.bootstrap ?? null,
        audit: request.audit ?? null,
        onProgress: async (fraction, message) => {
          if (ctx.signal.aborted) throw ctx.signal.reason ?? new Error('aborted');
          await ctx.progress(base + 1 + fraction * (share - 1), `${name}: ${message}`);
        },
      }),
    );
  }
  const results: FitResults = { engine: { version: FIT_ENGINE_VERSION }, segments: segmentsOut };
  return async (tx: Tx) => {
    await tx
      .update(fitRuns)
      .set({ results, status: 'succeeded', error: null, finishedAt: sql`CURRENT_TIMESTAMP(3)` })
      .where(eq(fitRuns.id, fitRunId));
    return { fitRunId, segments: segmentsOut.length };
  };
}

registerJobHandler(FIT_JOB, fitHandler);
