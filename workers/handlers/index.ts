/**
 * The handler of every job kind, in one static map: a kind declared in lib/jobs/kinds without a
 * handler here (or a handler whose payload type differs from its kind's schema) fails to compile.
 */
import type { JobKind, JobPayload } from '@/lib/jobs/kinds';
import type { JobHandler } from '../job-handler';
import { convertLoansHandler } from './convert-loans';
import { fitHandler } from './fit';
import { monitorBacktestHandler } from './monitor-backtest';

/** One handler per kind, taking that kind's payload. */
export type JobHandlerMap = { [K in JobKind]: JobHandler<JobPayload<K>> };

export const jobHandlers = {
  fit: fitHandler,
  'convert-loans': convertLoansHandler,
  'monitor-backtest': monitorBacktestHandler,
} satisfies JobHandlerMap;

/** Handlers by the name stored in jobs.kind (the job loop's option; tests pass their own). */
export type JobHandlers = Readonly<Record<string, JobHandler<never>>>;

/**
 * The handler of a kind stored in jobs.kind, or undefined for a name no kind has. It takes the
 * payload as the kind's schema outputs it: parse the stored payload with kindSpec(kind) first.
 */
export function handlerFor(kind: string, handlers: JobHandlers = jobHandlers): JobHandler | undefined {
  return Object.hasOwn(handlers, kind) ? (handlers[kind] as JobHandler) : undefined;
}
