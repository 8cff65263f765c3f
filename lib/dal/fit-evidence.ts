import 'server-only';
import { eq } from 'drizzle-orm';
import type { DbOrTx } from '@/db/connection';
import { fitRuns } from '@/db/schema';
import { AppError } from '@/lib/errors';

/** What an assumption copies from its fit run and freezes. */
export type FitEvidence = {
  fitRunId: number;
  datasetId: number | null;
  datasetSha256: string;
  engineVersion: string;
  seeds: unknown;
  /** The engine's results JSON (segments[].estimates...), see lib/fits/results.ts. */
  results: unknown;
};

/**
 * Loads a finished fit run's evidence inside the drafting transaction. A run's results are written
 * once, when its job succeeds, so no lock is needed (MariaDB has no FOR SHARE either); the foreign
 * key from assumption_versions (ON DELETE RESTRICT) keeps the run from then on.
 */
export async function loadFitEvidence(tx: DbOrTx, fitId: number): Promise<FitEvidence> {
  const [run] = await tx.select().from(fitRuns).where(eq(fitRuns.id, fitId));
  if (!run) throw new AppError('not_found:fit', `There is no fit run ${fitId}.`, { field: 'fitId' });
  if (run.status !== 'succeeded' || !run.results) {
    throw new AppError('conflict:fit-not-finished', `Fit run ${fitId} is ${run.status}: draft from a fit that has finished.`, { field: 'fitId' });
  }
  return {
    fitRunId: run.id,
    datasetId: run.datasetId,
    datasetSha256: run.datasetSha256,
    engineVersion: run.engineVersion,
    seeds: run.seeds,
    results: run.results,
  };
}
