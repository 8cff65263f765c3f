import { z } from 'zod';
import { markConversionFailed } from '@/lib/dal/failed-conversions';
import { defineJobKind } from '../job-kind';

/**
 * `convert-loans`: validates a stored loan-level tape and aggregates it to annual cohort rows
 * (workers/handlers/convert-loans.ts). Enqueued by the upload in the same transaction that stores
 * the dataset (status processing) and its file.
 */
export const CONVERT_LOANS_JOB = 'convert-loans';

export const convertLoansPayloadSchema = z.object({
  datasetId: z.number().int().positive(),
  reportId: z.number().int().positive(),
  supersedes: z.number().int().positive().nullable().default(null),
  asOf: z.string().regex(/^\d{4}-\d{2}-\d{2}$/).optional(),
  referenceMonthDay: z.string().regex(/^\d{2}-\d{2}$/).optional(),
  exitConvention: z.enum(['exits-stay', 'exits-removed']).optional(),
});
export type ConvertLoansPayload = z.infer<typeof convertLoansPayloadSchema>;

/** The sentence stored on the upload report of a conversion that failed or was cancelled. */
export function conversionFailureMessage(status: 'failed' | 'cancelled', error: string | null): string {
  const why =
    status === 'cancelled'
      ? 'The conversion was cancelled before it finished.'
      : `The conversion did not finish: ${(error ?? 'no detail was recorded').trim().replace(/[^.!?]$/, '$&.')}`;
  return `${why} No cohort rows were stored. Upload the same file again to retry; if it fails again, tell an administrator (the worker's log has the detail).`.slice(0, 500);
}

export const convertLoansJob = defineJobKind(CONVERT_LOANS_JOB, convertLoansPayloadSchema, {
  // A conversion that ends without a result (a crash after the last attempt, a permanent error, a
  // cancel) marks its dataset and report failed in the same transaction, and frees the file's
  // identity so that the same bytes can be uploaded again. A validation rejection is not this: the
  // job succeeds and its writer stores the rejected report.
  onGiveUp: async (tx, end) => {
    const p = convertLoansPayloadSchema.safeParse(end.payload);
    if (!p.success) return;
    await markConversionFailed(tx, p.data, conversionFailureMessage(end.status, end.error));
  },
});
