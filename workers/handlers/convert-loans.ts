/**
 * `convert-loans` handler: reads a stored loan tape back from the database, validates every row and
 * aggregates it by the cohort method (lib/ingest/loan-tape.ts) while reporting progress, then
 * returns a writer that stores the cohort rows (or the rejection) in the job's completion
 * transaction. Nothing is written before that transaction, so a crash leaves the dataset in
 * "processing" for the next attempt.
 */
import type { Tx } from '@/db/connection';
import { loadConvertibleDataset, storedFileSource, writeLoanConversion } from '@/lib/dal/dataset-store';
import { uploadLimits } from '@/lib/env';
import type { ByteSource } from '@/lib/ingest/csv-reader';
import { convertLoanTape } from '@/lib/ingest/upload';
import type { ConvertLoansPayload } from '@/lib/jobs/kinds/convert-loans';
import type { JobContext } from '../job-handler';

const PROGRESS_EVERY_MS = 500;

/** Passes the source through, reporting the share of bytes read and stopping when aborted. */
function withProgress(source: ByteSource, totalBytes: number, ctx: Pick<JobContext, 'progress' | 'signal'>): ByteSource {
  return (async function* () {
    let seen = 0;
    let last = Date.now();
    for await (const chunk of source) {
      if (ctx.signal.aborted) throw ctx.signal.reason ?? new Error('aborted');
      seen += typeof chunk === 'string' ? Buffer.byteLength(chunk) : chunk.byteLength;
      const now = Date.now();
      if (now - last >= PROGRESS_EVERY_MS) {
        last = now;
        const pct = totalBytes > 0 ? Math.min(95, (95 * seen) / totalBytes) : 50;
        await ctx.progress(pct, `Validating and aggregating: ${(seen / 1048576).toFixed(1)} of ${(totalBytes / 1048576).toFixed(1)} MB read`);
      }
      yield chunk;
    }
  })();
}

export async function convertLoansHandler(ctx: JobContext<ConvertLoansPayload>) {
  const { datasetId, reportId, supersedes, asOf, referenceMonthDay, exitConvention } = ctx.payload;
  const ds = await loadConvertibleDataset(ctx.db, datasetId);
  await ctx.progress(1, 'Reading the stored file');
  const source = withProgress(storedFileSource(ctx.db, datasetId), ds.sizeBytes, ctx);
  const validated = await convertLoanTape(source, {
    asOf,
    referenceMonthDay,
    exitConvention,
    // The file passed the size limit when it was uploaded; the limit does not apply again here.
    // The row and header limits do: a tape's rows past its first are read here for the first time.
    ...uploadLimits(),
    maxBytes: Number.MAX_SAFE_INTEGER,
  });
  await ctx.progress(97, validated.ok ? `Writing ${validated.cohortRows.length} cohort rows` : `Rejected: ${validated.summary.errors} errors`);
  return async (tx: Tx) => {
    const r = await writeLoanConversion(tx, { datasetId, reportId, supersedes, validated });
    return { datasetId, reportId, ...r };
  };
}
