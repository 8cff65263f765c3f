/**
 * Computes the results of a fit run from its panels: for each segment the engine's
 * fitPanelParallel (lib/engine: every estimator, interval and diagnostic of lib/stats/fit-panel.ts,
 * the bootstrap on worker threads), then the estimator audit (interim path, see
 * interim-audit.ts) and the window comparison (windows.ts). Writes nothing; the fit job stores the
 * result in its completion transaction.
 *
 * Deterministic: the numbers depend only on the panels, the request (level, seeds, replications)
 * and ENGINE_VERSION, not on the thread count or on which worker runs the job.
 */
import { EnginePool, fitPanelParallel } from '@/lib/engine';
import type { AssetClass as StatsAssetClass } from '@/lib/stats/irb';
import { ENGINE_VERSION } from '@/lib/stats/version';
import { runInterimAudit } from './interim-audit';
import type { SegmentInput } from './panels';
import type { FitRequest } from './request';
import { ESTIMATOR_ORDER, type FitResults, type FitSegmentResult, type RunWarning } from './results';
import { compareWindows } from './windows';

export type FitRunOptions = {
  /** Worker threads for the bootstrap (0: this thread). */
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

/** Relative cost of the parts of a segment, for the progress bar. */
function weights(request: FitRequest) {
  return { base: 2, bootstrap: request.bootstrap ? request.bootstrap.replications / 2 : 0, audit: request.audit ? request.audit.replications * 2 : 0, windows: 2 };
}

export async function computeFitRun(panels: readonly SegmentInput[], request: FitRequest, options: FitRunOptions): Promise<FitResults> {
  const report = options.onProgress ?? (() => undefined);
  const w = weights(request);
  const perSegment = w.base + w.bootstrap + w.audit + w.windows;
  const total = perSegment * panels.length;
  const pool = request.bootstrap && options.threads > 0 ? new EnginePool(options.threads) : null;
  const segments: FitSegmentResult[] = [];
  try {
    if (pool) {
      // Thread start-up (loading the engine in each thread) takes a second or two: say so rather than sit at "done".
      await report(0, `Starting ${options.threads} worker thread${options.threads === 1 ? '' : 's'} for the bootstrap`);
      await pool.start();
    }
    for (let i = 0; i < panels.length; i++) {
      const input = panels[i];
      const name = input.segment;
      const start = i * perSegment;
      const at = (units: number) => Math.min(99, (100 * (start + units)) / total);
      const benchmark = benchmarkOf(input);
      const fit = await fitPanelParallel(
        input,
        {
          level: request.level,
          bootstrap: request.bootstrap ?? null,
          assetClass: benchmark.assetClass,
          turnoverMillions: benchmark.turnoverMillions,
        },
        {
          threads: options.threads,
          ...(pool ? { pool } : {}),
          ...(options.signal ? { signal: options.signal } : {}),
          onProgress: (pct, message) => report(at(((w.base + w.bootstrap) * pct) / 100), `${name}: ${message}`),
        },
      );
      const mle = fit.estimates.binomialMle;
      let audit: FitSegmentResult['audit'] = null;
      if (request.audit && mle.rho !== null && mle.pd !== null && mle.status !== 'undefined' && mle.status !== 'not-converged' && mle.rho < 1) {
        const R = request.audit.replications;
        audit = await runInterimAudit(
          { obligors: input.obligors, truth: { pd: mle.pd, rho: mle.rho }, replications: R, seed: request.audit.seed, level: request.level },
          {
            ...(options.signal ? { signal: options.signal } : {}),
            onProgress: (done) => report(at(w.base + w.bootstrap + (w.audit * done) / R), `${name}: Estimator audit ${done} of ${R}`),
          },
        );
      }
      await report(at(w.base + w.bootstrap + w.audit), `${name}: Window comparison`);
      const windows = compareWindows(input, fit, request.level);
      const chosen = mle.rho !== null && mle.status !== 'not-converged' ? 'binomialMle' : (ESTIMATOR_ORDER.find((k) => fit.estimates[k].rho !== null && fit.estimates[k].status !== 'not-converged') ?? 'binomialMle');
      segments.push({
        ...fit,
        warnings: benchmark.warning ? [...fit.warnings, benchmark.warning] : fit.warnings,
        assetClass: input.assetClass,
        chosen,
        audit,
        windows,
      });
    }
  } finally {
    await pool?.close();
  }
  return { engine: { version: ENGINE_VERSION }, segments };
}
