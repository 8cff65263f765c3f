/**
 * TEMPORARY PATH: the estimator audit of a fit run, until lib/stats/audit.ts (issue 3's "estimator
 * audit") lands and lib/engine runs it on worker threads. Then this file is deleted and the fit
 * job calls the engine instead (see workers/handlers/fit.ts and lib/fits/run.ts); results made
 * here carry `implementation: INTERIM_AUDIT` so that they can be told apart afterwards.
 *
 * What it does (DESIGN.md, "estimator audit"): simulate R panels with the segment's own n_t and T
 * at the fitted (p, rho) (lib/stats/simulate.ts, seeded), run every estimator of lib/stats on each
 * (ESTIMATORS; binomialMle with the engine's own profile and Wald intervals at the run's level),
 * and report each estimator's bias and RMSE against the true rho and the coverage of the two
 * interval methods. No numerics of its own: only the loop and the averages.
 *
 * Reproducibility: replication r draws from createRng(deriveSeed(seed, r)), so the result depends
 * only on the panel, the fitted values, R, the seed and the engine version. It runs in the calling
 * thread, a few replications at a time, yielding to the event loop between slices so that progress
 * reports and cancellation get through.
 */
import { binomialMleWithProfile, ESTIMATORS } from '@/lib/stats/estimators';
import { profileInterval } from '@/lib/stats/intervals/profile';
import { waldInterval } from '@/lib/stats/intervals/wald';
import { createRng, deriveSeed } from '@/lib/stats/random';
import { simulatePanel } from '@/lib/stats/simulate';
import { ESTIMATOR_ORDER, type AuditResult, type AuditRow, type EstimatorKey } from './results';

export const INTERIM_AUDIT = 'interim-1 (lib/fits/interim-audit.ts, main thread)';

export type AuditSpec = {
  obligors: readonly number[];
  truth: { pd: number; rho: number };
  replications: number;
  seed: number;
  level: number;
};

export type AuditRunOptions = {
  /** Called after each slice with the replications done; may throw to stop. */
  onProgress?: (done: number, total: number) => void | Promise<void>;
  signal?: AbortSignal;
};

const SLICE = 4;

function abortError(signal: AbortSignal): Error {
  const reason: unknown = signal.reason;
  if (reason instanceof Error) return reason;
  const err = new Error('The estimator audit was stopped before it finished.');
  err.name = 'AbortError';
  return err;
}

/** Runs the audit; see the file comment. Throws RangeError for an impossible truth (pd outside (0,1), rho outside [0,1)). */
export async function runInterimAudit(spec: AuditSpec, run: AuditRunOptions = {}): Promise<AuditResult> {
  const { truth, replications: R, seed, level } = spec;
  if (!(truth.pd > 0 && truth.pd < 1) || !(truth.rho >= 0 && truth.rho < 1)) {
    throw new RangeError(`The estimator audit needs a fitted PD in (0, 1) and rho in [0, 1); got PD ${truth.pd}, rho ${truth.rho}.`);
  }
  const values: Record<EstimatorKey, number[]> = { binomialMle: [], vasicekMle: [], momentVariance: [], momentVarianceCorrected: [], jointDefault: [] };
  let profileWith = 0;
  let profileCovered = 0;
  let waldWith = 0;
  let waldCovered = 0;
  let waldMissing = 0;
  const obligors = [...spec.obligors];
  for (let r = 0; r < R; r++) {
    const sim = simulatePanel({ pd: truth.pd, rho: truth.rho, obligors }, createRng(deriveSeed(seed, r)));
    const panel = { obligors: sim.obligors, defaults: sim.defaults };
    const { result: mle, profile } = binomialMleWithProfile(panel);
    if (mle.rho !== null && mle.status !== 'undefined' && mle.status !== 'not-converged') {
      values.binomialMle.push(mle.rho);
      if (profile) {
        const p = profileInterval(profile, mle, level);
        profileWith++;
        if (p.lower <= truth.rho && truth.rho <= p.upper) profileCovered++;
        const w = waldInterval(profile, mle, level);
        if (w === null) waldMissing++;
        else {
          waldWith++;
          if (w.lower <= truth.rho && truth.rho <= w.upper) waldCovered++;
        }
      }
    }
    for (const key of ESTIMATOR_ORDER) {
      if (key === 'binomialMle') continue;
      const e = ESTIMATORS[key](panel);
      if (e.rho !== null && e.status !== 'undefined' && e.status !== 'not-converged') values[key].push(e.rho);
    }
    if ((r + 1) % SLICE === 0 || r === R - 1) {
      await run.onProgress?.(r + 1, R);
      if (run.signal?.aborted) throw abortError(run.signal);
      await new Promise((resolve) => setImmediate(resolve));
    }
  }
  const rows: AuditRow[] = ESTIMATOR_ORDER.map((key) => {
    const xs = values[key];
    const isMle = key === 'binomialMle';
    const base = {
      estimator: key,
      defined: xs.length,
      profileCoverage: isMle && profileWith > 0 ? profileCovered / profileWith : null,
      waldCoverage: isMle && waldWith > 0 ? waldCovered / waldWith : null,
      waldMissing: isMle ? waldMissing : null,
    };
    if (xs.length === 0) return { ...base, bias: null, rmse: null };
    let sum = 0;
    let sq = 0;
    for (const x of xs) {
      sum += x - truth.rho;
      sq += (x - truth.rho) ** 2;
    }
    return { ...base, bias: sum / xs.length, rmse: Math.sqrt(sq / xs.length) };
  });
  return { implementation: INTERIM_AUDIT, replications: R, seed, level, truth: { ...truth }, rows };
}
