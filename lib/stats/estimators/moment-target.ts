/**
 * The moment targets of the three moment estimators (DESIGN.md, "Estimators"): the mean default
 * rate p and the value that Phi2(k, k; rho) - p^2 must equal. One definition, used by the
 * estimators themselves and by their parametric bootstrap (which must tell a target at or below 0
 * from an estimator without a value).
 */
import { assertPanel, type Panel } from '../mixture-likelihood';
import { defaultRates, mean } from './moment-equation';

/** The estimators that solve the moment equation. */
export const MOMENT_ESTIMATOR_KEYS = ['momentVariance', 'momentVarianceCorrected', 'jointDefault'] as const;
export type MomentEstimatorKey = (typeof MOMENT_ESTIMATOR_KEYS)[number];

/** A moment target, or the reason there is none. */
export type MomentTarget =
  | {
      kind: 'target';
      /** mean(DR_t), strictly between 0 and 1. */
      p: number;
      /** What Phi2(k, k; rho) - p^2 must equal; may be 0 or negative (the estimator then decides). */
      target: number;
      /** The statistic the target is made of, for messages: s2, V or p2. */
      statistic: number;
    }
  | { kind: 'undefined'; reason: string };

/** Sample variance with divisor T - 1 (two-pass). */
export function sampleVariance(values: readonly number[]): number {
  const m = mean(values);
  let s = 0;
  for (const v of values) s += (v - m) * (v - m);
  return s / (values.length - 1);
}

/**
 * The moment target of one of the moment estimators.
 *
 * With DR_t = d_t / n_t and p = mean(DR_t):
 * - `momentVariance`: target = s2, the sample variance of DR_t (divisor T - 1);
 * - `momentVarianceCorrected`: target = V = (s2 - p (1 - p) h) / (1 - h), h = mean(1 / n_t)
 *   (before the clip at 0, which the estimator applies);
 * - `jointDefault`: target = p2 - p^2, p2 = mean(d_t (d_t - 1) / (n_t (n_t - 1))).
 *
 * Method: two-pass sums in period order (the same arithmetic as the estimators always used).
 *
 * Special cases (kind `undefined`, with the sentence the estimators report): fewer than 2 periods
 * (variance targets); a period with fewer than 2 obligors (jointDefault); p = 0 or p = 1; h = 1
 * (momentVarianceCorrected). Invalid counts throw RangeError naming the period.
 *
 * @example momentTarget('momentVariance', { obligors: [1000, 1000, 1000], defaults: [5, 20, 10] })
 *
 * Reference: Gordy, M. B. (2000), "A comparative anatomy of credit risk models", Journal of
 * Banking & Finance 24:119-149, section 4; de Servigny, A. & Renault, O. (2002), "Default
 * correlation: empirical evidence", Standard & Poor's working paper.
 */
export function momentTarget(key: MomentEstimatorKey, panel: Panel): MomentTarget {
  assertPanel(panel, key);
  const T = panel.obligors.length;
  if (key === 'jointDefault') {
    const small = panel.obligors.findIndex((n) => n < 2);
    if (small >= 0) {
      return { kind: 'undefined', reason: `Period ${small + 1} has fewer than 2 obligors, so it has no pairs to count joint defaults in.` };
    }
  } else if (T < 2) {
    return { kind: 'undefined', reason: 'The variance of the default rate needs at least 2 periods.' };
  }
  const dr = defaultRates(panel.obligors, panel.defaults);
  const p = mean(dr);
  if (p === 0) {
    return { kind: 'undefined', reason: 'No period has a default, so the mean default rate is 0 and the moment equation has no solution.' };
  }
  if (p === 1) return { kind: 'undefined', reason: 'Every obligor defaulted in every period, so the moment equation has no solution.' };
  if (key === 'momentVariance') {
    const s2 = sampleVariance(dr);
    return { kind: 'target', p, target: s2, statistic: s2 };
  }
  if (key === 'momentVarianceCorrected') {
    const h = mean(panel.obligors.map((n) => 1 / n));
    if (h >= 1) return { kind: 'undefined', reason: 'Every cohort has a single obligor, so the binomial correction divides by zero.' };
    const s2 = sampleVariance(dr);
    const v = (s2 - p * (1 - p) * h) / (1 - h);
    return { kind: 'target', p, target: v, statistic: v };
  }
  const p2 = mean(
    panel.obligors.map((n, t) => {
      const d = panel.defaults[t];
      return (d * (d - 1)) / (n * (n - 1));
    }),
  );
  return { kind: 'target', p, target: p2 - p * p, statistic: p2 };
}
