/**
 * Shared result types of the correlation estimators (DESIGN.md, "Estimators").
 */

/**
 * How an estimate came out:
 * - `ok`: the definition gave a value;
 * - `clipped`: the definition clips (the corrected moment target at 0, or the MLE at the upper
 *   search limit) and the value is the clip point;
 * - `undefined`: the definition gives no value for these data (`rho` and `pd` are null and
 *   `reason` says why);
 * - `not-converged`: an iterative step did not meet its tolerance (the value is the last iterate,
 *   reported so that it can be inspected, and must not be used).
 */
export type EstimateStatus = 'ok' | 'clipped' | 'undefined' | 'not-converged';

/** Result of every estimator: rho and the PD it was estimated with. */
export interface Estimate {
  rho: number | null;
  pd: number | null;
  status: EstimateStatus;
  /** A sentence for anything but `ok`. */
  reason?: string;
}

/** The five estimators of DESIGN.md (the independent-factor model), in DESIGN.md's order. */
export const INDEPENDENT_ESTIMATOR_KEYS = [
  'binomialMle',
  'vasicekMle',
  'momentVariance',
  'momentVarianceCorrected',
  'jointDefault',
] as const;
export type IndependentEstimatorKey = (typeof INDEPENDENT_ESTIMATOR_KEYS)[number];

/** The estimators that allow for a persistent factor (the AR(1) model). */
export const PERSISTENT_ESTIMATOR_KEYS = ['momentVarianceAutocorrected', 'ar1Mle'] as const;
export type PersistentEstimatorKey = (typeof PERSISTENT_ESTIMATOR_KEYS)[number];

/**
 * Every estimator key, in display order: the autocorrelation-corrected variance moments beside the
 * plain ones, the AR(1)-factor likelihood last.
 */
export const ESTIMATOR_KEYS = [
  'binomialMle',
  'vasicekMle',
  'momentVariance',
  'momentVarianceCorrected',
  'momentVarianceAutocorrected',
  'jointDefault',
  'ar1Mle',
] as const;
export type EstimatorKey = (typeof ESTIMATOR_KEYS)[number];

/**
 * The readable name of each estimator, by key: the one place every screen, the CLI's text and the
 * API's readable names take them from (the keys stay the names in JSON and CSV).
 */
export const ESTIMATOR_LABELS: Readonly<Record<EstimatorKey, string>> = {
  binomialMle: 'Binomial-mixture maximum likelihood',
  vasicekMle: 'Vasicek closed-form maximum likelihood',
  momentVariance: 'Moments of the default-rate variance',
  momentVarianceCorrected: 'Moments, finite-cohort corrected',
  momentVarianceAutocorrected: 'Moments, autocorrelation corrected',
  jointDefault: 'Joint-default-probability moments',
  ar1Mle: 'Maximum likelihood with a persistent (AR(1)) factor',
};

/**
 * The readable names of the other mixing laws' estimators (their estimates under a segment's
 * `estimates`, lib/stats/mixing-laws-block.ts), by key. Only the t copula's can be drafted as a value.
 */
export const MIXING_LAW_ESTIMATOR_LABELS: Readonly<Record<'tCopula' | 'betaMixing' | 'logitNormal', string>> = {
  tCopula: 'Student-t copula maximum likelihood',
  betaMixing: 'Beta mixing maximum likelihood',
  logitNormal: 'Logit-normal mixing maximum likelihood',
};

/** The readable name of an estimator key as stored anywhere (a key without a label is shown as it is). */
export function estimatorLabel(key: string): string {
  return (ESTIMATOR_LABELS as Record<string, string>)[key] ?? (MIXING_LAW_ESTIMATOR_LABELS as Record<string, string>)[key] ?? key;
}

/** An undefined estimate with its reason. */
export function undefinedEstimate(reason: string): Estimate {
  return { rho: null, pd: null, status: 'undefined', reason };
}
