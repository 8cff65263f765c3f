/**
 * The likelihood-ratio test of rho = 0 (independence) for the binomial-mixture model, whose null
 * lies on the boundary of the parameter space.
 */
import { normalCdf } from './normal';

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

