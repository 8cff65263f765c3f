/**
 * Computes the results of a fit run from its panels: for each segment the engine's
 * fitPanelParallel (lib/engine: every estimator, interval and diagnostic of lib/stats/fit-panel.ts,
 * the bootstrap and the estimator audit on worker threads), then the window comparison
 * (windows.ts). Writes nothing; the fit job stores the result in its completion transaction.
 *
 * Deterministic: the numbers depend only on the panels, the request (level, seeds, replications)
 * and ENGINE_VERSION, not on the thread count or on which worker runs the job.
 */
import type { AssetClass } from '@/db/schema';
import { EnginePool, fitPanelParallel, portfolioBlocks } from '@/lib/engine';
import { segmentFailure, type SegmentFailure } from '@/lib/stats/fit-panel';
import type { AssetClass as StatsAssetClass } from '@/lib/stats/irb';
import { ENGINE_VERSION } from '@/lib/stats/version';
import type { FitRequest } from './request';
import { ESTIMATOR_ORDER, type FitResults, type FitSegmentResult, type RunWarning } from './results';
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

/** Relative cost of the parts of a segment, for the progress bar (an audit replication is about three bootstrap ones). */
function weights(request: FitRequest) {
  return { base: 2, replications: ((request.bootstrap?.replications ?? 0) + 3 * (request.audit?.replications ?? 0)) / 2, windows: 2 };
}

export async function computeFitRun(panels: readonly SegmentInput[], request: FitRequest, options: FitRunOptions): Promise<FitResults> {
  const report = options.onProgress ?? (() => undefined);
  const w = weights(request);
  const perSegment = w.base + w.replications + w.windows;
  const total = perSegment * panels.length;
  const pool = (request.bootstrap || request.audit || request.pairs) && options.threads > 0 ? new EnginePool(options.threads) : null;
  const segments: FitSegmentResult[] = [];
  const failures: SegmentFailure[] = [];
  try {
    if (pool) {
      // Thread start-up (loading the engine in each thread) takes a second or two: say so rather than sit at "done".
      await report(0, `Starting ${options.threads} worker thread${options.threads === 1 ? '' : 's'} for the bootstrap and the simulation study`);
      await pool.start();
    }
    for (let i = 0; i < panels.length; i++) {
      const input = panels[i];
      const name = input.segment;
      const start = i * perSegment;
      const at = (units: number) => Math.min(99, (100 * (start + units)) / total);
      const benchmark = benchmarkOf(input);
      let progressFailed = false;
      let fit;
      try {
        fit = await fitPanelParallel(
        input,
        {
          level: request.level,
          bootstrap: request.bootstrap ?? null,
          audit: request.audit ?? null,
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
        failures.push(segmentFailure(name, i, err));
        await report(at(perSegment), `${name}: failed (${failures.at(-1)!.reason})`);
        continue;
      }
      const mle = fit.estimates.binomialMle;
      await report(at(w.base + w.replications), `${name}: Window comparison`);
      const windows = compareWindows(input, fit, request.level);
      const chosen = mle.rho !== null && mle.status !== 'not-converged' ? 'binomialMle' : (ESTIMATOR_ORDER.find((k) => fit.estimates[k].rho !== null && fit.estimates[k].status !== 'not-converged') ?? 'binomialMle');
      segments.push({
        ...fit,
        warnings: benchmark.warning ? [...fit.warnings, benchmark.warning] : fit.warnings,
        assetClass: input.assetClass,
        chosen,
        windows,
      });
    }
    if (request.group || request.pairs || request.prior || request.prudent) {
      await report(99, 'Grades, pairs and posteriors');
      const blocks = await portfolioBlocks(
        panels.map((p) => {
          const b = benchmarkOf(p);
          return { ...p, assetClass: b.assetClass, turnoverMillions: b.turnoverMillions };
        }),
        { group: request.group ?? null, pairs: request.pairs ?? false, prior: request.prior ?? null, prudent: request.prudent ?? null, gradeAudit: request.audit ?? null },
        { level: request.level, ...(pool ? { pool } : {}), ...(options.signal ? { signal: options.signal } : {}) },
      );
      for (const s of segments) {
        const posterior = blocks.posterior.get(s.segment);
        const prudentPd = blocks.prudentPd.get(s.segment);
        if (posterior) s.posterior = posterior;
        if (prudentPd) s.prudentPd = prudentPd;
      }
      return {
        engine: { version: ENGINE_VERSION },
        segments,
        failures,
        ...(blocks.group ? { group: blocks.group } : {}),
        ...(blocks.pairs ? { pairs: blocks.pairs } : {}),
      };
    }
  } finally {
    await pool?.close();
  }
  return { engine: { version: ENGINE_VERSION }, segments, failures };
}
