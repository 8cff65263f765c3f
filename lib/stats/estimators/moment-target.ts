/**
 * The moment targets of the three moment estimators (DESIGN.md, "Estimators"): the mean default
 * rate p and the value that Phi2(k, k; rho) - p^2 must equal. One definition, used by the
 * estimators themselves and by their parametric bootstrap (which must tell a target at or below 0
 * from an estimator without a value).
 */
import { assertPanel, type Panel } from '../panel';
import { sampleVarianceBiasFactor } from '../variance-bias';
import { defaultRates, mean } from './moment-equation';

/** The estimators that solve the moment equation. */
export const MOMENT_ESTIMATOR_KEYS = ['momentVariance', 'momentVarianceCorrected', 'jointDefault', 'momentVarianceAutocorrected'] as const;

/**
 * Largest |r_1| momentVarianceAutocorrected uses: the lag-1 sample autocorrelation of the default
 * rates is clipped to [-0.9, 0.9]. The correction 1 / c grows without bound as r_1 nears 1 (at 0.9
 * it is 2.1 for T = 20 and 4.7 for T = 6), and a sample r_1 beyond 0.9 from 10-25 years is within
 * its noise of a random walk, which the stationary formula does not describe.
 */
export const AUTOCORRELATION_CLIP = 0.9;
export type MomentEstimatorKey = (typeof MOMENT_ESTIMATOR_KEYS)[number];

/** A moment target, or the reason there is none. */
export type MomentTarget =
  | {
      kind: 'target';
      /** mean(DR_t), strictly between 0 and 1. */
      p: number;
      /** What Phi2(k, k; rho) - p^2 must equal; may be 0 or negative (the estimator then decides). */
      target: number;
      /** The statistic the target is made of, for messages: s2, V or p2 (momentVarianceAutocorrected: s2). */
      statistic: number;
      /** momentVarianceAutocorrected only: the correction applied to s2. */
      correction?: AutocorrelationCorrection;
    }
  | { kind: 'undefined'; reason: string };

/** The autocorrelation correction of momentVarianceAutocorrected's target. */
export interface AutocorrelationCorrection {
  /** r_1, the lag-1 sample autocorrelation of the default rates. */
  lag1: number;
  /** r_1 clipped to [-AUTOCORRELATION_CLIP, AUTOCORRELATION_CLIP]: the value the correction uses. */
  lag1Used: number;
  /** c = E[s2] / Var(DR) for an AR(1) with coefficient lag1Used (sampleVarianceBiasFactor); target = s2 / c. */
  factor: number;
}

/**
 * Sample variance with divisor T - 1 (two-pass). Equal values give 0 exactly: their computed mean
 * can differ from them by a rounding (ten rates of 0.01 average to 0.009999999999999998), which
 * would leave a variance of ~1e-36 and turn "no variation" into a tiny correlation.
 */
export function sampleVariance(values: readonly number[]): number {
  if (values.every((v) => v === values[0])) return 0;
  const m = mean(values);
  let s = 0;
  for (const v of values) s += (v - m) * (v - m);
  return s / (values.length - 1);
}

/**
 * Sample autocorrelation of a series at lag h (Box & Jenkins 1976, eq. 2.1.12):
 * r_h = sum_(t=h+1..T) (x_t - m)(x_(t-h) - m) / sum_t (x_t - m)^2, m = mean(x).
 *
 * Special cases: h must be a whole number from 1 to T - 1 and the series not constant, else
 * RangeError.
 *
 * @example sampleAutocorrelation([1, 2, 3, 4], 1) // 0.25
 */
export function sampleAutocorrelation(values: readonly number[], h: number): number {
  const T = values.length;
  if (!Number.isInteger(h) || h < 1 || h >= T) throw new RangeError(`sampleAutocorrelation: the lag must be a whole number from 1 to ${T - 1}; got ${h}.`);
  const m = mean(values);
  let num = 0;
  let den = 0;
  for (let t = 0; t < T; t++) {
    den += (values[t] - m) * (values[t] - m);
    if (t >= h) num += (values[t] - m) * (values[t - h] - m);
  }
  if (!(den > 0)) throw new RangeError('sampleAutocorrelation: the series is constant, so its autocorrelation is undefined.');
  return num / den;
}

/**
 * The moment target of one of the moment estimators.
 *
 * With DR_t = d_t / n_t and p = mean(DR_t):
 * - `momentVariance`: target = s2, the sample variance of DR_t (divisor T - 1);
 * - `momentVarianceCorrected`: target = V = (s2 - p (1 - p) h) / (1 - h), h = mean(1 / n_t)
 *   (before the clip at 0, which the estimator applies);
 * - `jointDefault`: target = p2 - p^2, p2 = mean(d_t (d_t - 1) / (n_t (n_t - 1)));
 * - `momentVarianceAutocorrected`: target = s2 / c with
 *   c = 1 - (2 / (T - 1)) sum_(h=1..T-1) (1 - h / T) r^h (sampleVarianceBiasFactor), r the lag-1
 *   sample autocorrelation r_1 of DR_t clipped to [-0.9, 0.9] (AUTOCORRELATION_CLIP): for a
 *   stationary series with autocorrelations rho_h, E[s2] = Var(DR) (1 - (2 / (T - 1)) sum_h
 *   (1 - h / T) rho_h) (Anderson 1971, section 8.2), and rho_h = r^h takes the default rates to
 *   follow an AR(1) with coefficient r_1, so s2 / c estimates Var(DR) without the downward bias of
 *   a persistent series. This follows the idea of Frei & Wunsch (2018), correcting the moments for
 *   the autocorrelation of the default rates; it is not their estimator.
 *
 * Method: two-pass sums in period order (the same arithmetic as the estimators always used).
 *
 * Special cases (kind `undefined`, with the sentence the estimators report): fewer than 2 periods
 * (variance targets; 3 for the autocorrelation); a period with fewer than 2 obligors
 * (jointDefault); p = 0 or p = 1; h = 1 (momentVarianceCorrected). A constant default rate gives
 * the target 0 (momentVarianceAutocorrected; the estimator then says so). Invalid counts throw
 * RangeError naming the period.
 *
 * @example momentTarget('momentVariance', { obligors: [1000, 1000, 1000], defaults: [5, 20, 10] })
 *
 * Reference: Gordy, M. B. (2000), "A comparative anatomy of credit risk models", Journal of
 * Banking & Finance 24:119-149, section 4; de Servigny, A. & Renault, O. (2002), "Default
 * correlation: empirical evidence", Standard & Poor's working paper; Frei, C. & Wunsch, M. (2018),
 * "Moment estimators for autocorrelated time series and their application to default
 * correlations", Journal of Credit Risk 14(1); Anderson, T. W. (1971), The Statistical Analysis
 * of Time Series, Wiley, section 8.2; Bayley, G. V. & Hammersley, J. M. (1946), Supplement to the
 * Journal of the Royal Statistical Society 8:184-197.
 */
export function momentTarget(key: MomentEstimatorKey, panel: Panel): MomentTarget {
  assertPanel(panel, key);
  const T = panel.obligors.length;
  if (key === 'jointDefault') {
    const small = panel.obligors.findIndex((n) => n < 2);
    if (small >= 0) {
      return { kind: 'undefined', reason: `Period ${small + 1} has fewer than 2 obligors, so it has no pairs to count joint defaults in.` };
    }
  } else if (key === 'momentVarianceAutocorrected' && T < 3) {
    return { kind: 'undefined', reason: 'The autocorrelation correction needs at least 3 periods.' };
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
  if (key === 'momentVarianceAutocorrected') {
    const s2 = sampleVariance(dr);
    if (!(s2 > 0)) return { kind: 'target', p, target: 0, statistic: s2 };
    const lag1 = sampleAutocorrelation(dr, 1);
    const lag1Used = Math.min(AUTOCORRELATION_CLIP, Math.max(-AUTOCORRELATION_CLIP, lag1));
    // positive for |r| < 1 (the mean of a variance)
    const factor = sampleVarianceBiasFactor(T, lag1Used);
    return { kind: 'target', p, target: s2 / factor, statistic: s2, correction: { lag1, lag1Used, factor } };
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
