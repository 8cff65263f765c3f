import type { Panel } from '../panel';
import { momentEstimate } from './moment-estimate';
import { undefinedEstimate, type Estimate } from './types';

/**
 * Joint-default-probability moment estimate of the asset correlation.
 *
 * p = mean(DR_t), p2 = mean(d_t (d_t - 1) / (n_t (n_t - 1))) (an unbiased estimate of the
 * probability that two distinct obligors of a period both default), and rho solves
 * Phi2(k, k; rho) = p2, k = Phi^-1(p), i.e. Phi2(k, k; rho) - p^2 = p2 - p^2
 * (DESIGN.md key `jointDefault`). Sampling pairs without replacement removes the binomial noise
 * that biases the plain variance estimator.
 *
 * Method: momentEstimate (Brent's root finder on the cancellation-free excess).
 *
 * Special cases (status `undefined`, null values and a reason; T = 1 is allowed): a period
 * with fewer than 2 obligors (no pairs); p = 0 or 1; p2 <= p^2 (a target at or below zero: the
 * data show no positive dependence, which a one-factor model with rho >= 0 cannot fit). A target at
 * the largest value p(1 - p), within a relative 1e-9 (years that are all 0 or all n reach it
 * exactly, and rounding may leave it a hair below), gives rho = 1 with status `clipped` and a reason:
 * the boundary, reported as such. Invalid counts throw RangeError naming the period.
 *
 * @example jointDefault({ obligors: [1000, 1000, 1000], defaults: [5, 20, 10] }).rho
 *
 * Reference: Gordy (2000), Journal of Banking & Finance 24:119-149; de Servigny, A. & Renault, O.
 * (2002), "Default correlation: empirical evidence", Standard & Poor's working paper, joint default
 * probability estimator.
 */
export function jointDefault(panel: Panel): Estimate {
  return momentEstimate('jointDefault', panel, {
    atOrBelowZero: () =>
      undefinedEstimate(
        'The observed joint default frequency is at or below the square of the mean default rate: the data show no positive default dependence, which rho >= 0 cannot fit.',
      ),
    tooLarge: (p, _target, _maximum, p2) => ({
      rho: 1,
      pd: p,
      status: 'clipped',
      reason: `The joint default frequency ${p2.toPrecision(4)} equals the PD (every year has no default or only defaults, or nearly): the largest the model allows, reached at the boundary rho = 1. The data show all-or-nothing years, not a correlation estimate.`,
    }),
  });
}
