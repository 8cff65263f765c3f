/**
 * Every job kind, in one static map keyed by its name: the queue validates payloads and finds
 * give-up hooks here, and workers/handlers/index.ts must give each key a handler (checked at
 * compile time). To add a kind, declare it in lib/jobs/kinds/<kind>.ts and add it below.
 */
import type { z } from 'zod';
import type { JobKindSpec } from '../job-kind';
import { convertLoansJob } from './convert-loans';
import { fitJob } from './fit';
import { monitorBacktestJob } from './monitor-backtest';

export const jobKinds = {
  fit: fitJob,
  'convert-loans': convertLoansJob,
  'monitor-backtest': monitorBacktestJob,
} as const satisfies Record<string, JobKindSpec>;

export type JobKind = keyof typeof jobKinds;
/** The validated payload of a job of kind K, as its handler receives it. */
export type JobPayload<K extends JobKind> = z.output<(typeof jobKinds)[K]['schema']>;

/** The declaration of a kind stored in jobs.kind, or undefined for a name no kind has. */
export function kindSpec(kind: string): JobKindSpec | undefined {
  return Object.hasOwn(jobKinds, kind) ? jobKinds[kind as JobKind] : undefined;
}
