/**
 * The equivalent asset correlation of a mixing law that has none: the rho of the Gaussian
 * (Vasicek) model with the same PD and the same joint default probability of two obligors.
 */
import { bivariateNormalCdf } from './bivariate-normal';
import { solveMomentEquation } from './estimators/moment-equation';
import { normalQuantile } from './normal';

/**
 * The rho with Phi2(k, k; rho) = E[pi^2], k = Phi^-1(p), p = E[pi]: the Gaussian law with the same
 * mean default rate and the same joint default probability of two obligors (so the same default
 * correlation).
 *
 * Method: the moment equation of the moment estimators (estimators/moment-equation.ts: Brent on
 * Phi2(k, k; rho) - p^2, increasing from 0 at rho = 0 to p (1 - p) at rho = 1), on the excess
 * E[pi^2] - p^2.
 *
 * Special cases: E[pi^2] <= p^2 (no overdispersion) gives 0; E[pi^2] at or above p (all-or-nothing
 * years) gives 1; p outside (0, 1) or E[pi^2] outside [0, p] by more than rounding throw RangeError.
 *
 * @example equivalentRho(0.01, bivariateNormalCdf(-2.326, -2.326, 0.12)) // ~0.12
 *
 * Reference: Gordy, M. B. (2000), "A comparative anatomy of credit risk models", J. Banking &
 * Finance 24:119-149, section 3 (matching the first two moments of the default rate across
 * mixing laws); Vasicek (2002) for Phi2(k, k; rho) = E[pi^2].
 */
export function equivalentRho(p: number, second: number): number {
  if (!(p > 0 && p < 1)) throw new RangeError(`equivalentRho: the mean default rate p must be strictly between 0 and 1; got ${p}.`);
  if (!(second >= 0 && second <= p * (1 + 1e-12))) {
    throw new RangeError(`equivalentRho: the joint default probability E[pi^2] must lie in [0, p]; got ${second} with p = ${p}.`);
  }
  const excess = second - p * p;
  if (!(excess > 0)) return 0;
  const solution = solveMomentEquation(p, excess);
  if (solution.kind === 'too-large') return 1;
  return solution.rho;
}

/** E[pi^2] of the Gaussian law with PD p and asset correlation rho: Phi2(k, k; rho). */
export function gaussianSecondMoment(p: number, rho: number): number {
  const k = normalQuantile(p);
  return bivariateNormalCdf(k, k, rho);
}
