import { z } from 'zod';

/**
 * `fit`: estimates rho for one segment of a fit run (workers/handlers/fit.ts), so that the segments
 * of a run are shared by every worker through the queue. Enqueued by lib/dal/fits.ts, one per
 * segment, in the transaction that creates the fit run. The dataset id and hash are in the payload
 * so the worker can refuse a dataset that disappeared or changed since the request. A job without
 * `segment` (queued before runs were split) computes every segment of its run.
 */
export const FIT_JOB = 'fit';

export const fitPayloadSchema = z.object({
  fitRunId: z.number().int().positive(),
  datasetId: z.number().int().positive(),
  datasetSha256: z.string().regex(/^[0-9a-f]{64}$/, 'datasetSha256 must be 64 lower-case hex digits'),
  /** The segment this job computes, and its place among the run's segments. */
  segment: z.object({ position: z.number().int().min(0), name: z.string().min(1).max(200) }).optional(),
});
export type FitPayload = z.infer<typeof fitPayloadSchema>;
