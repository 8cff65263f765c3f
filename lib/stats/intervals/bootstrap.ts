/**
 * Parametric bootstrap of the binomial-mixture maximum-likelihood estimate of rho.
 *
 * B panels are simulated at the estimate (p_hat, rho_hat) with the observed cohort sizes n_t,
 * binomialMle is re-run on each, and the spread of the B estimates rho*_1..rho*_B gives a
 * percentile interval and a bias estimate (Efron & Tibshirani 1993, ch. 6 and 13).
 *
 * Reproducibility across threads: replication i draws from its own stream
 * createRng(deriveSeed(seed, i)), so the replications can be computed over any split of the index
 * range [0, B) (bootstrapRange over [from, to)) and merged by index with identical results.
 */
import { binomialMle } from '../estimators/binomial-mle';
import type { EstimateStatus } from '../estimators/types';
import { createRng, deriveSeed } from '../random';
import { simulatePanel } from '../simulate';
import { assertSimulationModel } from '../simulation-spec';

/** Most replications one bootstrap may ask for. */
export const MAX_BOOTSTRAP_REPLICATIONS = 100_000;

/** What a bootstrap simulates: the observed cohort sizes and the fitted (p, rho), and the seed. */
export interface BootstrapSpec {
  /** Cohort sizes n_t of the observed panel, in period order. */
  obligors: readonly number[];
  /** Fitted PD, in (0, 1). */
  pd: number;
  /** Fitted rho, in [0, 1). */
  rho: number;
  /** Master seed, an integer in [0, 2^32). */
  seed: number;
}

/** The estimate of one bootstrap replication. */
export interface BootstrapReplication {
  /** Replication index i in [0, B); its stream is createRng(deriveSeed(seed, i)). */
  index: number;
  /** binomialMle's rho on the simulated panel; null when the replication failed. */
  rho: number | null;
  status: EstimateStatus;
  /** Why the replication failed (status `undefined` or `not-converged`). */
  reason?: string;
}

/** Summary of a parametric bootstrap (the result's `estimates.binomialMle.intervals.bootstrap`). */
export interface BootstrapInterval {
  level: number;
  /** Percentile interval: the (1 - level)/2 and (1 + level)/2 quantiles of the successful rho*. */
  lower: number;
  upper: number;
  /** mean(rho*) - rho_hat over the successful replications. */
  bias: number;
  /** B, the replications asked for (failed ones included). */
  replications: number;
  seed: number;
  /** Replications without an estimate (left out of the interval and the bias). */
  failed: number;
  /** Distinct reasons of the failed replications with their counts, most frequent first. */
  failures: { reason: string; count: number }[];
}

function assertReplications(fn: string, replications: number): void {
  if (!Number.isInteger(replications) || replications < 1 || replications > MAX_BOOTSTRAP_REPLICATIONS) {
    throw new RangeError(
      `${fn}: the number of replications must be a whole number from 1 to ${MAX_BOOTSTRAP_REPLICATIONS}; got ${replications}.`,
    );
  }
}

/**
 * Computes bootstrap replications i = from, ..., to - 1 (a slice of [0, B)).
 *
 * Replication i: rng = createRng(deriveSeed(seed, i)); a panel d*_t ~ simulatePanel at
 * (pd, rho) with the cohort sizes n_t; rho*_i = binomialMle(n_t, d*_t).rho.
 *
 * Method: as above; a replication whose estimate is `undefined` (for instance no default in any
 * simulated period) or `not-converged` is kept with rho = null and its reason. `clipped` estimates
 * (the search limit) are kept as values: they are what the estimator gives.
 *
 * Special cases: from = to gives []; a range outside [0, 2^53) or from > to throws RangeError; a
 * PD outside (0, 1), rho outside [0, 1) or a bad seed throw RangeError.
 *
 * @example bootstrapRange({ obligors: [1000, 1000], pd: 0.01, rho: 0.1, seed: 7 }, 0, 2)
 *
 * Reference: Efron, B. & Tibshirani, R. J. (1993), An Introduction to the Bootstrap, Chapman &
 * Hall, section 6.5 (the parametric bootstrap).
 *
 * @param onReplication called after each replication (for progress); must not throw.
 */
export function bootstrapRange(
  spec: BootstrapSpec,
  from: number,
  to: number,
  onReplication?: (replication: BootstrapReplication) => void,
): BootstrapReplication[] {
  assertSimulationModel('bootstrapRange', spec);
  if (!Number.isSafeInteger(from) || !Number.isSafeInteger(to) || from < 0 || to < from) {
    throw new RangeError(`bootstrapRange: the index range must satisfy 0 <= from <= to (whole numbers); got [${from}, ${to}).`);
  }
  const obligors = spec.obligors.slice();
  const out: BootstrapReplication[] = [];
  for (let i = from; i < to; i++) {
    const rng = createRng(deriveSeed(spec.seed, i));
    const sim = simulatePanel({ pd: spec.pd, rho: spec.rho, obligors }, rng);
    const fit = binomialMle({ obligors: sim.obligors, defaults: sim.defaults });
    const replication: BootstrapReplication =
      fit.status === 'undefined' || fit.status === 'not-converged' || fit.rho === null
        ? { index: i, rho: null, status: fit.status, reason: fit.reason ?? 'The estimate is undefined for this simulated panel.' }
        : { index: i, rho: fit.rho, status: fit.status };
    out.push(replication);
    onReplication?.(replication);
  }
  return out;
}

/**
 * Sample quantile by linear interpolation between order statistics (Hyndman & Fan 1996,
 * definition 7; the default of R's quantile() and NumPy's percentile()).
 *
 * Q(q) = x_(j) + g (x_(j+1) - x_(j)),  h = (m - 1) q,  j = floor(h) (0-based), g = h - j,
 * for the sorted values x_(0) <= ... <= x_(m-1).
 *
 * Special cases: m = 1 gives the single value for any q; q = 0 and q = 1 give the minimum and
 * maximum. An empty or unsorted array, or q outside [0, 1], throws RangeError.
 *
 * @example sortedQuantile([1, 2, 3, 4], 0.5) // 2.5
 *
 * Reference: Hyndman, R. J. & Fan, Y. (1996), "Sample quantiles in statistical packages", The
 * American Statistician 50(4):361-365, definition 7.
 */
export function sortedQuantile(sorted: readonly number[], q: number): number {
  const m = sorted.length;
  if (m === 0) throw new RangeError('sortedQuantile: there are no values to take a quantile of.');
  if (!(q >= 0 && q <= 1)) throw new RangeError(`sortedQuantile: q must be in [0, 1]; got ${q}.`);
  for (let i = 1; i < m; i++) {
    if (!(sorted[i - 1] <= sorted[i])) throw new RangeError('sortedQuantile: the values must be sorted in increasing order.');
  }
  const h = (m - 1) * q;
  const j = Math.floor(h);
  if (j >= m - 1) return sorted[m - 1];
  return sorted[j] + (h - j) * (sorted[j + 1] - sorted[j]);
}

/**
 * Combines bootstrap replications into the percentile interval and the bias estimate.
 *
 * With the successful estimates rho*_(1) <= ... <= rho*_(m): lower = Q((1 - level) / 2),
 * upper = Q((1 + level) / 2) (sortedQuantile, Hyndman & Fan definition 7), and
 * bias = mean(rho*) - rho_hat.
 *
 * Method: the replications may come in any order and from any split of [0, B): they are checked
 * to be exactly the indices 0..B-1 once each, then sorted by value.
 *
 * Special cases: failed replications are left out and counted, with their reasons; fewer than 2
 * successful replications throws RangeError (no interval can be formed); `level` outside (0, 1),
 * missing or duplicate indices throw RangeError.
 *
 * @example summariseBootstrap(bootstrapRange(spec, 0, 500), spec, 0.95)
 *
 * Reference: Efron, B. & Tibshirani, R. J. (1993), An Introduction to the Bootstrap, ch. 13 (the
 * percentile interval) and section 10.2 (the bootstrap estimate of bias).
 */
export function summariseBootstrap(
  replications: readonly BootstrapReplication[],
  spec: BootstrapSpec,
  level = 0.95,
): BootstrapInterval {
  if (!(level > 0 && level < 1)) {
    throw new RangeError(`summariseBootstrap: the level must be strictly between 0 and 1; got ${level}.`);
  }
  const B = replications.length;
  assertReplications('summariseBootstrap', B);
  const seen = new Uint8Array(B);
  for (const r of replications) {
    if (!Number.isInteger(r.index) || r.index < 0 || r.index >= B || seen[r.index]) {
      throw new RangeError(
        `summariseBootstrap: replication index ${r.index} is missing, repeated or outside 0..${B - 1}; merge each slice of the range exactly once.`,
      );
    }
    seen[r.index] = 1;
  }
  const values: number[] = [];
  const reasons = new Map<string, number>();
  for (const r of replications) {
    if (r.rho === null) {
      const reason = r.reason ?? 'no reason given';
      reasons.set(reason, (reasons.get(reason) ?? 0) + 1);
    } else {
      values.push(r.rho);
    }
  }
  if (values.length < 2) {
    throw new RangeError(
      `summariseBootstrap: only ${values.length} of ${B} replications gave an estimate, so there is no bootstrap interval; the data are too sparse for this method.`,
    );
  }
  values.sort((a, b) => a - b);
  let sum = 0;
  for (const v of values) sum += v;
  const failures = [...reasons.entries()]
    .map(([reason, count]) => ({ reason, count }))
    .sort((a, b) => b.count - a.count || a.reason.localeCompare(b.reason));
  return {
    level,
    lower: sortedQuantile(values, (1 - level) / 2),
    upper: sortedQuantile(values, (1 + level) / 2),
    bias: sum / values.length - spec.rho,
    replications: B,
    seed: spec.seed,
    failed: B - values.length,
    failures,
  };
}

/**
 * Parametric bootstrap percentile interval and bias of binomialMle's rho, in this thread.
 *
 * bootstrapRange over [0, B) followed by summariseBootstrap (see both). For B in the hundreds or
 * more use lib/engine's worker-thread pool, which splits [0, B) and gives identical numbers.
 *
 * Special cases: as bootstrapRange and summariseBootstrap; B must be a whole number from 1 to
 * MAX_BOOTSTRAP_REPLICATIONS.
 *
 * @example parametricBootstrap({ obligors: [1000, 1050, 1100], pd: 0.0133, rho: 0.037, seed: 7 }, 500)
 *
 * Reference: Efron, B. & Tibshirani, R. J. (1993), An Introduction to the Bootstrap, sections 6.5
 * and 13.3.
 */
export function parametricBootstrap(spec: BootstrapSpec, replications: number, level = 0.95): BootstrapInterval {
  assertReplications('parametricBootstrap', replications);
  return summariseBootstrap(bootstrapRange(spec, 0, replications), spec, level);
}
