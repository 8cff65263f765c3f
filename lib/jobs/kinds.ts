import type { z } from 'zod';
import type { Tx } from '@/db/connection';

/**
 * The registry of job kinds and their payload schemas. A kind is declared once, in lib (so that
 * the web app can enqueue and validate without loading worker code); its handler is registered in
 * workers/handlers. Declarations live in lib/jobs/kinds/<kind>.ts and are imported by
 * lib/jobs/kinds/index.ts.
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

type KindEntry = { schema: z.ZodType; onGiveUp?: JobGiveUpHook };
const registry = new Map<string, KindEntry>();

export function defineJobKind<S extends z.ZodType>(
  kind: string,
  payloadSchema: S,
  options: { onGiveUp?: JobGiveUpHook } = {},
): { kind: string; schema: S } {
  if (!/^[a-z][a-z0-9-]{1,39}$/.test(kind)) throw new Error(`Job kind "${kind}" must be kebab-case, 2-40 characters.`);
  const existing = registry.get(kind);
  // In development a module re-evaluated by hot reload declares its kind again with a new schema
  // object: the newer declaration replaces the older one there; elsewhere two declarations are a bug.
  if (existing && existing.schema !== payloadSchema && process.env.NODE_ENV === 'production') {
    throw new Error(`Job kind "${kind}" is declared twice.`);
  }
  registry.set(kind, { schema: payloadSchema, onGiveUp: options.onGiveUp });
  return { kind, schema: payloadSchema };
}

export function payloadSchemaFor(kind: string): z.ZodType | undefined {
  return registry.get(kind)?.schema;
}

export function giveUpHookFor(kind: string): JobGiveUpHook | undefined {
  return registry.get(kind)?.onGiveUp;
}

export function declaredKinds(): string[] {
  return [...registry.keys()];
}
