/**
 * The factor-correlation matrix of a set of segments (lib/stats/factor-correlation-matrix.ts) with
 * the pairs spread over the engine's worker threads. Each pair is computed by the same code in a
 * thread as in factorCorrelationMatrix, so the result does not depend on the thread count.
 */
import type { PairSegmentInput } from '../stats/factor-correlation';
import {
  assembleFactorCorrelationMatrix,
  MAX_MATRIX_SEGMENTS,
  pairIndices,
  type FactorCorrelationMatrix,
} from '../stats/factor-correlation-matrix';
import { EngineAbortError, EnginePool } from './pool';
import { runTask, type EngineTask } from './tasks';

/** How factorCorrelationMatrixParallel runs. */
export interface PairsRunOptions {
  /** A pool to use (not closed here); else one of `threads` threads is made and closed. */
  pool?: EnginePool;
  /** Threads when no pool is given (0: this thread). */
  threads?: number;
  /** Progress in percent with a sentence; may throw to stop the run. */
  onProgress?: (pct: number, message: string) => void | Promise<void>;
  signal?: AbortSignal;
}

/**
 * Every pair of `inputs` (lib/stats/factor-correlation.ts), one pair per task on the worker
 * threads, assembled into the `pairs` block with the nearest correlation matrix when needed.
 *
 * Special cases: fewer than 2 or more than MAX_MATRIX_SEGMENTS segments, or a name twice, reject
 * with a RangeError and a sentence; an abort rejects with an AbortError.
 *
 * @example await factorCorrelationMatrixParallel(segments, { level: 0.95 }, { threads: 2 })
 */
export async function factorCorrelationMatrixParallel(
  inputs: readonly PairSegmentInput[],
  options: { level?: number } = {},
  run: PairsRunOptions = {},
): Promise<FactorCorrelationMatrix> {
  if (inputs.length < 2) throw new RangeError('The factor-correlation matrix needs at least two segments.');
  if (inputs.length > MAX_MATRIX_SEGMENTS) throw new RangeError(`The factor-correlation matrix takes at most ${MAX_MATRIX_SEGMENTS} segments; got ${inputs.length}.`);
  const names = inputs.map((i) => i.segment);
  if (new Set(names).size !== names.length) throw new RangeError('Each segment may be given only once in the factor-correlation matrix.');
  const level = options.level ?? 0.95;
  const segments = inputs.map((i) => ({ segment: i.segment, periods: [...i.periods], obligors: [...i.obligors], defaults: [...i.defaults] }));
  const pairs = pairIndices(inputs.length);
  const tasks: EngineTask[] = pairs.map((_, k) => ({ kind: 'pairs', segments, pairs, level, from: k, to: k + 1 }));
  const report = run.onProgress ?? (() => undefined);
  const total = pairs.length;
  const entries = [];
  if (!run.pool && (run.threads ?? 0) === 0) {
    for (const [k, task] of tasks.entries()) {
      if (run.signal?.aborted) throw new EngineAbortError();
      const r = runTask(task);
      if (r.kind === 'pairs') entries.push(...r.entries);
      await report((100 * (k + 1)) / total, `Factor correlations: ${k + 1} of ${total} pairs`);
      await new Promise((resolve) => setImmediate(resolve));
    }
  } else {
    const pool = run.pool ?? new EnginePool(run.threads);
    try {
      let reporting: Promise<void> = Promise.resolve();
      const results = await pool.run(tasks, {
        ...(run.signal ? { signal: run.signal } : {}),
        onItems: (done) => {
          reporting = reporting.then(() => report((100 * done) / total, `Factor correlations: ${done} of ${total} pairs`));
        },
      });
      await reporting;
      for (const r of results) if (r.kind === 'pairs') entries.push(...r.entries);
    } finally {
      if (!run.pool) await pool.close();
    }
  }
  return assembleFactorCorrelationMatrix(names, entries);
}
