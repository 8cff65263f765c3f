/**
 * The likelihood-ratio test of the Gaussian copula (1/nu = 0) against the one-factor t copula, with
 * its parametric-bootstrap p-value and the test's power at the user's own cohort sizes.
 *
 * Every replication i draws from createRng(deriveSeed(seed, i)) (the power study from a second
 * master seed, {@link powerSeed}), so any split of the replications across worker threads gives
 * identical numbers: each has a `...Range(spec, from, to)` for a slice and a `summarise...` that
 * merges slices.
 */
import { sortedQuantile } from './intervals/bootstrap';
import { tCopulaMaxima } from './estimators/t-copula-mle';
import { lrTestRhoZero } from './lr-test';
import type { Panel } from './panel';
import { createRng, deriveSeed } from './random';
import { simulatePanel } from './simulate';
import { simulateTCopulaPanel } from './simulate-t-copula';

/** Default replications of the bootstrap test and of the power study. */
export const COPULA_TEST_REPLICATIONS = 200;
/** nu of the power study's alternative when the t fit reaches the Gaussian limit. */
export const POWER_ALTERNATIVE_NU = 5;
/** Level of the test whose power is reported (its critical value is the bootstrap's 95% quantile). */
export const COPULA_TEST_LEVEL = 0.05;

/** The statistic of one panel, or why there is none. */
export interface CopulaLrReplication {
  index: number;
  /** 2 (l_t - l_Gaussian) on the simulated panel; null when the t copula could not be fitted. */
  statistic: number | null;
  reason?: string;
}

/** What the bootstrap simulates: the cohort sizes, the fitted Gaussian (p, rho), and the seed. */
export interface CopulaTestSpec {
  obligors: readonly number[];
  pd: number;
  rho: number;
  seed: number;
}

/** What the power study simulates: the cohort sizes and the alternative t law. */
export interface CopulaPowerSpec extends CopulaTestSpec {
  nu: number;
}

/** The test of the review: statistic, bootstrap p-value (the one to use) and the asymptotic one. */
export interface CopulaLrTest {
  statistic: number;
  /** (1 + #{LR_b >= LR}) / (B + 1) over the replications that gave a statistic. */
  pValue: number;
  /** 0.5 P(chi2_1 >= LR) (Self & Liang 1987); far from nominal at these sample sizes: never lead with it. */
  pValueAsymptotic: number;
  replications: number;
  /** The 95% quantile of the bootstrap statistics: the test's critical value at the 5% level. */
  criticalValue: number;
  /** Replications without a statistic (left out). */
  failed: number;
}

/**
 * The likelihood-ratio statistic of the Gaussian copula against the t copula on one panel:
 * 2 (max l_t - max l_Gaussian), both maxima from tCopulaMaxima (tCopulaMle's search without what
 * only its intervals and profile need; the Gaussian maximum is a candidate of the t search, so the
 * statistic is never negative). It agrees with the statistic of tCopulaMle to within 1e-4.
 *
 * Special cases: a panel on which the t copula is undefined (no defaults, one year) gives null with
 * the estimator's sentence.
 */
export function copulaLrStatistic(panel: Panel): { statistic: number | null; reason?: string } {
  const fit = tCopulaMaxima(panel);
  if (fit.logLik === null || fit.gaussianLogLik === null) return { statistic: null, reason: fit.reason ?? 'The t copula could not be fitted.' };
  if (fit.status === 'not-converged') return { statistic: null, reason: fit.reason ?? 'The search did not converge.' };
  return { statistic: Math.max(0, 2 * (fit.logLik - fit.gaussianLogLik)) };
}

function checkRange(fn: string, from: number, to: number): void {
  if (!Number.isSafeInteger(from) || !Number.isSafeInteger(to) || from < 0 || to < from) {
    throw new RangeError(`${fn}: the index range must satisfy 0 <= from <= to (whole numbers); got [${from}, ${to}).`);
  }
}

/**
 * Replications [from, to) of the parametric bootstrap of the statistic under the fitted Gaussian
 * model: panel i simulated at (p, rho) with the observed cohort sizes from
 * createRng(deriveSeed(seed, i)), then its statistic.
 *
 * @example copulaBootstrapRange({ obligors: [1000, 1000, 1000], pd: 0.01, rho: 0.05, seed: 7 }, 0, 10)
 *
 * Reference: Efron & Tibshirani (1993), section 16.4 (bootstrap hypothesis tests).
 */
export function copulaBootstrapRange(spec: CopulaTestSpec, from: number, to: number, onReplication?: (r: CopulaLrReplication) => void): CopulaLrReplication[] {
  checkRange('copulaBootstrapRange', from, to);
  const out: CopulaLrReplication[] = [];
  for (let i = from; i < to; i++) {
    const sim = simulatePanel({ pd: spec.pd, rho: spec.rho, obligors: spec.obligors.slice() }, createRng(deriveSeed(spec.seed, i)));
    const r = copulaLrStatistic({ obligors: sim.obligors, defaults: sim.defaults });
    const rep: CopulaLrReplication = r.statistic === null ? { index: i, statistic: null, reason: r.reason } : { index: i, statistic: r.statistic };
    out.push(rep);
    onReplication?.(rep);
  }
  return out;
}

/** The power study's master seed, derived from the test's (so one seed reproduces both). */
export function powerSeed(seed: number): number {
  return deriveSeed(seed, 0x7fffffff);
}

/**
 * Replications [from, to) of the power study: panel i simulated from the alternative t law with
 * the observed cohort sizes from createRng(deriveSeed(powerSeed(seed), i)), then its statistic.
 *
 * @example copulaPowerRange({ obligors: [1000, 1000, 1000], pd: 0.01, rho: 0.05, nu: 5, seed: 7 }, 0, 10)
 */
export function copulaPowerRange(spec: CopulaPowerSpec, from: number, to: number, onReplication?: (r: CopulaLrReplication) => void): CopulaLrReplication[] {
  checkRange('copulaPowerRange', from, to);
  const master = powerSeed(spec.seed);
  const out: CopulaLrReplication[] = [];
  for (let i = from; i < to; i++) {
    const sim = simulateTCopulaPanel({ pd: spec.pd, rho: spec.rho, nu: spec.nu, obligors: spec.obligors }, createRng(deriveSeed(master, i)));
    const r = copulaLrStatistic(sim);
    const rep: CopulaLrReplication = r.statistic === null ? { index: i, statistic: null, reason: r.reason } : { index: i, statistic: r.statistic };
    out.push(rep);
    onReplication?.(rep);
  }
  return out;
}

function statistics(fn: string, replications: readonly CopulaLrReplication[]): number[] {
  const B = replications.length;
  const seen = new Uint8Array(B);
  for (const r of replications) {
    if (!Number.isInteger(r.index) || r.index < 0 || r.index >= B || seen[r.index]) {
      throw new RangeError(`${fn}: replication index ${r.index} is missing, repeated or outside 0..${B - 1}; merge each slice exactly once.`);
    }
    seen[r.index] = 1;
  }
  const values = replications.flatMap((r) => (r.statistic === null ? [] : [r.statistic]));
  if (values.length < 2) throw new RangeError(`${fn}: only ${values.length} of ${B} replications gave a statistic; the data are too sparse for this test.`);
  return values.sort((a, b) => a - b);
}

/**
 * The test from the observed statistic and the merged bootstrap replications:
 * p = (1 + #{LR_b >= LR}) / (B + 1) (B the replications with a statistic), the critical value the
 * 95% quantile of the LR_b (Hyndman & Fan definition 7), and the asymptotic p-value of the 50:50
 * mixture of chi-square(0) and chi-square(1).
 *
 * Special cases: fewer than 2 replications with a statistic, missing or repeated indices, or a
 * negative statistic throw RangeError.
 *
 * Reference: Davison, A. C. & Hinkley, D. V. (1997), Bootstrap Methods and their Application,
 * section 4.2 (the Monte Carlo p-value (1 + #) / (B + 1)); Self, S. G. & Liang, K.-Y. (1987), JASA
 * 82:605-610 (the boundary mixture).
 */
export function summariseCopulaTest(statistic: number, replications: readonly CopulaLrReplication[]): CopulaLrTest {
  if (!(statistic >= 0)) throw new RangeError(`summariseCopulaTest: the statistic must be at or above 0; got ${statistic}.`);
  const values = statistics('summariseCopulaTest', replications);
  let exceed = 0;
  // a tolerance of rounding: the statistic of a replicate equal to the observed one counts
  for (const v of values) if (v >= statistic - 1e-9) exceed++;
  return {
    statistic,
    pValue: (1 + exceed) / (values.length + 1),
    pValueAsymptotic: lrTestRhoZero(statistic / 2, 0).pValue,
    replications: replications.length,
    criticalValue: sortedQuantile(values, 1 - COPULA_TEST_LEVEL),
    failed: replications.length - values.length,
  };
}

/**
 * The power of the test at the user's cohort sizes: the share of the power study's statistics above
 * the bootstrap's critical value (replications without a statistic are left out and counted).
 *
 * Special cases: as summariseCopulaTest.
 *
 * Reference: Efron & Tibshirani (1993), section 16.4; common practice for simulated power.
 */
export function summariseCopulaPower(criticalValue: number, replications: readonly CopulaLrReplication[]): { replications: number; rejectRate: number; failed: number } {
  const values = statistics('summariseCopulaPower', replications);
  let reject = 0;
  for (const v of values) if (v > criticalValue) reject++;
  return { replications: replications.length, rejectRate: reject / values.length, failed: replications.length - values.length };
}
