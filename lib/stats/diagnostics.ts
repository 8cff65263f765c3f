/**
 * Diagnostics of a fitted panel: counts of zero-default and boundary years, the likelihood-ratio
 * test of rho = 0, the implied factor series and its lag-1 autocorrelation, the probability
 * integral transform (PIT) of each year's default count under the fitted binomial mixture and a
 * serial-dependence test on it, quantile exceedances under the fitted Vasicek distribution, and
 * plain-word warnings (fit-warnings.ts). What the fit implies in capital is capital-implications.ts.
 *
 * The fitted values are binomialMle's (p, rho); the interval ends are its profile interval's.
 */
import { autocorrelationThreshold, lag1Autocorrelation, pitSerialTest, type PitSerialTest } from './autocorrelation';
import type { CapitalConvention } from './capital-implications';
import { panelMidPit } from './count-pit';
import { RHO_SEARCH_LIMIT } from './estimators/binomial-mle';
import type { EstimateStatus } from './estimators/types';
import { MIN_IDENTIFIED_PERIODS, PROFILE_DROP_95, SHORT_SERIES_PERIODS, type FitWarning } from './fit-warnings';
import { lrTestRhoZero } from './lr-test';
import { impliedFactor, vasicekQuantile } from './vasicek';

/** What the PIT values are, in words (the output says which PIT it is). */
export const PIT_METHOD =
  'mid-PIT of the default count under the fitted binomial mixture: P(D < d) + P(D = d) / 2 (Czado, Gneiting & Held 2009)';

/** What the binomialMle fit contributes to the diagnostics. */
export interface FittedMle {
  rho: number | null;
  pd: number | null;
  logLik: number | null;
  status: EstimateStatus;
  atBoundary: boolean;
}

/**
 * The AR(1) model's likelihood-ratio test of phi = 0 (intervals/ar1-intervals.ts), a check of
 * serial dependence that works with zero-default years, or why it did not run.
 */
export type PersistenceCheck =
  | { status: 'ok'; phi: number | null; statistic: number; pValue: number }
  | { status: 'not-run'; reason: string };

/** Level below which the LR test of phi = 0 raises the `persistent-factor` warning. */
export const PERSISTENCE_TEST_LEVEL = 0.05;

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
  /** The AR(1) model's test of phi = 0; absent: not run. */
  persistence?: PersistenceCheck;
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
  /** Lag-1 autocorrelation of x_t; null when some x_t is undefined, T < 5 or rho_hat is 0 or undefined (autocorrelationNote says which). */
  lag1Autocorrelation: number | null;
  /** |r1| above this is material: 1.96 / sqrt(T). */
  autocorrelationThreshold: number;
  /** Why lag1Autocorrelation could not be computed, in a sentence; null when it was. */
  autocorrelationNote: string | null;
  /**
   * Mid-PIT of each year's default count under the fitted binomial mixture (PIT_METHOD): granular,
   * so a zero-default year gets P(D = 0) / 2, not 0. Null when binomialMle gives no estimate.
   */
  pit: number[] | null;
  /** PIT_METHOD when pit is given. */
  pitMethod: string | null;
  /** Serial dependence of the PIT sequence (works with zero-default years); null when it could not run (pitSerialNote says why). */
  pitSerialTest: PitSerialTest | null;
  /** Why pitSerialTest is null, in a sentence. */
  pitSerialNote: string | null;
  /**
   * The AR(1) model's likelihood-ratio test of phi = 0 against independent years, with the fitted
   * phi (null at rho = 0, where it is not identified); null when it did not run (lrTestPhi0Note says why).
   */
  lrTestPhi0: { phi: number | null; statistic: number; pValue: number } | null;
  /** Why lrTestPhi0 is null, in a sentence. */
  lrTestPhi0Note: string | null;
  /** Fitted 95% and 99% default-rate quantiles and how many periods exceed each; null as pit. */
  exceedances: { q95: number; q99: number; above95: number; above99: number } | null;
  /** Fitted default-rate quantiles at 0.5%, 2.5%, 25%, 50%, 75%, 97.5%, 99.5% (the bands drawn behind the observed rates); null as pit. */
  bands: Record<BandKey, number> | null;
  /** Why impliedFactor, exceedances and bands (and pit, without an estimate) are null, when they are. */
  fittedNote: string | null;
}

/** Levels of the fitted default-rate bands. */
export const BAND_LEVELS = { q005: 0.005, q025: 0.025, q25: 0.25, q50: 0.5, q75: 0.75, q975: 0.975, q995: 0.995 } as const;
export type BandKey = keyof typeof BAND_LEVELS;

/**
 * The diagnostics block of a fitted panel and its warnings.
 *
 * - counts: zero-default periods (d = 0), all-default periods (d = n), boundary-rate periods
 *   (either);
 * - lrTestRhoZero from l(p_hat, rho_hat) and l*(0) (see lrTestRhoZero);
 * - implied factor x_t = (Phi^-1(p_hat) - sqrt(1 - rho_hat) Phi^-1(DR_t)) / sqrt(rho_hat)
 *   (DESIGN.md) and its lag-1 autocorrelation r1 (when every x_t is finite and T >= 5), material
 *   when |r1| > 1.96 / sqrt(T) (autocorrelationThreshold);
 * - PIT u_t = P(D_t < d_t) + P(D_t = d_t) / 2 under the fitted binomial mixture with the year's
 *   own n_t (count-pit.ts, the mid-PIT for a discrete variable), and pitSerialTest on it, which
 *   runs with zero-default years; the fitted 95% and 99% quantiles of the infinitely granular
 *   Vasicek distribution and the counts of DR_t strictly above them;
 * - the AR(1) model's LR test of phi = 0 when given (`persistence`): a third serial-dependence
 *   check, which needs no finite implied factor.
 *
 * Warnings (codes in WARNING_CODES): rho not identified when no period has a default, every
 * obligor defaulted, T < 5, or the profile is flat (l*(0) and l*(RHO_SEARCH_LIMIT) both within the
 * 95% drop 1.9207 of the maximum, so the data reject no value of rho); short series (5 <= T < 10);
 * zero-default and all-default periods; the maximum at rho = 0 or at the search limit; a
 * non-converged maximisation; material autocorrelation of the implied factor or of the PIT; the LR
 * test of phi = 0 rejecting at 5% (`persistent-factor`).
 *
 * Method: direct evaluation with lib/stats/vasicek.ts; the PIT by count-pit.ts.
 *
 * Special cases: at rho_hat = 0 the fitted default-rate distribution is a point mass at p_hat, so
 * the implied factor and exceedances are null with `fittedNote` saying why (the PIT, under the
 * binomial, is still given); without a likelihood estimate the PIT is null too. Mismatched or
 * invalid counts throw RangeError naming the period.
 *
 * @example panelDiagnostics({ obligors, defaults, mle, logLikAtZero, logLikAtLimit, interval })
 *
 * Reference: Diebold, F. X., Gunther, T. A. & Tay, A. S. (1998), "Evaluating density forecasts",
 * International Economic Review 39:863-883 (PIT); Czado, Gneiting & Held (2009), Biometrics
 * 65:1254-1261 (PIT of counts); Self & Liang (1987) (the LR test at the boundary); Bartlett (1946)
 * (the autocorrelation band).
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
  let autocorrelationNote: string | null = null;
  let pit: number[] | null = null;
  let pitSerial: PitSerialTest | null = null;
  let pitSerialNote: string | null = null;
  let exceedances: Diagnostics['exceedances'] = null;
  let bands: Diagnostics['bands'] = null;
  let fittedNote: string | null = null;
  const fitted = usable && mle.status !== 'not-converged';
  if (!fitted) {
    fittedNote = 'There is no likelihood estimate, so there is no fitted distribution to compare the default rates with.';
    autocorrelationNote = 'Not computed: there is no likelihood estimate.';
    pitSerialNote = 'Not computed: there is no likelihood estimate.';
  } else {
    const rho = mle.rho!;
    const pd = mle.pd!;
    pit = panelMidPit({ obligors, defaults }, pd, rho);
    if (T < 3) {
      pitSerialNote = `Not computed: the serial-dependence test needs at least 3 periods; there ${T === 1 ? 'is 1' : `are ${T}`}.`;
    } else {
      try {
        pitSerial = pitSerialTest(pit);
      } catch (err) {
        if (!(err instanceof RangeError)) throw err;
        pitSerialNote = `Not computed: ${err.message.replace(/^pitSerialTest: /, '')}`;
      }
      if (pitSerial?.material) {
        warnings.push({
          code: 'pit-autocorrelation',
          message: `The PIT values of consecutive years are correlated (lag-1 autocorrelation of their normal scores ${pitSerial.statistic.toFixed(2)}, beyond ±${pitSerial.threshold.toFixed(2)}, the 5% band for independent years). The model treats years as independent: with a persistent factor the intervals are too narrow and rho tends to be underestimated.`,
        });
      }
    }
    if (rho === 0) {
      fittedNote = 'At rho = 0 the fitted default-rate distribution of an infinitely large pool is a point mass at the PD: the implied factor and quantile exceedances are not defined.';
      autocorrelationNote = 'Not computed: at rho = 0 there is no implied factor; the serial-dependence test on the PIT values covers this case.';
    } else {
      impliedFactorSeries = dr.map((x) => (x > 0 && x < 1 ? impliedFactor(x, pd, rho) : null));
      const missing = impliedFactorSeries.filter((x) => x === null).length;
      if (missing > 0) {
        autocorrelationNote = `Not computed: ${missing} of ${T} periods have a default rate of 0% or 100%, where the implied factor is infinite. The serial-dependence test on the PIT values covers every period.`;
      } else if (T < MIN_IDENTIFIED_PERIODS) {
        autocorrelationNote = `Not computed: it needs at least ${MIN_IDENTIFIED_PERIODS} periods.`;
      } else {
        lag1 = lag1Autocorrelation(impliedFactorSeries as number[]);
        if (Math.abs(lag1) > threshold) {
          warnings.push({
            code: 'autocorrelation',
            message: `The implied factor series has lag-1 autocorrelation ${lag1.toFixed(2)}, beyond ±${threshold.toFixed(2)} (1.96/√T, the 5% band for independent years). The model treats years as independent: with a persistent factor the intervals are too narrow and rho tends to be underestimated.`,
          });
        }
      }
      const q95 = vasicekQuantile(0.95, pd, rho);
      const q99 = vasicekQuantile(0.99, pd, rho);
      exceedances = { q95, q99, above95: dr.filter((x) => x > q95).length, above99: dr.filter((x) => x > q99).length };
      bands = Object.fromEntries(
        (Object.keys(BAND_LEVELS) as BandKey[]).map((key) => [key, vasicekQuantile(BAND_LEVELS[key], pd, rho)]),
      ) as Record<BandKey, number>;
    }
  }

  let lrTestPhi0: Diagnostics['lrTestPhi0'] = null;
  let lrTestPhi0Note: string | null = null;
  const persistence = input.persistence ?? { status: 'not-run', reason: 'Not run: the AR(1) model was not among the models of this fit.' };
  if (persistence.status === 'not-run') lrTestPhi0Note = persistence.reason;
  else {
    lrTestPhi0 = { phi: persistence.phi, statistic: persistence.statistic, pValue: persistence.pValue };
    if (persistence.pValue < PERSISTENCE_TEST_LEVEL && persistence.phi !== null) {
      const p = persistence.pValue < 1e-4 ? persistence.pValue.toExponential(1) : persistence.pValue.toFixed(4);
      warnings.push({
        code: 'persistent-factor',
        message:
          persistence.phi > 0
            ? `The AR(1) model finds a persistent factor (phi = ${persistence.phi.toFixed(2)}; the likelihood-ratio test of independent years gives p = ${p}): consecutive years move together, so the independent model's intervals are too narrow and its rho tends to be low. Read the AR(1) model's interval beside them.`
            : `The AR(1) model finds an alternating factor (phi = ${persistence.phi.toFixed(2)}; the likelihood-ratio test of independent years gives p = ${p}): the years are not independent as the standard model assumes. Read the AR(1) model's interval beside the independent one.`,
      });
    }
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
      autocorrelationNote,
      pit,
      pitMethod: pit === null ? null : PIT_METHOD,
      pitSerialTest: pitSerial,
      pitSerialNote,
      lrTestPhi0,
      lrTestPhi0Note,
      exceedances,
      bands,
      fittedNote,
    },
    warnings,
  };
}

