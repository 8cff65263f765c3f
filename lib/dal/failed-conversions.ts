import 'server-only';
import { and, eq, inArray, isNotNull, sql } from 'drizzle-orm';
import type { DbOrTx } from '@/db/connection';
import { datasets, uploadReports } from '@/db/schema';

/**
 * Loan tapes whose conversion ended without a result. Such a dataset is marked failed and no longer
 * holds its file's identity (dedupe key), so the same bytes can be uploaded again. Nothing here
 * checks who the caller is: the convert-loans job's give-up hook and the upload call it.
 */

/**
 * Marks the dataset and its upload report failed with `message`, if they are still waiting for
 * their conversion (runs in the transaction that ends the job).
 */
export async function markConversionFailed(tx: DbOrTx, ids: { datasetId: number; reportId: number }, message: string): Promise<void> {
  await tx
    .update(datasets)
    .set({ status: 'failed', dedupeKey: null })
    .where(and(eq(datasets.id, ids.datasetId), eq(datasets.status, 'processing')));
  await tx
    .update(uploadReports)
    .set({ status: 'failed', message, finishedAt: sql`CURRENT_TIMESTAMP(3)` })
    .where(and(eq(uploadReports.id, ids.reportId), eq(uploadReports.status, 'processing')));
}

/** Frees the identity of datasets whose conversion failed, so the same file can be uploaded again. */
export async function releaseFailedIdentity(db: DbOrTx, datasetIds: number[]): Promise<void> {
  if (datasetIds.length === 0) return;
  await db
    .update(datasets)
    .set({ dedupeKey: null, status: 'failed' })
    .where(and(inArray(datasets.id, datasetIds), isNotNull(datasets.dedupeKey)));
}
