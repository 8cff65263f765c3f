import { markFitRunGivenUp } from '@/lib/dal/fit-runs';
import { defineJobKind } from '../job-kind';
import { FIT_JOB, fitPayloadSchema } from './fit-payload';

/** The `fit` job kind (fit-payload.ts) and what happens when one of its jobs is given up. */
export const fitJob = defineJobKind(FIT_JOB, fitPayloadSchema, {
  // A segment that ends without a result for good ends its run: marked failed or cancelled with the
  // reason, the other segments' jobs stopped.
  onGiveUp: async (tx, end) => {
    const p = fitPayloadSchema.safeParse(end.payload);
    if (!p.success) return;
    await markFitRunGivenUp(tx, p.data.fitRunId, end.jobId, end.status, end.error);
  },
});
