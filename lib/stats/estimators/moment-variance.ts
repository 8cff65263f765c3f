import type { Panel } from '../panel';
import { momentEstimate } from './moment-estimate';
import { undefinedEstimate, type Estimate } from './types';

export { sampleVariance } from './moment-target';

/** The sentence of a variance target of 0 (momentVariance and momentVarianceAutocorrected). */
export const CONSTANT_RATE = 'The default rate is the same in every period: the variance target is 0, which the equation cannot use.';

/**
 * Method-of-moments estimate of the asset correlation from the variance of the default rate.
 *
 * p = mean(DR_t), s2 = (1 / (T - 1)) sum (DR_t - p)^2, and rho solves Phi2(k, k; rho) - p^2 = s2
 * with k = Phi^-1(p) (DESIGN.md key `momentVariance`). Ignores the binomial noise of finite
 * cohorts, so it is biased upwards for small cohorts (see momentVarianceCorrected).
 *
 * Method: momentEstimate: solveMomentEquation (Brent's root finder on the cancellation-free excess
 * Phi2 - Phi^2); the moment equation holds to ~1e-14 relative at the returned rho.
 *
 * Special cases (status `undefined`, rho and pd null, with a reason): fewer than 2 periods; no
 * defaults at all (p = 0) or only defaults (p = 1); no variation between periods (s2 = 0, a
 * target at zero); s2 >= p(1 - p), beyond what any rho < 1 produces. Invalid counts throw
 * RangeError naming the period.
 *
 * @example momentVariance({ obligors: [1000, 1000, 1000], defaults: [5, 20, 10] }).rho
 *
 * Reference: Gordy, M. B. (2000), "A comparative anatomy of credit risk models", Journal of
 * Banking & Finance 24:119-149; Vasicek, O. (2002), "The distribution of loan portfolio value",
 * Risk 15(12):160-162.
 */
export function momentVariance(panel: Panel): Estimate {
  return momentEstimate('momentVariance', panel, {
    atOrBelowZero: () => undefinedEstimate(CONSTANT_RATE),
    tooLarge: (_p, s2, maximum) =>
      undefinedEstimate(`The default-rate variance ${s2.toPrecision(4)} is at least the largest the model allows at this PD (${maximum.toPrecision(4)}).`),
  });
}
