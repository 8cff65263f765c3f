import { z } from 'zod';
import { defineJobKind } from '../kinds';

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

defineJobKind(CONVERT_LOANS_JOB, convertLoansPayloadSchema);
