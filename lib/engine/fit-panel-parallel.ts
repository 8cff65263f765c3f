/**
 * fitPanelParallel: lib/stats/fit-panel.ts's fitPanel with the bootstrap replications spread over
 * worker threads, progress reports and cancellation. The job worker (workers/) and the CLI call
 * this; the numbers are identical to fitPanel's for any thread count, because replication i is
 * always seeded with deriveSeed(seed, i) and the slices are merged by index.
 */
import { attachBootstrap, prepareSegmentFit, type FitPanelOptions, type PanelInput, type TimedSegmentFit } from '../stats/fit-panel';
import type { BootstrapReplication } from '../stats/intervals/bootstrap';
import { defaultThreads, EngineAbortError, EnginePool } from './pool';
import { runTask, splitRange, type EngineTask } from './tasks';

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

/** Replications per slice: small enough to balance threads and report progress, large enough to amortise messages. */
function sliceSize(total: number, threads: number): number {
  return Math.max(1, Math.min(25, Math.ceil(total / Math.max(1, threads * 4))));
}

/**
 * Fits one segment: every estimator, interval and diagnostic of fitPanel, with the bootstrap
 * (when asked for) computed in worker threads. Resolves with the SegmentFit plus
 * `timing.ms`, the wall-clock compute time of this segment (thread start-up included when the
 * pool is created here).
 *
 * Special cases: invalid input rejects with fitPanel's RangeError (naming segment and period);
 * an abort rejects with an error named AbortError; an onProgress that throws rejects with its
 * error. Progress: 2% after the preparation, then the share of replications done, 100% at the end.
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
  await report(prepared.bootstrap ? 2 : 100, prepared.bootstrap ? 'Estimates, intervals and diagnostics done' : 'Fit done');
  if (prepared.bootstrap === null) return { ...prepared.fit, timing: { ms: performance.now() - t0 } };

  const { spec, replications: B } = prepared.bootstrap;
  const tasks: EngineTask[] = splitRange(B, sliceSize(B, Math.max(1, threads))).map(({ from, to }) => ({ kind: 'bootstrap', spec, from, to }));
  const pct = (done: number) => 2 + (98 * done) / B;
  const replications: BootstrapReplication[] = [];

  if (threads === 0 && !run.pool) {
    let done = 0;
    for (const task of tasks) {
      if (signal?.aborted) throw new EngineAbortError();
      const result = runTask(task);
      replications.push(...result.replications);
      done += task.to - task.from;
      await report(pct(done), `Bootstrap ${done} of ${B}`);
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
      const results = await pool.run(tasks, {
        signal: controller.signal,
        onItems: (done) => {
          // Report at most every 1% (and at the end), one report at a time.
          if (done !== B && done - lastReported < B / 100) return;
          lastReported = done;
          reporting = reporting.then(async () => {
            if (progressError !== null) return;
            try {
              await report(pct(done), `Bootstrap ${done} of ${B}`);
            } catch (err) {
              progressError = err;
              controller.abort();
            }
          });
        },
      });
      await reporting;
      if (progressError !== null) throw progressError;
      for (const r of results) replications.push(...r.replications);
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
  const fit = attachBootstrap(prepared, replications);
  return { ...fit, timing: { ms: performance.now() - t0 } };
}
