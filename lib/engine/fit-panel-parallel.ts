/**
 * fitPanelParallel: lib/stats/fit-panel.ts's fitPanel with the replications (binomialMle's and the
 * moment estimators' bootstraps, the break test's bootstrap, the estimator audit) spread over
 * worker threads, progress reports, cancellation and the time of each stage. The job worker
 * (workers/) and the CLI call this; the numbers are identical to fitPanel's for any thread count,
 * because replication i is always seeded with deriveSeed(seed, i) and the slices are merged by
 * index.
 */
import {
  completeSegmentFit,
  prepareSegmentFit,
  type FitPanelOptions,
  type FitReplications,
  type PanelInput,
  type PreparedFit,
  type TimedSegmentFit,
} from '../stats/fit-panel';
import type { AuditReplication } from '../stats/audit';
import type { MomentEstimatorKey } from '../stats/estimators/moment-target';
import type { BootstrapReplication } from '../stats/intervals/bootstrap';
import type { MomentBootstrapReplication } from '../stats/intervals/moment-bootstrap';
import type { BreakReplication } from '../stats/stability/break-test';
import type { CopulaLrReplication } from '../stats/copula-lr-test';
import { StageTimer } from '../stats/stage-timer';
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
 * Relative cost of one replication, for progress, in binomialMle fits of the panel: a bootstrap
 * replication is one; a moment estimator's about 1/50 of one; a break-test replication fits every
 * split, 2 (T - 9) + 1; an audit replication runs all five estimators with the intervals (about
 * 2), and with the persistent-factor estimators ar1Mle with its interval (about 12 more; measured
 * on a T = 20 panel with cohorts of 5,000-50,000).
 */
export function replicationWeight(task: EngineTask): number {
  switch (task.kind) {
    case 'bootstrap':
      return 1;
    case 'moment-bootstrap':
      return 0.02;
    case 'break-test':
      return 2 * (task.spec.obligors.length - 9) + 1;
    case 'audit':
      return task.spec.persistent ? 14 : 2;
    // not replications of a segment fit (the portfolio blocks of lib/engine/portfolio.ts run them)
    case 'pairs':
    case 'margins':
    case 'grade-audit':
      return 1;
    case 'copula-bootstrap':
    case 'copula-power':
      // a t-copula fit on the simulated panel: about 20 binomialMle fits (measured at T = 20)
      return 20;
  }
}

/**
 * Replications per slice: small enough to balance threads and report progress, large enough to
 * amortise messages. A heavy replication (weight 10 or more: a t-copula fit, ~0.2-0.5 s) gets
 * slices of at most 4, so that the last slice of a stage keeps one thread busy for a second or two
 * while the others wait, not for the ten seconds a slice of 25 would take.
 */
function sliceSize(total: number, threads: number, weight = 1): number {
  return Math.max(1, Math.min(weight >= 10 ? 4 : 25, Math.ceil(total / Math.max(1, threads * 4))));
}

/** One kind of replications of a segment, run as one stage and timed as one. */
interface ReplicationStage {
  /** The stage's name in `timing.stages`. */
  name: string;
  /** Its name in the progress sentence. */
  label: string;
  tasks: EngineTask[];
  replications: number;
}

/** The replication stages of a prepared fit, in the order they run. */
function replicationStages(prepared: PreparedFit, threads: number): ReplicationStage[] {
  const stages: ReplicationStage[] = [];
  const add = (name: string, label: string, replications: number, task: (from: number, to: number) => EngineTask) => {
    const weight = replicationWeight(task(0, 1));
    const tasks = splitRange(replications, sliceSize(replications, threads, weight)).map(({ from, to }) => task(from, to));
    stages.push({ name, label, tasks, replications });
  };
  if (prepared.bootstrap) {
    const { spec, replications } = prepared.bootstrap;
    add('binomialMle.bootstrap', 'Bootstrap', replications, (from, to) => ({ kind: 'bootstrap', spec, from, to }));
  }
  for (const m of prepared.momentBootstraps) {
    add(`${m.estimator}.bootstrap`, `Bootstrap of ${m.estimator}`, m.replications, (from, to) => ({ kind: 'moment-bootstrap', spec: m.spec, from, to }));
  }
  if (prepared.breakTest) {
    const { spec, replications } = prepared.breakTest;
    add('stability.breakTest', 'Break test', replications, (from, to) => ({ kind: 'break-test', spec, from, to }));
  }
  if (prepared.audit) {
    const { spec, replications } = prepared.audit;
    add('audit', 'Simulation study', replications, (from, to) => ({ kind: 'audit', spec, from, to }));
  }
  if (prepared.mixingLaws?.bootstrap) {
    const { spec, replications } = prepared.mixingLaws.bootstrap;
    add('modelComparison.lrTest', 'Test of the Gaussian copula', replications, (from, to) => ({ kind: 'copula-bootstrap', spec, from, to }));
  }
  if (prepared.mixingLaws?.power) {
    const { spec, replications } = prepared.mixingLaws.power;
    add('modelComparison.power', 'Power of that test', replications, (from, to) => ({ kind: 'copula-power', spec, from, to }));
  }
  return stages;
}

/**
 * Fits one segment: every estimator, interval and diagnostic of fitPanel, with the replications
 * (when asked for) computed in worker threads, one stage after the other. Resolves with the
 * SegmentFit plus `timing`: `ms`, the wall-clock compute time of this segment (thread start-up
 * included when the pool is created here; start a shared pool with EnginePool.start() to leave it
 * out), and `stages`, the ms of each stage (each estimator and interval method, the diagnostics,
 * the stability block, each bootstrap and the audit; a replication stage's time is its wall time
 * on the threads).
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
  const clock = () => performance.now();
  const t0 = clock();
  const report = run.onProgress ?? (() => undefined);
  const signal = run.signal;
  if (signal?.aborted) throw new EngineAbortError();
  const threads = run.pool ? run.pool.size : (run.threads ?? defaultThreads());
  if (!Number.isInteger(threads) || threads < 0) {
    throw new RangeError(`fitPanelParallel: threads must be a whole number >= 0; got ${threads}.`);
  }

  const prepared = prepareSegmentFit(input, { ...options, clock });
  const timer = new StageTimer(clock);
  for (const [name, ms] of Object.entries(prepared.stages)) timer.add(name, ms);
  const stages = replicationStages(prepared, threads);
  const hasWork = stages.length > 0;
  await report(hasWork ? 2 : 100, hasWork ? 'Estimates, intervals and diagnostics done' : 'Fit done');
  if (!hasWork) return { ...prepared.fit, timing: { ms: clock() - t0, stages: timer.stages } };

  const total = totalItems(stages.flatMap((s) => s.tasks), replicationWeight);
  // weights are fractional (0.02 for a moment replication), so the sum may miss the total by a rounding
  const pct = (done: number) => (done >= total * (1 - 1e-9) ? 100 : 2 + (98 * done) / total);
  const replications: Gathered = {};
  let before = 0; // weighted work of the stages already finished
  const pool = threads === 0 && !run.pool ? null : (run.pool ?? new EnginePool(threads));
  try {
    for (const stage of stages) {
      const weight = replicationWeight(stage.tasks[0]);
      const sentence = (done: number) => `${stage.label} ${Math.round(done / weight)} of ${stage.replications}`;
      const started = clock();
      const progress = (done: number) => report(pct(before + done), sentence(done));
      const results = pool === null ? await runHere(stage, signal, progress) : await runOnPool(pool, stage, signal, progress);
      timer.add(stage.name, clock() - started);
      before += stage.replications * weight;
      mergeInto(replications, results, stage);
    }
  } finally {
    if (pool !== null && !run.pool) await pool.close();
  }
  const fit = completeSegmentFit(prepared, replications);
  return { ...fit, timing: { ms: clock() - t0, stages: timer.stages } };
}

/** The replications of completeSegmentFit, as they are gathered. */
interface Gathered extends FitReplications {
  bootstrap?: BootstrapReplication[];
  audit?: AuditReplication[];
  breakTest?: BreakReplication[];
  momentBootstraps?: Partial<Record<MomentEstimatorKey, MomentBootstrapReplication[]>>;
  copulaBootstrap?: CopulaLrReplication[];
  copulaPower?: CopulaLrReplication[];
}

/** Adds a stage's results to the replications of completeSegmentFit. */
function mergeInto(out: Gathered, results: EngineTaskResult[], stage: ReplicationStage): void {
  for (const r of results) {
    if (r.kind === 'bootstrap') (out.bootstrap ??= []).push(...r.replications);
    else if (r.kind === 'audit') (out.audit ??= []).push(...r.replications);
    else if (r.kind === 'break-test') (out.breakTest ??= []).push(...r.replications);
    else if (r.kind === 'copula-bootstrap') (out.copulaBootstrap ??= []).push(...r.replications);
    else if (r.kind === 'copula-power') (out.copulaPower ??= []).push(...r.replications);
    else if (r.kind !== 'moment-bootstrap') throw new Error(`fitPanelParallel: a ${r.kind} result in the ${stage.name} stage of a segment fit.`);
    else {
      const task = stage.tasks[0];
      if (task.kind !== 'moment-bootstrap') throw new Error(`fitPanelParallel: a moment bootstrap result in the ${stage.name} stage.`);
      const moments = (out.momentBootstraps ??= {});
      (moments[task.spec.estimator] ??= []).push(...r.replications);
    }
  }
}

/** Runs a stage in this thread, slice by slice, yielding to the event loop between slices. */
async function runHere(
  stage: ReplicationStage,
  signal: AbortSignal | undefined,
  progress: (done: number) => void | Promise<void>,
): Promise<EngineTaskResult[]> {
  const results: EngineTaskResult[] = [];
  let done = 0;
  for (const task of stage.tasks) {
    if (signal?.aborted) throw new EngineAbortError();
    results.push(runTask(task));
    done += (task.to - task.from) * replicationWeight(task);
    await progress(done);
    await new Promise((r) => setImmediate(r));
  }
  return results;
}

/** Runs a stage on the pool's threads, reporting progress at most every 1% of the stage, one report at a time. */
async function runOnPool(
  pool: EnginePool,
  stage: ReplicationStage,
  signal: AbortSignal | undefined,
  progress: (done: number) => void | Promise<void>,
): Promise<EngineTaskResult[]> {
  const total = totalItems(stage.tasks, replicationWeight);
  const controller = new AbortController();
  const onOuterAbort = () => controller.abort();
  signal?.addEventListener('abort', onOuterAbort, { once: true });
  let progressError: unknown = null;
  let reporting: Promise<void> = Promise.resolve();
  let lastReported = 0;
  try {
    const results = await pool.run(stage.tasks, {
      signal: controller.signal,
      weight: replicationWeight,
      onItems: (done) => {
        if (done !== total && done - lastReported < total / 100) return;
        lastReported = done;
        reporting = reporting.then(async () => {
          if (progressError !== null) return;
          try {
            await progress(done);
          } catch (err) {
            progressError = err;
            controller.abort();
          }
        });
      },
    });
    await reporting;
    if (progressError !== null) throw progressError;
    return results;
  } catch (err) {
    await reporting;
    if (progressError !== null) throw progressError;
    if (signal?.aborted && !(err instanceof EngineAbortError)) throw new EngineAbortError();
    throw err;
  } finally {
    signal?.removeEventListener('abort', onOuterAbort);
  }
}
