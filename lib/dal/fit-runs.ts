import 'server-only';
import { and, asc, eq, inArray, sql } from 'drizzle-orm';
import type { DbOrTx, Tx } from '@/db/connection';
import { fitRunSegments, fitRuns, jobs } from '@/db/schema';
import { AppError } from '@/lib/errors';
import { fitRequestSchema, type FitRequest } from '@/lib/fits/request';
import { assembleFitResults, type FitResults, type SegmentOutcome } from '@/lib/fits/results';
import type { SegmentInput } from '@/lib/fits/run';
import type { FitPayload } from '@/lib/jobs/kinds/fit-payload';
import { ENGINE_VERSION } from '@/lib/stats/version';
import { loadFittableDataset, loadPanels } from './panels';

/**
 * The fit jobs' side of a fit run (workers/handlers/fit.ts): what a job reads before computing and
 * what it writes in the job's completion transaction. A run is split into one job per segment
 * (lib/dal/fits.ts createFit); each stores its segment's outcome and the last assembles the run. The person was authorised when the run was
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

/**
 * Stores one segment's outcome in its job's completion transaction and, when it was the last of the
 * run's segments, assembles and stores the run's results. The run's row is locked first, so the
 * completions of a run's segments follow one another: the last one sees every other outcome
 * committed, and the run is assembled exactly once however many workers finish at the same moment.
 * Returns whether this call assembled the run.
 */
export async function storeSegmentOutcome(tx: Tx, fitRunId: number, position: number, outcome: SegmentOutcome): Promise<{ assembled: boolean; done: number; of: number }> {
  const [run] = await tx.select({ status: fitRuns.status }).from(fitRuns).where(eq(fitRuns.id, fitRunId)).for('update');
  if (!run) throw new AppError('invalid:fit-missing', `Fit run ${fitRunId} no longer exists.`);
  await tx
    .update(fitRunSegments)
    .set({ outcome, finishedAt: sql`CURRENT_TIMESTAMP(3)` })
    .where(and(eq(fitRunSegments.fitRunId, fitRunId), eq(fitRunSegments.position, position)));
  // A locking read sees what the other segments' jobs committed while this one waited for the lock.
  const rows = await tx.select().from(fitRunSegments).where(eq(fitRunSegments.fitRunId, fitRunId)).orderBy(asc(fitRunSegments.position)).for('update');
  const done = rows.filter((r) => r.outcome !== null).length;
  if (done < rows.length || run.status === 'succeeded') return { assembled: false, done, of: rows.length };
  await storeFitResults(tx, fitRunId, assembleFitResults(rows.map((r) => r.outcome as SegmentOutcome)));
  return { assembled: true, done, of: rows.length };
}

/**
 * When one segment's job ends without a result for good (failed after its last attempt, a
 * permanent error such as a changed dataset, or cancelled), the run cannot be completed: it is
 * marked failed or cancelled with the reason, and its other segments' jobs are stopped (queued ones
 * cancelled at once, running ones asked to stop at their next progress report).
 */
export async function markFitRunGivenUp(tx: Tx, fitRunId: number, jobId: number, status: 'failed' | 'cancelled', error: string | null): Promise<void> {
  const [run] = await tx.select({ status: fitRuns.status }).from(fitRuns).where(eq(fitRuns.id, fitRunId)).for('update');
  if (!run || run.status === 'succeeded') return;
  await tx
    .update(fitRuns)
    .set({ status, error: status === 'failed' ? (error ?? 'A segment of this fit could not be computed.').slice(0, 4000) : null, finishedAt: sql`CURRENT_TIMESTAMP(3)` })
    .where(eq(fitRuns.id, fitRunId));
  const siblings = (await tx.select({ jobId: fitRunSegments.jobId }).from(fitRunSegments).where(eq(fitRunSegments.fitRunId, fitRunId)))
    .map((r) => r.jobId)
    .filter((id): id is number => id !== null && id !== jobId);
  if (siblings.length === 0) return;
  const why = status === 'cancelled' ? 'Cancelled with the rest of the fit' : 'Stopped: another segment of this fit failed';
  await tx
    .update(jobs)
    .set({ status: 'cancelled', cancelRequested: true, message: why, finishedAt: sql`CURRENT_TIMESTAMP(3)`, updatedAt: sql`CURRENT_TIMESTAMP(3)` })
    .where(and(inArray(jobs.id, siblings), eq(jobs.status, 'queued')));
  await tx
    .update(jobs)
    .set({ cancelRequested: true, message: why, updatedAt: sql`CURRENT_TIMESTAMP(3)` })
    .where(and(inArray(jobs.id, siblings), eq(jobs.status, 'running')));
}
