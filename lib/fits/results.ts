/**
 * The results of a fit run, per segment, as stored in fit_runs.results and answered by
 * GET /api/fits/:id. The core is the per-segment shape of the engine CLI (issue 3): segment, T,
 * periods, estimates of the five estimators with intervals, warnings, timing. The review screens
 * need a little more, kept in the same object under plain names: the panel itself, the profile
 * curve, diagnostics, what the estimate means, the estimator audit and the window comparison.
 */
import type { AssetClass } from '@/db/schema';

export type EstimatorKey = 'binomialMle' | 'vasicekMle' | 'momentVariance' | 'momentVarianceCorrected' | 'jointDefault';

export const ESTIMATOR_ORDER: readonly EstimatorKey[] = [
  'binomialMle',
  'vasicekMle',
  'momentVariance',
  'momentVarianceCorrected',
  'jointDefault',
];

export const ESTIMATOR_NAMES: Record<EstimatorKey, string> = {
  binomialMle: 'Binomial-mixture ML',
  vasicekMle: 'Vasicek closed-form ML',
  momentVariance: 'Moments (DR variance)',
  momentVarianceCorrected: 'Moments, finite-cohort corrected',
  jointDefault: 'Joint-default moments',
};

export type EstimateStatus = 'ok' | 'clipped' | 'undefined' | 'not-converged';

export type IntervalResult = { level: number; lower: number; upper: number };

export type EstimateResult = { rho: number | null; pd: number | null; status: EstimateStatus; reason?: string };

export type BinomialMleResultDto = EstimateResult & {
  logLik: number | null;
  atBoundary: boolean;
  intervals: {
    profile: IntervalResult | null;
    wald: (IntervalResult & { se: number }) | null;
    bootstrap: (IntervalResult & { bias: number; replications: number; seed: number; failed: number }) | null;
  };
};

export type Warning = { code: string; message: string };

export type AuditRow = {
  estimator: EstimatorKey;
  /** Replications where the estimator gave a value. */
  defined: number;
  bias: number | null;
  rmse: number | null;
  /** Share of replications whose profile interval covered the true rho (binomialMle only). */
  profileCoverage: number | null;
};

export type WindowResult = {
  label: string;
  periods: string[];
  T: number;
  binomialMle: { rho: number | null; pd: number | null; lower: number | null; upper: number | null; status: EstimateStatus };
  momentVarianceCorrected: number | null;
  jointDefault: number | null;
};

export type SegmentResult = {
  segment: string;
  T: number;
  periods: string[];
  estimates: {
    binomialMle: BinomialMleResultDto;
    vasicekMle: EstimateResult;
    momentVariance: EstimateResult;
    momentVarianceCorrected: EstimateResult;
    jointDefault: EstimateResult;
  };
  warnings: Warning[];
  timing: { ms: number };
  /** The estimator the review leads with (binomialMle unless it is undefined). */
  chosen: EstimatorKey;
  assetClass: AssetClass;
  panel: { obligors: number[]; defaults: number[] };
  profile: { points: { rho: number; logLik: number }[]; cutoff: number; maxLogLik: number } | null;
  diagnostics: {
    zeroDefaultPeriods: number;
    /** Likelihood-ratio test of rho = 0 (50:50 mixture of chi-square 0 and 1 under the null). */
    lrTestRhoZero: { statistic: number; pValue: number } | null;
    /** Implied factor x_t; null where the default rate is 0 or 1. */
    impliedFactor: (number | null)[] | null;
    lag1Autocorrelation: number | null;
    /** Probability-integral-transform value of each period's default rate under the fitted model. */
    pit: number[] | null;
    /** Fitted Vasicek default-rate quantiles (the same for every period). */
    bands: Record<'q005' | 'q025' | 'q25' | 'q50' | 'q75' | 'q975' | 'q995', number> | null;
    exceed95: number | null;
    exceed99: number | null;
  };
  implications: {
    pd: number;
    rho: number;
    quantile999: number;
    lgd: number;
    maturityYears: number | null;
    capital: { atEstimate: number; atLower: number | null; atUpper: number | null };
    supervisory: { assetClass: AssetClass; rho: number; capital: number } | null;
    pair: { joint: number; independent: number; defaultCorrelation: number };
  } | null;
  audit: { replications: number; seed: number; truth: { pd: number; rho: number }; rows: AuditRow[]; failed: number } | null;
  windows: WindowResult[];
};

export type FitResults = { engine: { version: string }; segments: SegmentResult[] };
