import type { Panel } from '../panel';
import { momentEstimate } from './moment-estimate';
import { CONSTANT_RATE } from './moment-variance';
import { undefinedEstimate, type Estimate } from './types';

/**
 * Method-of-moments estimate of the asset correlation from the default-rate variance, corrected
 * for the autocorrelation of the default rates (key `momentVarianceAutocorrected`).
 *
 * p = mean(DR_t), s2 = sample variance of DR_t (divisor T - 1), r_1 = lag-1 sample
 * autocorrelation of DR_t, c = 1 - (2 / (T (T - 1))) (T - 1) r_1 = 1 - 2 r_1 / T, and rho solves
 * Phi2(k, k; rho) - p^2 = s2 / c (momentTarget). Why: in a stationary series with
 * autocorrelations rho_h the sample variance is biased, E[s2] = Var(DR) (1 - (2 / (T (T - 1)))
 * sum_h (T - h) rho_h), low when the factor is persistent, so momentVariance is biased low too;
 * Frei & Wunsch (2018) correct default-rate moments for this. Here only the first lag enters (the
 * sample autocorrelations of higher lags from 10-25 years are mostly noise), and r_1 is itself
 * biased low in short series, so the correction is partial (the estimator audit under an AR(1)
 * factor measures how much); the AR(1)-factor likelihood (ar1Mle) is the full answer to
 * persistence. Beside momentVariance, not in its place.
 *
 * Method: as momentVariance (solveMomentEquation, Brent's root finder on the cancellation-free
 * excess Phi2 - Phi^2).
 *
 * Special cases (status `undefined`, rho and pd null, with a reason): fewer than 3 periods; no
 * defaults at all (p = 0) or only defaults (p = 1); the same default rate in every period (a
 * target of 0); a target beyond what any rho < 1 gives. Invalid counts throw RangeError naming the
 * period.
 *
 * @example momentVarianceAutocorrected({ obligors: [1000, 1000, 1000, 1000], defaults: [5, 20, 25, 10] }).rho
 *
 * Reference: Frei, C. & Wunsch, M. (2018), "Moment estimators for autocorrelated time series and
 * their application to default correlations", Journal of Credit Risk 14(1):1-29; Anderson, T. W.
 * (1971), The Statistical Analysis of Time Series, Wiley, section 8.2 (the mean of the sample
 * variance of a stationary series); Gordy (2000), Journal of Banking & Finance 24:119-149.
 */
export function momentVarianceAutocorrected(panel: Panel): Estimate {
  return momentEstimate('momentVarianceAutocorrected', panel, {
    atOrBelowZero: () => undefinedEstimate(CONSTANT_RATE),
    tooLarge: (_p, target, maximum) =>
      undefinedEstimate(
        `The autocorrelation-corrected variance ${target.toPrecision(4)} is at least the largest the model allows at this PD (${maximum.toPrecision(4)}).`,
      ),
  });
}
