import 'server-only';
import { eq, sql } from 'drizzle-orm';
import type { DbOrTx } from '@/db/connection';
import { fitRuns } from '@/db/schema';
import { AppError } from '@/lib/errors';
import { fitRequestSchema, type FitRequest } from '@/lib/fits/request';
import type { FitResults } from '@/lib/fits/results';
import type { SegmentInput } from '@/lib/fits/run';
import type { FitPayload } from '@/lib/jobs/kinds/fit';
import { ENGINE_VERSION } from '@/lib/stats/version';
import { loadFittableDataset, loadPanels } from './panels';

/**
 * The fit job's side of a fit run (workers/handlers/fit.ts): what it reads before computing and
 * what it writes in the job's completion transaction. The person was authorised when the run was
 * requested (lib/dal/fits.ts createFit); nothing here checks a role.
 */

/**
 * The request and panels of a queued fit run. Refuses, as a permanent failure, a run or dataset
 * that disappeared, a dataset whose file changed since the request, and a run requested with
 * another engine version (it could give other numbers than the ones asked for).
 */
export async function loadFitJob(db: DbOrTx, payload: FitPayload): Promise<{ request: FitRequest; panels: SegmentInput[] }> {
  const { fitRunId, datasetId, datasetSha256 } = payload;
  const [run] = await db.select().from(fitRuns).where(eq(fitRuns.id, fitRunId));
  if (!run) throw new AppError('invalid:fit-missing', `Fit run ${fitRunId} no longer exists.`);
  let dataset;
  try {
    dataset = await loadFittableDataset(db, datasetId);
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
  return { request, panels: await loadPanels(db, request) };
}

/** Stores a fit run's results and marks it succeeded (in the job's completion transaction). */
export async function storeFitResults(tx: DbOrTx, fitRunId: number, results: FitResults): Promise<void> {
  await tx
    .update(fitRuns)
    .set({ results, status: 'succeeded', error: null, finishedAt: sql`CURRENT_TIMESTAMP(3)` })
    .where(eq(fitRuns.id, fitRunId));
}
