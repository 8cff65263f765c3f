/**
 * The warnings of a segment fit (stable codes the review screens key on) and the thresholds at
 * which the diagnostics raise them.
 */

/** A warning about a fit, in plain words. */
export interface FitWarning {
  code: WarningCode;
  message: string;
}

/** Stable warning codes (the review screens key on them). */
export const WARNING_CODES = [
  'not-identified-no-defaults',
  'not-identified-all-defaults',
  'not-identified-short',
  'not-identified-flat',
  'short-series',
  'zero-default-periods',
  'all-default-periods',
  'at-boundary',
  'at-search-limit',
  'mle-not-converged',
  'autocorrelation',
  'pit-autocorrelation',
  'persistent-factor',
  'structural-break',
  'integration-tolerance',
  'bootstrap-failures',
  'bootstrap-unavailable',
  'audit-unavailable',
] as const;
export type WarningCode = (typeof WARNING_CODES)[number];

/** Fewer periods than this: rho is not identified (warning `not-identified-short`). */
export const MIN_IDENTIFIED_PERIODS = 5;
/** Fewer periods than this (and at least MIN_IDENTIFIED_PERIODS): warning `short-series`. */
export const SHORT_SERIES_PERIODS = 10;
/** chi2_1(0.95) / 2: the drop of the 95% profile interval, used for the flat-profile check. */
export const PROFILE_DROP_95 = 1.9207294103470195;

