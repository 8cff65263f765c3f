/**
 * The factor-correlation matrix of a set of segments (lib/stats/factor-correlation-matrix.ts) with
 * the pairs spread over the engine's worker threads. Each pair is computed by the same code in a
 * thread as in factorCorrelationMatrix, so the result does not depend on the thread count.
 */
import { commonWindow, type PairMargin, type PairSegmentInput } from '../stats/factor-correlation';
import {
  assembleFactorCorrelationMatrix,
  marginKey,
  MAX_MATRIX_SEGMENTS,
  pairIndices,
  type FactorCorrelationMatrix,
} from '../stats/factor-correlation-matrix';
import { EngineAbortError, EnginePool } from './pool';
import { runTask, type EngineTask, type EngineTaskResult } from './tasks';

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
 * threads after each segment's margin on each window it is paired over (one task each, computed
 * once and shared by the pairs over that window), assembled into the `pairs` block with the
 * nearest correlation matrix when needed.
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
  // First the margins: each segment's own fit on each window it is paired over, once.
  const items: { segment: number; periods: string[] }[] = [];
  const itemOf = new Map<string, number>();
  const pairItems = pairs.map(([i, j]) => {
    const periods = commonWindow(segments[i], segments[j]).periods;
    if (periods.length < 3) return null;
    return [i, j].map((k) => {
      const key = marginKey(k, periods);
      if (!itemOf.has(key)) {
        itemOf.set(key, items.length);
        items.push({ segment: k, periods });
      }
      return itemOf.get(key)!;
    });
  });
  const total = items.length + pairs.length;
  const report = run.onProgress ?? (() => undefined);
  const pool = run.pool ?? ((run.threads ?? 0) > 0 ? new EnginePool(run.threads) : null);
  try {
    const margins: PairMargin[] = [];
    const marginTasks: EngineTask[] = items.map((_, k) => ({ kind: 'margins', segments, items, from: k, to: k + 1 }));
    for (const r of await runTasks(marginTasks, pool, run.signal, (done) => report((100 * done) / total, `Factor correlations: the margins of ${done} of ${items.length} segment windows`))) {
      if (r.kind === 'margins') margins.push(...r.margins);
    }
    const pairMargins = pairItems.map((m) => (m ? ([margins[m[0]], margins[m[1]]] as const) : null));
    const tasks: EngineTask[] = pairs.map((_, k) => ({ kind: 'pairs', segments, pairs, level, from: k, to: k + 1, margins: pairMargins }));
    const entries = [];
    for (const r of await runTasks(tasks, pool, run.signal, (done) => report((100 * (items.length + done)) / total, `Factor correlations: ${done} of ${pairs.length} pairs`))) {
      if (r.kind === 'pairs') entries.push(...r.entries);
    }
    return assembleFactorCorrelationMatrix(names, entries);
  } finally {
    if (pool && !run.pool) await pool.close();
  }
}

/** Runs tasks on the pool, or one after another in this thread when there is none; results in task order. */
async function runTasks(
  tasks: EngineTask[],
  pool: EnginePool | null,
  signal: AbortSignal | undefined,
  report: (done: number) => void | Promise<void>,
): Promise<EngineTaskResult[]> {
  if (!pool) {
    const results: EngineTaskResult[] = [];
    for (const [k, task] of tasks.entries()) {
      if (signal?.aborted) throw new EngineAbortError();
      results.push(runTask(task));
      await report(k + 1);
      await new Promise((resolve) => setImmediate(resolve));
    }
    return results;
  }
  let reporting: Promise<void> = Promise.resolve();
  const results = await pool.run(tasks, {
    ...(signal ? { signal } : {}),
    onItems: (done) => {
      reporting = reporting.then(() => report(done));
    },
  });
  await reporting;
  return results;
}
