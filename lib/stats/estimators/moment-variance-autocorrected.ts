import type { Panel } from '../panel';
import { momentEstimate } from './moment-estimate';
import { CONSTANT_RATE } from './moment-variance';
import { undefinedEstimate, type Estimate } from './types';

/**
 * Method-of-moments estimate of the asset correlation from the default-rate variance, corrected
 * for the autocorrelation of the default rates (key `momentVarianceAutocorrected`).
 *
 * p = mean(DR_t), s2 = sample variance of DR_t (divisor T - 1), r = r_1, the lag-1 sample
 * autocorrelation of DR_t, clipped to [-0.9, 0.9], and
 *
 *   c = 1 - (2 / (T - 1)) sum_(h=1..T-1) (1 - h / T) r^h,
 *
 * then rho solves Phi2(k, k; rho) - p^2 = s2 / c (momentTarget). Why: a stationary series with
 * autocorrelations rho_h has E[s2] = Var(DR) (1 - (2 / (T - 1)) sum_h (1 - h / T) rho_h) (Anderson
 * 1971, section 8.2; Bayley & Hammersley 1946), so with a persistent factor the sample variance,
 * and momentVariance with it, is biased low. This estimator takes the default rates to follow an
 * AR(1) with coefficient r_1 (rho_h = r_1^h) and divides s2 by that bias factor
 * (sampleVarianceBiasFactor). It follows the idea of Frei & Wunsch (2018), correcting default-rate
 * moments for autocorrelation, but is not their estimator (what is implemented is exactly the
 * above). r_1 is itself biased low in short series (by about (1 + 4 r) / T), so the correction is
 * partial; the estimator audit under an AR(1) factor measures how much, and the AR(1)-factor
 * likelihood (ar1Mle) is the full answer to persistence. Beside momentVariance, not in its place.
 *
 * Method: momentEstimate, as momentVariance (Brent's root finder on the cancellation-free excess
 * Phi2 - Phi^2); c by its finite sum.
 *
 * Special cases (status `undefined`, rho and pd null, with a reason): fewer than 3 periods; no
 * defaults at all (p = 0) or only defaults (p = 1); the same default rate in every period (a
 * target of 0); a target beyond what any rho < 1 gives. |r_1| above 0.9 is used as 0.9 (the value
 * used is in momentTarget's `correction`). Invalid counts throw RangeError naming the period.
 *
 * @example momentVarianceAutocorrected({ obligors: [1000, 1000, 1000, 1000], defaults: [5, 20, 25, 10] }).rho
 *
 * Reference: Frei, C. & Wunsch, M. (2018), "Moment estimators for autocorrelated time series and
 * their application to default correlations", Journal of Credit Risk 14(1):1-29 (the idea);
 * Anderson, T. W. (1971), The Statistical Analysis of Time Series, Wiley, section 8.2 (the mean of
 * the sample variance of a stationary series); Bayley, G. V. & Hammersley, J. M. (1946), "The
 * effective number of independent observations in an autocorrelated time series", Supplement to
 * the JRSS 8:184-197; Gordy (2000), Journal of Banking & Finance 24:119-149.
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
