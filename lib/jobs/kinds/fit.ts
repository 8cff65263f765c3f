import { z } from 'zod';
import { defineJobKind } from '../job-kind';

/**
 * `fit`: estimates rho for the segments of one fit run (workers/handlers/fit.ts). Enqueued by
 * lib/dal/fits.ts in the transaction that creates the fit run. The dataset id and hash are in the
 * payload so the worker can refuse a dataset that disappeared or changed since the request.
 */
export const FIT_JOB = 'fit';

export const fitPayloadSchema = z.object({
  fitRunId: z.number().int().positive(),
  datasetId: z.number().int().positive(),
  datasetSha256: z.string().regex(/^[0-9a-f]{64}$/, 'datasetSha256 must be 64 lower-case hex digits'),
});
export type FitPayload = z.infer<typeof fitPayloadSchema>;

export const fitJob = defineJobKind(FIT_JOB, fitPayloadSchema);
