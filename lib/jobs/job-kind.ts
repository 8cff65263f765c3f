import type { z } from 'zod';
import type { Tx } from '@/db/connection';

/**
 * What a job kind is: its payload schema (checked when a job is queued and again when a worker
 * runs it) and, optionally, what to do when a job of the kind gives up. Kinds are declared in
 * lib/jobs/kinds/<kind>.ts and listed in the static map of lib/jobs/kinds/index.ts, so the web app
 * can queue and validate without loading worker code; their handlers are in workers/handlers.
 */

/**
 * Called when a job of this kind ends without success for good (failed after its last attempt, a
 * permanent error, or cancelled), inside the transaction that records that end, so that whatever
 * waits for the job (a dataset in "processing", say) is marked in the same commit. The payload is
 * the stored one, not validated: check it. A hook that throws is rolled back to a savepoint and
 * logged; the job still ends.
 */
export type JobGiveUpHook = (
  tx: Tx,
  end: { jobId: number; payload: unknown; status: 'failed' | 'cancelled'; error: string | null },
) => Promise<void>;

export type JobKindSpec<S extends z.ZodType = z.ZodType> = {
  /** kebab-case, 2-40 characters; stored in jobs.kind */
  name: string;
  schema: S;
  onGiveUp?: JobGiveUpHook;
};

/** Declares a job kind (no registration: add it to the map in lib/jobs/kinds/index.ts). */
export function defineJobKind<N extends string, S extends z.ZodType>(
  name: N,
  schema: S,
  options: { onGiveUp?: JobGiveUpHook } = {},
): JobKindSpec<S> & { name: N } {
  if (!/^[a-z][a-z0-9-]{1,39}$/.test(name)) throw new Error(`Job kind "${name}" must be kebab-case, 2-40 characters.`);
  return { name, schema, ...(options.onGiveUp ? { onGiveUp: options.onGiveUp } : {}) };
}
