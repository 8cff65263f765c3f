/**
 * Leave-one-year-out (jackknife) stability of the correlation estimators (DESIGN.md,
 * `stability.jackknife`: `{ estimators: { KEY: { leaveOneOut: [ { period, rho } ], bias, se } },
 * mostInfluential: { period, estimator, change } }`).
 */
import { INDEPENDENT_ESTIMATORS } from '../estimators';
import type { Estimate } from '../estimators/types';
import { assertPanel, type Panel } from '../panel';

/** A panel with a label for each period (years, for example). */
export interface LabelledPanel extends Panel {
  periods: readonly string[];
}

/** The jackknife of one estimator. */
export interface JackknifeEstimator {
  /** rho without each period, in period order; null where the estimator has no value without it. */
  leaveOneOut: { period: string; rho: number | null }[];
  /** (T - 1) (mean - full); null when the full estimate or any leave-one-out value is missing. */
  bias: number | null;
  /** sqrt((T - 1) / T sum (rho_i - mean)^2); null likewise. */
  se: number | null;
  /** Why bias and se are null. */
  reason?: string;
}

/** The period whose removal moves binomialMle's rho most, and by how much (rho without it minus rho). */
export interface MostInfluential {
  period: string;
  estimator: string;
  change: number;
}

/** Result of {@link jackknife}. */
export interface Jackknife {
  estimators: Record<string, JackknifeEstimator>;
  /** Follows binomialMle (DESIGN.md), over the periods without which it has a value; null when it has no full estimate or none of those. */
  mostInfluential: MostInfluential | null;
}

/**
 * Jackknife bias and standard error of a statistic from its leave-one-out values.
 *
 * With theta_(i) the statistic without observation i (i = 1..n), theta_(.) their mean and theta the
 * statistic on all n: bias = (n - 1) (theta_(.) - theta), se = sqrt((n - 1) / n sum (theta_(i) - theta_(.))^2).
 *
 * Method: two-pass sums.
 *
 * Special cases: fewer than 2 values or a non-finite value throw RangeError.
 *
 * @example jackknifeBiasSe([2, 3, 4], 3) // { mean: 3, bias: 0, se: 0.8165 }
 *
 * Reference: Efron, B. & Tibshirani, R. J. (1993), An Introduction to the Bootstrap, eq. (11.3)
 * and (11.5); Quenouille, M. H. (1956), "Notes on bias in estimation", Biometrika 43:353-360.
 */
export function jackknifeBiasSe(leaveOneOut: readonly number[], full: number): { mean: number; bias: number; se: number } {
  const n = leaveOneOut.length;
  if (n < 2) throw new RangeError(`jackknifeBiasSe: need at least 2 leave-one-out values; got ${n}.`);
  if (!Number.isFinite(full) || leaveOneOut.some((v) => !Number.isFinite(v))) {
    throw new RangeError('jackknifeBiasSe: every value must be a finite number.');
  }
  let mean = 0;
  for (const v of leaveOneOut) mean += v;
  mean /= n;
  let ss = 0;
  for (const v of leaveOneOut) ss += (v - mean) * (v - mean);
  return { mean, bias: (n - 1) * (mean - full), se: Math.sqrt(((n - 1) / n) * ss) };
}

function valueOf(e: Estimate): number | null {
  return e.rho !== null && (e.status === 'ok' || e.status === 'clipped') ? e.rho : null;
}

/** Checks the labels of a panel: one per period, distinct. */
export function assertLabelledPanel(panel: LabelledPanel, fn: string): void {
  assertPanel(panel, fn);
  if (!Array.isArray(panel.periods) || panel.periods.length !== panel.obligors.length) {
    throw new RangeError(`${fn}: give one period label per period (${panel.obligors.length}); got ${Array.isArray(panel.periods) ? panel.periods.length : 'none'}.`);
  }
  const seen = new Set<string>();
  for (const label of panel.periods) {
    if (seen.has(String(label))) throw new RangeError(`${fn}: period ${label} appears twice.`);
    seen.add(String(label));
  }
}

/**
 * Leave-one-period-out estimates of each estimator, their jackknife bias and standard error, and
 * the period whose removal moves binomialMle most.
 *
 * For each estimator and each period i: rho_(i) = estimator(panel without period i); then
 * jackknifeBiasSe (DESIGN.md: bias (T - 1)(mean - full), se sqrt((T - 1)/T sum (rho_i - mean)^2)).
 * mostInfluential: the period with the largest |rho_(i) - rho| of binomialMle among those without
 * which it has a value (first in period order on ties), change signed (negative: rho falls
 * without that period).
 *
 * Method: the estimators as defined (no warm starts), T + 1 runs each (by default the five of the
 * independent-factor model, whose stability this is: DESIGN.md); a `clipped` value counts
 * as a value, `undefined` and `not-converged` as none.
 *
 * Special cases: when the full estimate or any leave-one-out value is missing, bias and se are
 * null with a reason naming the periods (the jackknife needs all T); fewer than 2 periods, labels
 * missing or repeated, or invalid counts throw RangeError.
 *
 * @example jackknife({ periods: ['2015', '2016', '2017'], obligors: [1000, 1000, 1000], defaults: [5, 20, 10] })
 *
 * Reference: Efron, B. & Tibshirani, R. J. (1993), An Introduction to the Bootstrap, ch. 11;
 * Quenouille (1956); Tukey, J. W. (1958), "Bias and confidence in not-quite large samples",
 * Annals of Mathematical Statistics 29:614 (abstract).
 */
export function jackknife(
  panel: LabelledPanel,
  estimators: Readonly<Record<string, (panel: Panel) => Estimate>> = INDEPENDENT_ESTIMATORS,
): Jackknife {
  assertLabelledPanel(panel, 'jackknife');
  const T = panel.obligors.length;
  if (T < 2) throw new RangeError('jackknife: leaving one period out needs at least 2 periods.');
  const without = (i: number): Panel => ({
    obligors: panel.obligors.filter((_, t) => t !== i),
    defaults: panel.defaults.filter((_, t) => t !== i),
  });
  const parts = Array.from({ length: T }, (_, i) => without(i));
  const out: Record<string, JackknifeEstimator> = {};
  let mostInfluential: MostInfluential | null = null;
  for (const [key, estimate] of Object.entries(estimators)) {
    const full = valueOf(estimate(panel));
    const leaveOneOut = parts.map((p, i) => ({ period: String(panel.periods[i]), rho: valueOf(estimate(p)) }));
    const missing = leaveOneOut.filter((e) => e.rho === null).map((e) => e.period);
    if (full === null) {
      out[key] = { leaveOneOut, bias: null, se: null, reason: 'The estimator has no value on the whole panel, so there is nothing to compare the leave-one-out values with.' };
      continue;
    }
    if (key === 'binomialMle') {
      let best = -1;
      for (let i = 0; i < T; i++) {
        const r = leaveOneOut[i].rho;
        if (r !== null && (best < 0 || Math.abs(r - full) > Math.abs((leaveOneOut[best].rho as number) - full))) best = i;
      }
      if (best >= 0) mostInfluential = { period: leaveOneOut[best].period, estimator: 'binomialMle', change: (leaveOneOut[best].rho as number) - full };
    }
    if (missing.length > 0) {
      out[key] = {
        leaveOneOut,
        bias: null,
        se: null,
        reason: `The estimator has no value without period${missing.length > 1 ? 's' : ''} ${missing.join(', ')}; the jackknife needs all ${T}.`,
      };
      continue;
    }
    const { bias, se } = jackknifeBiasSe(leaveOneOut.map((e) => e.rho as number), full);
    out[key] = { leaveOneOut, bias, se };
  }
  return { estimators: out, mostInfluential };
}
