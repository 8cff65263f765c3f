/**
 * Diagnostics of a fitted panel and what the fitted (p, rho) imply: counts of zero-default and
 * boundary years, the likelihood-ratio test of rho = 0, the implied factor series and its lag-1
 * autocorrelation, probability-integral-transform (PIT) values and quantile exceedances under the
 * fitted Vasicek distribution, the 99.9% default-rate quantile, IRB capital at the estimate and at
 * both interval ends, and plain-word warnings.
 *
 * The fitted values are binomialMle's (p, rho); the interval ends are its profile interval's.
 */
import { RHO_SEARCH_LIMIT } from './estimators/binomial-mle';
import type { EstimateStatus } from './estimators/types';
import { capitalRequirement, supervisoryCorrelation, type AssetClass } from './irb';
import { normalCdf } from './normal';
import { defaultCorrelation, impliedFactor, jointDefaultProbability, vasicekCdf, vasicekQuantile } from './vasicek';

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
/** Loss given default used for the capital implications unless the caller gives another. */
export const DEFAULT_LGD = 0.45;

/**
 * Likelihood-ratio test of rho = 0 against rho > 0 for the binomial-mixture model.
 *
 * S = 2 (l(p_hat, rho_hat) - l*(0)), with l*(0) the binomial log-likelihood at the pooled rate.
 * rho = 0 lies on the boundary of the parameter space, so under the null S is asymptotically the
 * 50:50 mixture of chi-square(0) (a point mass at 0) and chi-square(1): for s > 0,
 * P(S >= s) = 0.5 P(chi2_1 >= s) = Phi(-sqrt(s)); at s = 0, P(S >= 0) = 1.
 *
 * Method: direct; Phi(-sqrt(s)) by normalCdf (accurate far into the tail, so tiny p-values keep
 * their relative accuracy).
 *
 * Special cases: a statistic below 0 by rounding (|S| <= 1e-9 |l|) is set to 0; a clearly
 * negative statistic (the reported maximum is beaten at rho = 0) or non-finite input throws
 * RangeError.
 *
 * @example lrTestRhoZero(-33.785195, -55.1) // { statistic: 42.63..., pValue: ~3e-11 }
 *
 * Reference: Self, S. G. & Liang, K.-Y. (1987), "Asymptotic properties of maximum likelihood
 * estimators and likelihood ratio tests under nonstandard conditions", JASA 82:605-610, case 5;
 * Chernoff, H. (1954), Annals of Mathematical Statistics 25:573-578.
 */
export function lrTestRhoZero(logLikAtEstimate: number, logLikAtZero: number): { statistic: number; pValue: number } {
  if (!Number.isFinite(logLikAtEstimate) || !Number.isFinite(logLikAtZero)) {
    throw new RangeError(
      `lrTestRhoZero: both log-likelihoods must be finite numbers; got ${logLikAtEstimate} and ${logLikAtZero}.`,
    );
  }
  let statistic = 2 * (logLikAtEstimate - logLikAtZero);
  if (statistic < 0) {
    if (-statistic <= 1e-9 * Math.max(1, Math.abs(logLikAtZero))) statistic = 0;
    else {
      throw new RangeError(
        `lrTestRhoZero: the log-likelihood at rho = 0 (${logLikAtZero}) exceeds the one at the estimate (${logLikAtEstimate}); the estimate is not a maximum.`,
      );
    }
  }
  return { statistic, pValue: statistic === 0 ? 1 : normalCdf(-Math.sqrt(statistic)) };
}

/**
 * Lag-1 sample autocorrelation of a series.
 *
 * r1 = sum_{t=2..T} (x_t - m)(x_{t-1} - m) / sum_{t=1..T} (x_t - m)^2,  m = mean(x).
 *
 * Method: two-pass sums. This is the standard estimator of Box & Jenkins (the one plotted in
 * correlograms), biased towards -1/T in short series.
 *
 * Special cases: fewer than 3 values or a constant series throw RangeError; non-finite values
 * throw RangeError naming the position.
 *
 * @example lag1Autocorrelation([1, 2, 3, 4]) // 0.25
 *
 * Reference: Box, G. E. P. & Jenkins, G. M. (1976), Time Series Analysis: Forecasting and
 * Control, eq. (2.1.12); Bartlett, M. S. (1946), JRSS Supplement 8:27-41 (its variance ~ 1/T).
 */
export function lag1Autocorrelation(values: readonly number[]): number {
  const T = values.length;
  if (T < 3) throw new RangeError(`lag1Autocorrelation: need at least 3 values; got ${T}.`);
  let m = 0;
  for (let t = 0; t < T; t++) {
    if (!Number.isFinite(values[t])) {
      throw new RangeError(`lag1Autocorrelation: value ${t + 1} is ${values[t]}; every value must be a finite number.`);
    }
    m += values[t];
  }
  m /= T;
  let num = 0;
  let den = 0;
  for (let t = 0; t < T; t++) {
    const c = values[t] - m;
    den += c * c;
    if (t > 0) num += c * (values[t - 1] - m);
  }
  if (!(den > 0)) throw new RangeError('lag1Autocorrelation: the series is constant, so its autocorrelation is undefined.');
  return num / den;
}

/**
 * Threshold above which |r1| of the implied factor series is called material:
 * 1.96 / sqrt(T), the approximate two-sided 5% critical value of a lag-1 sample autocorrelation
 * of T independent values (Bartlett 1946: variance about 1/T). Why it matters: the likelihood,
 * the intervals and the bootstrap all treat years as independent draws of the factor; a
 * persistent factor makes the intervals too narrow and biases the estimate of rho downwards.
 * At T = 20 the threshold is 0.44, at T = 10 it is 0.62.
 *
 * Special cases: T must be a positive whole number, otherwise RangeError.
 *
 * @example autocorrelationThreshold(20) // 0.4383
 *
 * Reference: Bartlett, M. S. (1946), "On the theoretical specification and sampling properties of
 * autocorrelated time-series", JRSS Supplement 8:27-41; Box & Jenkins (1976), section 2.1.6.
 */
export function autocorrelationThreshold(T: number): number {
  if (!(Number.isInteger(T) && T >= 1)) throw new RangeError(`autocorrelationThreshold: T must be a positive whole number; got ${T}.`);
  return 1.96 / Math.sqrt(T);
}

/** What the binomialMle fit contributes to the diagnostics. */
export interface FittedMle {
  rho: number | null;
  pd: number | null;
  logLik: number | null;
  status: EstimateStatus;
  atBoundary: boolean;
}

/** Inputs of {@link panelDiagnostics}. */
export interface DiagnosticsInput {
  obligors: readonly number[];
  defaults: readonly number[];
  mle: FittedMle;
  /** Profile log-likelihood l*(0) (the binomial log-likelihood at the pooled rate); null when the MLE is undefined. */
  logLikAtZero: number | null;
  /** Profile log-likelihood l*(RHO_SEARCH_LIMIT); null when the MLE is undefined. */
  logLikAtLimit: number | null;
  /** Profile interval ends at the requested level (null when there is none). */
  interval: { lower: number; upper: number } | null;
  /** Capital convention; see {@link CapitalConvention}. */
  capital?: Partial<CapitalConvention>;
}

/** How capital is computed in the implications block. */
export interface CapitalConvention {
  /** Loss given default (default 0.45). */
  lgd: number;
  /** Effective maturity in years for the maturity adjustment, or null for none (default null). */
  maturityYears: number | null;
  /** Asset class for the supervisory comparison, or null for none. */
  assetClass: AssetClass | null;
  /** Annual turnover in EUR millions (SME size adjustment of 'sme-corporate'). */
  turnoverMillions: number | null;
}

/** The diagnostics block of a segment fit. */
export interface Diagnostics {
  /** Periods with d_t = 0. */
  zeroDefaultPeriods: number;
  /** Periods with d_t = n_t. */
  allDefaultPeriods: number;
  /** Periods whose default rate is 0 or 1 (where Phi^-1(DR) is infinite). */
  boundaryRatePeriods: number;
  /** LR test of rho = 0 (null when binomialMle is undefined or did not converge). */
  lrTestRhoZero: { statistic: number; pValue: number } | null;
  /** x_t = (k - sqrt(1 - rho) Phi^-1(DR_t)) / sqrt(rho) at the fitted values; null entries at DR 0 or 1; null when rho_hat is 0 or undefined. */
  impliedFactor: (number | null)[] | null;
  /** Lag-1 autocorrelation of x_t; null when some x_t is undefined, T < 5 or rho_hat is 0 or undefined. */
  lag1Autocorrelation: number | null;
  /** |r1| above this is material: 1.96 / sqrt(T). */
  autocorrelationThreshold: number;
  /** F(DR_t) under the fitted Vasicek distribution; null when rho_hat is 0 or undefined. */
  pit: number[] | null;
  /** Fitted 95% and 99% default-rate quantiles and how many periods exceed each; null as pit. */
  exceedances: { q95: number; q99: number; above95: number; above99: number } | null;
  /** Fitted default-rate quantiles at 0.5%, 2.5%, 25%, 50%, 75%, 97.5%, 99.5% (the bands drawn behind the observed rates); null as pit. */
  bands: Record<BandKey, number> | null;
  /** Why impliedFactor, pit and exceedances are null, when they are. */
  fittedNote: string | null;
}

/** Levels of the fitted default-rate bands. */
export const BAND_LEVELS = { q005: 0.005, q025: 0.025, q25: 0.25, q50: 0.5, q75: 0.75, q975: 0.975, q995: 0.995 } as const;
export type BandKey = keyof typeof BAND_LEVELS;

/** The implications block: what the fitted (p, rho) mean. */
export interface Implications {
  pd: number;
  rho: number;
  /** 99.9% quantile of the fitted Vasicek default-rate distribution. */
  quantile999: number;
  lgd: number;
  maturityYears: number | null;
  /** The capital convention in words. */
  convention: string;
  /** IRB capital K per unit of exposure at the fitted PD and rho = estimate / interval ends. */
  capital: { atEstimate: number; atLower: number | null; atUpper: number | null };
  /** Supervisory correlation of the asset class at the fitted PD and the capital it implies. */
  supervisory: { assetClass: AssetClass; rho: number; capital: number } | null;
  /** Two obligors with the fitted PD: joint default probability Phi2(k, k; rho), p^2 when independent, default correlation. */
  pair: { joint: number; independent: number; defaultCorrelation: number };
}

/**
 * The diagnostics block of a fitted panel and its warnings.
 *
 * - counts: zero-default periods (d = 0), all-default periods (d = n), boundary-rate periods
 *   (either);
 * - lrTestRhoZero from l(p_hat, rho_hat) and l*(0) (see lrTestRhoZero);
 * - implied factor x_t = (Phi^-1(p_hat) - sqrt(1 - rho_hat) Phi^-1(DR_t)) / sqrt(rho_hat)
 *   (DESIGN.md) and its lag-1 autocorrelation r1 (when every x_t is finite and T >= 5), material
 *   when |r1| > 1.96 / sqrt(T) (autocorrelationThreshold);
 * - PIT u_t = F(DR_t; p_hat, rho_hat), F the Vasicek default-rate CDF; the fitted 95% and 99%
 *   quantiles and the counts of DR_t strictly above them.
 *
 * Warnings (codes in WARNING_CODES): rho not identified when no period has a default, every
 * obligor defaulted, T < 5, or the profile is flat (l*(0) and l*(RHO_SEARCH_LIMIT) both within the
 * 95% drop 1.9207 of the maximum, so the data reject no value of rho); short series (5 <= T < 10);
 * zero-default and all-default periods; the maximum at rho = 0 or at the search limit; a
 * non-converged maximisation; material autocorrelation.
 *
 * Method: direct evaluation with lib/stats/vasicek.ts.
 *
 * Special cases: at rho_hat = 0 the fitted distribution is a point mass at p_hat, so the implied
 * factor, PIT and exceedances are null with `fittedNote` saying why; likewise when binomialMle is
 * undefined. Mismatched or invalid counts throw RangeError naming the period.
 *
 * @example panelDiagnostics({ obligors, defaults, mle, logLikAtZero, logLikAtLimit, interval })
 *
 * Reference: Diebold, F. X., Gunther, T. A. & Tay, A. S. (1998), "Evaluating density forecasts",
 * International Economic Review 39:863-883 (PIT); Self & Liang (1987) (the LR test at the
 * boundary); Bartlett (1946) (the autocorrelation band).
 */
export function panelDiagnostics(input: DiagnosticsInput): { diagnostics: Diagnostics; warnings: FitWarning[] } {
  const { obligors, defaults, mle } = input;
  const T = obligors.length;
  if (defaults.length !== T || T === 0) {
    throw new RangeError(`panelDiagnostics: obligors has ${T} periods and defaults ${defaults.length}; give one of each per period.`);
  }
  for (let t = 0; t < T; t++) {
    if (!Number.isSafeInteger(obligors[t]) || obligors[t] < 1 || !Number.isSafeInteger(defaults[t]) || defaults[t] < 0 || defaults[t] > obligors[t]) {
      throw new RangeError(
        `panelDiagnostics: period ${t + 1} has obligors = ${obligors[t]} and defaults = ${defaults[t]}; need whole numbers with 0 <= defaults <= obligors and obligors >= 1.`,
      );
    }
  }
  const warnings: FitWarning[] = [];
  const zeroDefaultPeriods = defaults.filter((d) => d === 0).length;
  const allDefaultPeriods = defaults.filter((d, t) => d === obligors[t]).length;
  const dr = obligors.map((n, t) => defaults[t] / n);

  if (zeroDefaultPeriods === T) {
    warnings.push({
      code: 'not-identified-no-defaults',
      message: 'No period of this segment has a default: neither the PD nor the correlation can be estimated from it.',
    });
  } else if (zeroDefaultPeriods > 0) {
    warnings.push({
      code: 'zero-default-periods',
      message: `${zeroDefaultPeriods} of ${T} periods have no default. The closed-form Vasicek estimator is undefined for such data, the implied factor is infinite in those periods, and the moment estimators lose precision; the likelihood estimator uses them correctly.`,
    });
  }
  if (allDefaultPeriods === T) {
    warnings.push({ code: 'not-identified-all-defaults', message: 'Every obligor defaulted in every period: the correlation cannot be estimated.' });
  } else if (allDefaultPeriods > 0) {
    warnings.push({
      code: 'all-default-periods',
      message: `${allDefaultPeriods} of ${T} periods have every obligor in default; check the data, such periods are rare in real portfolios.`,
    });
  }
  if (T < MIN_IDENTIFIED_PERIODS) {
    warnings.push({
      code: 'not-identified-short',
      message: `Only ${T} period${T === 1 ? '' : 's'}: with fewer than ${MIN_IDENTIFIED_PERIODS} the correlation is not identified in practice; do not rely on these numbers.`,
    });
  } else if (T < SHORT_SERIES_PERIODS) {
    warnings.push({
      code: 'short-series',
      message: `Only ${T} periods: with fewer than ${SHORT_SERIES_PERIODS} the intervals are very wide and every estimator of rho is biased low.`,
    });
  }

  const usable = mle.rho !== null && mle.pd !== null && mle.logLik !== null && mle.status !== 'undefined';
  if (mle.status === 'not-converged') {
    warnings.push({
      code: 'mle-not-converged',
      message: 'The likelihood maximisation did not meet its tolerance: the likelihood estimate and its intervals are not reported.',
    });
  }
  let lrTest: Diagnostics['lrTestRhoZero'] = null;
  if (usable && mle.status !== 'not-converged' && input.logLikAtZero !== null) {
    lrTest = lrTestRhoZero(mle.logLik!, input.logLikAtZero);
    if (
      input.logLikAtLimit !== null &&
      mle.logLik! - input.logLikAtZero < PROFILE_DROP_95 &&
      mle.logLik! - input.logLikAtLimit < PROFILE_DROP_95
    ) {
      warnings.push({
        code: 'not-identified-flat',
        message: `The profile likelihood is flat: every rho from 0 to ${RHO_SEARCH_LIMIT} is within the 95% cut-off of the maximum, so the data do not pin the correlation down.`,
      });
    }
  }
  if (usable && mle.status !== 'not-converged' && mle.atBoundary) {
    warnings.push({
      code: 'at-boundary',
      message: 'The likelihood is highest at rho = 0: these data show no evidence of correlation, which is not evidence of none. There is no Wald interval at the boundary; the profile interval is the one to read.',
    });
  }
  if (mle.status === 'clipped') {
    warnings.push({
      code: 'at-search-limit',
      message: `The likelihood is highest at the search limit rho = ${RHO_SEARCH_LIMIT}: the data cannot pin the correlation down.`,
    });
  }

  const threshold = autocorrelationThreshold(T);
  let impliedFactorSeries: (number | null)[] | null = null;
  let lag1: number | null = null;
  let pit: number[] | null = null;
  let exceedances: Diagnostics['exceedances'] = null;
  let bands: Diagnostics['bands'] = null;
  let fittedNote: string | null = null;
  if (!usable || mle.status === 'not-converged') {
    fittedNote = 'There is no likelihood estimate, so there is no fitted distribution to compare the default rates with.';
  } else if (mle.rho === 0) {
    fittedNote = 'At rho = 0 the fitted default-rate distribution is a point mass at the PD: the implied factor, PIT values and quantile exceedances are not defined.';
  } else {
    const rho = mle.rho!;
    const pd = mle.pd!;
    impliedFactorSeries = dr.map((x) => (x > 0 && x < 1 ? impliedFactor(x, pd, rho) : null));
    const finite = impliedFactorSeries.every((x) => x !== null);
    if (finite && T >= MIN_IDENTIFIED_PERIODS) {
      lag1 = lag1Autocorrelation(impliedFactorSeries as number[]);
      if (Math.abs(lag1) > threshold) {
        warnings.push({
          code: 'autocorrelation',
          message: `The implied factor series has lag-1 autocorrelation ${lag1.toFixed(2)}, beyond ±${threshold.toFixed(2)} (1.96/√T, the 5% band for independent years). The model treats years as independent: with a persistent factor the intervals are too narrow and rho tends to be underestimated.`,
        });
      }
    }
    pit = dr.map((x) => vasicekCdf(x, pd, rho));
    const q95 = vasicekQuantile(0.95, pd, rho);
    const q99 = vasicekQuantile(0.99, pd, rho);
    exceedances = { q95, q99, above95: dr.filter((x) => x > q95).length, above99: dr.filter((x) => x > q99).length };
    bands = Object.fromEntries(
      (Object.keys(BAND_LEVELS) as BandKey[]).map((key) => [key, vasicekQuantile(BAND_LEVELS[key], pd, rho)]),
    ) as Record<BandKey, number>;
  }

  return {
    diagnostics: {
      zeroDefaultPeriods,
      allDefaultPeriods,
      boundaryRatePeriods: dr.filter((x) => x === 0 || x === 1).length,
      lrTestRhoZero: lrTest,
      impliedFactor: impliedFactorSeries,
      lag1Autocorrelation: lag1,
      autocorrelationThreshold: threshold,
      pit,
      exceedances,
      bands,
      fittedNote,
    },
    warnings,
  };
}

/**
 * What a fitted (p, rho) implies: the 99.9% default-rate quantile and IRB capital.
 *
 * quantile999 = Phi((Phi^-1(p) + sqrt(rho) Phi^-1(0.999)) / sqrt(1 - rho)) (Vasicek 2002);
 * K(r) = LGD [Phi((Phi^-1(p) + sqrt(r) Phi^-1(0.999)) / sqrt(1 - r)) - p] x MA (BCBS 2006
 * para 272) at r = rho_hat and at both interval ends, per unit of exposure at default, with the
 * fitted PD (not floored), LGD 0.45 unless given, and the maturity adjustment only when a
 * maturity is given. When an asset class is given, its supervisory correlation at the fitted PD
 * (BCBS 2006 paras 272-273, 328-330) and the capital it implies under the same convention. And
 * for two obligors with the fitted PD: joint default probability Phi2(k, k; rho), p^2, and the
 * default correlation (Phi2 - p^2) / (p (1 - p)) (DESIGN.md, "The model").
 *
 * Method: capitalRequirement and supervisoryCorrelation of lib/stats/irb.ts.
 *
 * Special cases: an interval end of 0 gives K = 0; PD outside (0, 1), rho outside [0, 1) or an
 * interval end outside [0, 1) throw RangeError (from irb.ts).
 *
 * @example capitalImplications(0.013307, 0.037091, { lower: 0.0118, upper: 0.1147 })
 *
 * Reference: BCBS (2006), International Convergence of Capital Measurement and Capital
 * Standards, paras 272-273 and 328-330; BCBS (2005), An Explanatory Note on the Basel II IRB Risk
 * Weight Functions; Vasicek, O. (2002), Risk 15(12), eq. (6).
 */
export function capitalImplications(
  pd: number,
  rho: number,
  interval: { lower: number; upper: number } | null,
  convention: Partial<CapitalConvention> = {},
): Implications {
  const lgd = convention.lgd ?? DEFAULT_LGD;
  const maturityYears = convention.maturityYears ?? null;
  const assetClass = convention.assetClass ?? null;
  const capitalAt = (r: number) =>
    // K = 0 at r = 0 exactly (irb.ts documents this; its formula leaves a rounding residue of
    // Phi(Phi^-1(pd)) - pd there, ~1e-18, which would print as "-0.00%").
    r === 0 ? 0 : capitalRequirement(maturityYears === null ? { pd, lgd, rho: r } : { pd, lgd, rho: r, maturityYears });
  const words =
    `IRB capital K per unit of exposure at default (BCBS 2006 para 272): 99.9% factor quantile, fitted PD ${pd.toPrecision(4)} (no PD floor), ` +
    `LGD ${lgd}, ${maturityYears === null ? 'no maturity adjustment' : `maturity adjustment at M = ${maturityYears} years`}; ` +
    'risk weight = 12.5 x K without the 1.06 scaling factor (2017 convention).';
  let supervisory: Implications['supervisory'] = null;
  if (assetClass !== null) {
    const r = supervisoryCorrelation(
      assetClass,
      pd,
      convention.turnoverMillions === null || convention.turnoverMillions === undefined ? {} : { turnoverMillions: convention.turnoverMillions },
    );
    supervisory = { assetClass, rho: r, capital: capitalAt(r) };
  }
  return {
    pd,
    rho,
    quantile999: vasicekQuantile(0.999, pd, rho),
    lgd,
    maturityYears,
    convention: words,
    capital: {
      atEstimate: capitalAt(rho),
      atLower: interval ? capitalAt(interval.lower) : null,
      atUpper: interval ? capitalAt(interval.upper) : null,
    },
    supervisory,
    pair: { joint: jointDefaultProbability(pd, pd, rho), independent: pd * pd, defaultCorrelation: defaultCorrelation(pd, pd, rho) },
  };
}
