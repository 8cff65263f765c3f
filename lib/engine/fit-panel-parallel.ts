/**
 * fitPanelParallel: lib/stats/fit-panel.ts's fitPanel with the bootstrap and estimator-audit
 * replications spread over worker threads, progress reports and cancellation. The job worker
 * (workers/) and the CLI call this; the numbers are identical to fitPanel's for any thread count,
 * because replication i is always seeded with deriveSeed(seed, i) and the slices are merged by
 * index.
 */
import type { AuditReplication } from '../stats/audit';
import {
  completeSegmentFit,
  prepareSegmentFit,
  type FitPanelOptions,
  type PanelInput,
  type TimedSegmentFit,
} from '../stats/fit-panel';
import type { BootstrapReplication } from '../stats/intervals/bootstrap';
import { defaultThreads, EngineAbortError, EnginePool, totalItems } from './pool';
import { runTask, splitRange, type EngineTask, type EngineTaskResult } from './tasks';

/** How fitPanelParallel runs. */
export interface ParallelOptions {
  /**
   * Worker threads for the replications (default: the machine's available parallelism). 0 runs
   * them in the calling thread, slice by slice, yielding to the event loop between slices.
   */
  threads?: number;
  /** A pool to reuse across segments (its size wins over `threads`); not closed here unless aborted. */
  pool?: EnginePool;
  /**
   * Progress in percent (0-100) with a sentence. May be async; if it throws or rejects, the run
   * stops (workers terminated) and fitPanelParallel rejects with that error.
   */
  onProgress?: (pct: number, message: string) => void | Promise<void>;
  /** Stops the run; fitPanelParallel rejects with an AbortError. */
  signal?: AbortSignal;
}

/**
 * Relative cost of one replication, for progress: an audit replication runs all five estimators
 * and the profile and Wald intervals; measured at about 1.8 bootstrap replications (binomialMle
 * alone) on a T = 20 panel with cohorts of 5,000-50,000.
 */
function weight(task: EngineTask): number {
  return task.kind === 'audit' ? 2 : 1;
}

/** Replications per slice: small enough to balance threads and report progress, large enough to amortise messages. */
function sliceSize(total: number, threads: number): number {
  return Math.max(1, Math.min(25, Math.ceil(total / Math.max(1, threads * 4))));
}

/** The progress sentence: replications done of each kind when only one kind runs, else the share. */
function describe(tasks: readonly EngineTask[], weightedDone: number, total: number): string {
  const kinds = new Set(tasks.map((t) => t.kind));
  if (kinds.size === 1) {
    const kind = tasks[0].kind;
    const n = tasks.reduce((s, t) => s + t.to - t.from, 0);
    const done = Math.round(weightedDone / weight(tasks[0]));
    return `${kind === 'bootstrap' ? 'Bootstrap' : 'Simulation study'} ${done} of ${n}`;
  }
  return `Bootstrap and simulation study: ${Math.floor((100 * weightedDone) / total)}% of the replications`;
}

/**
 * Fits one segment: every estimator, interval and diagnostic of fitPanel, with the bootstrap and
 * the estimator audit (when asked for) computed in worker threads. Resolves with the SegmentFit
 * plus `timing.ms`, the wall-clock compute time of this segment (thread start-up included when
 * the pool is created here; start a shared pool with EnginePool.start() to leave it out).
 *
 * Special cases: invalid input rejects with fitPanel's RangeError (naming segment and period);
 * an abort rejects with an error named AbortError; an onProgress that throws rejects with its
 * error. Progress: 2% after the preparation, then the share of (weighted) replications done, 100%
 * at the end.
 */
export async function fitPanelParallel(
  input: PanelInput,
  options: FitPanelOptions = {},
  run: ParallelOptions = {},
): Promise<TimedSegmentFit> {
  const t0 = performance.now();
  const report = run.onProgress ?? (() => undefined);
  const signal = run.signal;
  if (signal?.aborted) throw new EngineAbortError();
  const threads = run.pool ? run.pool.size : (run.threads ?? defaultThreads());
  if (!Number.isInteger(threads) || threads < 0) {
    throw new RangeError(`fitPanelParallel: threads must be a whole number >= 0; got ${threads}.`);
  }

  const prepared = prepareSegmentFit(input, options);
  const hasWork = prepared.bootstrap !== null || prepared.audit !== null;
  await report(hasWork ? 2 : 100, hasWork ? 'Estimates, intervals and diagnostics done' : 'Fit done');
  if (!hasWork) return { ...prepared.fit, timing: { ms: performance.now() - t0 } };

  const size = (n: number) => sliceSize(n, Math.max(1, threads));
  const tasks: EngineTask[] = [
    ...(prepared.bootstrap
      ? splitRange(prepared.bootstrap.replications, size(prepared.bootstrap.replications)).map(
          ({ from, to }): EngineTask => ({ kind: 'bootstrap', spec: prepared.bootstrap!.spec, from, to }),
        )
      : []),
    ...(prepared.audit
      ? splitRange(prepared.audit.replications, size(prepared.audit.replications)).map(
          ({ from, to }): EngineTask => ({ kind: 'audit', spec: prepared.audit!.spec, from, to }),
        )
      : []),
  ];
  const total = totalItems(tasks, weight);
  const pct = (done: number) => 2 + (98 * done) / total;
  let results: EngineTaskResult[];

  if (threads === 0 && !run.pool) {
    results = [];
    let done = 0;
    for (const task of tasks) {
      if (signal?.aborted) throw new EngineAbortError();
      results.push(runTask(task));
      done += (task.to - task.from) * weight(task);
      await report(pct(done), describe(tasks, done, total));
      await new Promise((r) => setImmediate(r));
    }
  } else {
    const pool = run.pool ?? new EnginePool(threads);
    const controller = new AbortController();
    const onOuterAbort = () => controller.abort();
    signal?.addEventListener('abort', onOuterAbort, { once: true });
    let progressError: unknown = null;
    let reporting: Promise<void> = Promise.resolve();
    let lastReported = 0;
    try {
      results = await pool.run(tasks, {
        signal: controller.signal,
        weight,
        onItems: (done) => {
          // Report at most every 1% (and at the end), one report at a time.
          if (done !== total && done - lastReported < total / 100) return;
          lastReported = done;
          reporting = reporting.then(async () => {
            if (progressError !== null) return;
            try {
              await report(pct(done), describe(tasks, done, total));
            } catch (err) {
              progressError = err;
              controller.abort();
            }
          });
        },
      });
      await reporting;
      if (progressError !== null) throw progressError;
    } catch (err) {
      await reporting;
      if (progressError !== null) throw progressError;
      if (signal?.aborted && !(err instanceof EngineAbortError)) throw new EngineAbortError();
      throw err;
    } finally {
      signal?.removeEventListener('abort', onOuterAbort);
      if (!run.pool) await pool.close();
    }
  }

  const bootstrap: BootstrapReplication[] = [];
  const audit: AuditReplication[] = [];
  for (const r of results) {
    if (r.kind === 'bootstrap') bootstrap.push(...r.replications);
    else if (r.kind === 'audit') audit.push(...r.replications);
  }
  const fit = completeSegmentFit(prepared, {
    ...(prepared.bootstrap ? { bootstrap } : {}),
    ...(prepared.audit ? { audit } : {}),
  });
  return { ...fit, timing: { ms: performance.now() - t0 } };
}
