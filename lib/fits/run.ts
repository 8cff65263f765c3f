/**
 * Computes the results of a fit run from its panels: for each segment the engine's
 * fitPanelParallel (lib/engine: the chosen models' estimators with their intervals, the
 * diagnostics and stability of lib/stats/fit-panel.ts, the bootstraps, the break test and the
 * estimator audit on worker threads), then the window comparison (windows.ts), one segment per
 * call (computeFitSegment: what a fit job computes), or every segment in turn with the blocks that
 * need every segment together (computeFitRun: grades under one factor, pairs, posteriors, the most
 * prudent PD; the CLI, and the one job of a run that asks for them). Writes nothing; each job
 * stores its outcome in its completion transaction.
 *
 * Deterministic: the numbers depend only on the panels, the request (level, seeds, replications)
 * and ENGINE_VERSION, not on the thread count or on which worker runs the job.
 */
import type { AssetClass } from '@/db/schema';
import { EnginePool, fitPanelParallel, portfolioBlocks } from '@/lib/engine';
import { segmentFailure } from '@/lib/stats/fit-panel';
import type { AssetClass as StatsAssetClass } from '@/lib/stats/irb';
import { ENGINE_VERSION } from '@/lib/stats/version';
import { needsWholeRun, type FitRequest } from './request';
import { assembleFitResults, ESTIMATOR_ORDER, type EstimatorKey, type FitResults, type FitSegmentResult, type RunWarning, type SegmentOutcome } from './results';
import { compareWindows } from './windows';

/** One segment's panel as read from a dataset, with the settings the fit needs. */
export type SegmentInput = {
  segment: string;
  assetClass: AssetClass;
  /** Annual turnover in EUR millions (SME size adjustment). */
  turnoverEurMillions?: number | null;
  periods: string[];
  obligors: number[];
  defaults: number[];
};

export type FitRunOptions = {
  /** Worker threads for the bootstrap and the audit (0: this thread). */
  threads: number;
  /** Percent of the whole run (0-100) with a sentence; may throw to stop (cancellation, lost lease). */
  onProgress?: (pct: number, message: string) => void | Promise<void>;
  signal?: AbortSignal;
};

/** The engine's asset class and turnover for a segment, or why there is no supervisory benchmark. */
export function benchmarkOf(input: SegmentInput): { assetClass: StatsAssetClass | null; turnoverMillions: number | null; warning: RunWarning | null } {
  if (input.assetClass === 'none') return { assetClass: null, turnoverMillions: null, warning: null };
  if (input.assetClass === 'sme-corporate' && !(input.turnoverEurMillions && input.turnoverEurMillions > 0)) {
    return {
      assetClass: null,
      turnoverMillions: null,
      warning: {
        code: 'sme-turnover-missing',
        message: 'The segment is SME corporate but has no turnover recorded on the dataset, so the supervisory correlation (which depends on it) is not shown. Set the turnover in the segment settings and fit again.',
      },
    };
  }
  return {
    assetClass: input.assetClass,
    turnoverMillions: input.assetClass === 'sme-corporate' ? input.turnoverEurMillions! : null,
    warning: null,
  };
}

/**
 * Relative cost of the parts of a segment, for the progress bar, in units of about 500 binomialMle
 * fits: the estimates (the AR(1) model with its intervals about 60 fits' worth), the replications
 * (lib/engine's replicationWeight: a break-test replication about 23 fits on 20 years, an audit
 * replication 2, or 14 with the AR(1) model) and the window comparison.
 */
function weights(request: FitRequest) {
  const ar1 = request.models.includes('ar1');
  const copula = request.mixingLaws;
  const fits =
    (request.bootstrap?.replications ?? 0) +
    // a replication of the copula test or its power study fits the t copula: about 20 fits (lib/engine's replicationWeight)
    (copula ? 20 * (copula.replications + copula.powerReplications) : 0) +
    (request.models.includes('independent') ? 23 * (request.breakTest?.replications ?? 0) : 0) +
    (ar1 ? 14 : 2) * (request.audit?.replications ?? 0);
  return { base: ar1 ? 1 : 0.5, replications: fits / 500, windows: 0.2 };
}

export type SegmentRunOptions = {
  /** Worker threads for the bootstrap and the audit (0: this thread). */
  threads: number;
  /** A started pool to share between segments (else one is started for this segment when needed). */
  pool?: EnginePool;
  /** Percent of this segment (0-100) with a sentence; may throw to stop (cancellation, lost lease). */
  onProgress?: (pct: number, message: string) => void | Promise<void>;
  signal?: AbortSignal;
};

/**
 * Computes one segment of a run: the engine's fitPanelParallel (every estimator, interval and
 * diagnostic, the bootstrap and the audit) and the window comparison. A failure of the segment's
 * numerics is its outcome (`failed`, with the reason and `position` among the run's segments); a
 * stop (cancellation, lost lease, abort) is thrown. The one call that both the whole-run loop below
 * and the per-segment fit job make, so what is computed for a segment lives here alone.
 */
export async function computeFitSegment(input: SegmentInput, position: number, request: FitRequest, options: SegmentRunOptions): Promise<SegmentOutcome> {
  const report = options.onProgress ?? (() => undefined);
  const w = weights(request);
  const perSegment = w.base + w.replications + w.windows;
  const name = input.segment;
  const at = (units: number) => Math.min(99, (100 * units) / perSegment);
  const ownPool = !options.pool && (request.bootstrap || request.audit || request.breakTest || request.mixingLaws) && options.threads > 0 ? new EnginePool(options.threads) : null;
  const pool = options.pool ?? ownPool;
  const benchmark = benchmarkOf(input);
  let progressFailed = false;
  let fit;
  try {
    if (ownPool) {
      // Thread start-up (loading the engine in each thread) takes a second or two: say so rather than sit at "done".
      await report(0, `Starting ${options.threads} worker thread${options.threads === 1 ? '' : 's'} for the bootstraps and the simulation study`);
      await ownPool.start();
    }
    try {
      fit = await fitPanelParallel(
        input,
        {
          level: request.level,
          models: request.models,
          bootstrap: request.bootstrap ?? null,
          audit: request.audit ?? null,
          stability: { rollingWindow: request.rollingWindow, breakTest: request.breakTest ?? null },
          // as the CLI passes --models t,beta,logitNormal with --copula-bootstrap (lib/cli/fit.ts)
          ...(request.mixingLaws
            ? {
                mixingLaws: {
                  models: request.mixingLaws.laws,
                  replications: request.mixingLaws.replications,
                  powerReplications: request.mixingLaws.powerReplications,
                  seed: request.mixingLaws.seed,
                },
              }
            : {}),
          assetClass: benchmark.assetClass,
          turnoverMillions: benchmark.turnoverMillions,
        },
        {
          threads: options.threads,
          ...(pool ? { pool } : {}),
          ...(options.signal ? { signal: options.signal } : {}),
          onProgress: async (pct, message) => {
            try {
              await report(at(((w.base + w.replications) * pct) / 100), `${name}: ${message}`);
            } catch (err) {
              progressFailed = true; // cancelled or lease lost: stop the whole run
              throw err;
            }
          },
        },
      );
    } catch (err) {
      const stopped = progressFailed || options.signal?.aborted || (err instanceof Error && err.name === 'AbortError');
      if (stopped) throw err;
      // This segment failed; it is reported in its place and the others are fitted.
      const failure = segmentFailure(name, position, err);
      await report(at(perSegment), `${name}: failed (${failure.reason})`);
      return { kind: 'failed', failure };
    }
  } finally {
    await ownPool?.close();
  }
  await report(at(w.base + w.replications), `${name}: Window comparison`);
  const windows = compareWindows(input, fit, request.level);
  const hasValue = (k: EstimatorKey) => {
    const e = fit.estimates[k];
    return e !== undefined && e.rho !== null && e.status !== 'not-converged';
  };
  const chosen = hasValue('binomialMle') ? 'binomialMle' : (ESTIMATOR_ORDER.find(hasValue) ?? 'binomialMle');
  return {
    kind: 'fit',
    fit: {
      ...fit,
      warnings: benchmark.warning ? [...fit.warnings, benchmark.warning] : fit.warnings,
      assetClass: input.assetClass,
      chosen,
      windows,
    },
  };
}

/**
 * Every segment of a run in this process, one after another, then the blocks that need every
 * segment together (the CLI's way, a run with grades, pairs, posteriors or the most prudent PD, and
 * jobs queued before runs were split).
 */
export async function computeFitRun(panels: readonly SegmentInput[], request: FitRequest, options: FitRunOptions): Promise<FitResults> {
  const report = options.onProgress ?? (() => undefined);
  const pool = (request.bootstrap || request.audit || request.breakTest || request.pairs || request.mixingLaws) && options.threads > 0 ? new EnginePool(options.threads) : null;
  const outcomes: SegmentOutcome[] = [];
  try {
    if (pool) {
      // Thread start-up (loading the engine in each thread) takes a second or two: say so rather than sit at "done".
      await report(0, `Starting ${options.threads} worker thread${options.threads === 1 ? '' : 's'} for the bootstraps and the audit`);
      await pool.start();
    }
    for (let i = 0; i < panels.length; i++) {
      outcomes.push(
        await computeFitSegment(panels[i], i, request, {
          threads: options.threads,
          ...(pool ? { pool } : {}),
          ...(options.signal ? { signal: options.signal } : {}),
          onProgress: (pct, message) => report(Math.min(99, (100 * i + pct) / panels.length), message),
        }),
      );
    }
    const results = assembleFitResults(outcomes);
    if (!needsWholeRun(request)) return results;
    await report(99, 'Grades, pairs and posteriors');
    const blocks = await portfolioBlocks(
      panels.map((p) => {
        const b = benchmarkOf(p);
        return { ...p, assetClass: b.assetClass, turnoverMillions: b.turnoverMillions };
      }),
      { group: request.group ?? null, pairs: request.pairs ?? false, prior: request.prior ?? null, prudent: request.prudent ?? null, gradeAudit: request.audit ?? null },
      { level: request.level, ...(pool ? { pool } : {}), ...(options.signal ? { signal: options.signal } : {}) },
    );
    const segments: FitSegmentResult[] = results.segments;
    for (const s of segments) {
      const posterior = blocks.posterior.get(s.segment);
      const prudentPd = blocks.prudentPd.get(s.segment);
      if (posterior) s.posterior = posterior;
      if (prudentPd) s.prudentPd = prudentPd;
    }
    return {
      engine: { version: ENGINE_VERSION },
      segments,
      failures: results.failures,
      ...(blocks.group ? { group: blocks.group } : {}),
      ...(blocks.pairs ? { pairs: blocks.pairs } : {}),
    };
  } finally {
    await pool?.close();
  }
}
