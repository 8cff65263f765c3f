import { brentRoot } from '../brent';
import { RHO_SEARCH_LIMIT, type BinomialMleResult, type ProfileLikelihood } from '../estimators/binomial-mle';
import { normalQuantile } from '../normal';

/** A profile-likelihood interval for rho. */
export interface ProfileInterval {
  level: number;
  lower: number;
  upper: number;
  /** The profile stays above the cut-off up to the search limit: the upper end is the limit. */
  upperAtSearchLimit: boolean;
  converged: boolean;
}

/** The chi-square(1) quantile at `level`, chi2_1(level) = Phi^-1((1 + level) / 2)^2. */
export function chiSquare1Quantile(level: number): number {
  if (!(level > 0 && level < 1)) {
    throw new RangeError(`chiSquare1Quantile: the level must be strictly between 0 and 1; got ${level}.`);
  }
  const z = normalQuantile(0.5 + level / 2);
  return z * z;
}

/**
 * Profile-likelihood (likelihood-ratio) confidence interval for rho.
 *
 * { rho : l*(rho) >= l*(rho_hat) - chi2_1(level) / 2 }, with l*(rho) = max_p l(p, rho)
 * (p re-maximised at each rho). At level 0.95 the drop is 1.9207.
 *
 * Method: the ends are roots of l*(rho) - cut-off found by Brent's root finder (tolerance 1e-7 in
 * rho) between the estimate and the nearest profile point already known to lie below the cut-off
 * (or 0 and the search limit). The profile is unimodal in practice; the bracket is taken from the
 * points evaluated by binomialMle, so a second local maximum between them would be missed.
 *
 * Special cases: when l*(0) is above the cut-off the lower end is 0 (the interval includes
 * independence); when l* stays above it up to RHO_SEARCH_LIMIT the upper end is that limit and
 * upperAtSearchLimit is true. `level` outside (0, 1) throws RangeError; an undefined MLE throws.
 *
 * @example profileInterval(profile, mle, 0.95) // { lower: 0.0118, upper: 0.1147, ... } for panel A
 *
 * Reference: Venzon, D. J. & Moolgavkar, S. H. (1988), "A method for computing
 * profile-likelihood-based confidence intervals", Applied Statistics 37:87-94; Wilks, S. S.
 * (1938), Annals of Mathematical Statistics 9:60-62.
 */
export function profileInterval(profile: ProfileLikelihood, mle: BinomialMleResult, level = 0.95): ProfileInterval {
  if (mle.rho === null || mle.logLik === null) {
    throw new RangeError('profileInterval: the maximum-likelihood estimate is undefined, so there is no interval.');
  }
  const cut = mle.logLik - chiSquare1Quantile(level) / 2;
  const rhoHat = mle.rho;
  const known = mle.profilePoints;
  let converged = true;
  const f = (rho: number) => profile.at(rho).logLik - cut;

  let lower = 0;
  const atZero = known.find((q) => q.rho === 0)?.logLik ?? profile.at(0).logLik;
  if (rhoHat > 0 && atZero < cut) {
    let a = 0;
    for (const q of known) if (q.rho < rhoHat && q.logLik < cut && q.rho > a) a = q.rho;
    const root = brentRoot(f, a, rhoHat, { tolerance: 1e-7 });
    lower = root.value;
    converged &&= root.converged;
  }
  let upper = RHO_SEARCH_LIMIT;
  let upperAtSearchLimit = true;
  let b = RHO_SEARCH_LIMIT;
  for (const q of known) if (q.rho > rhoHat && q.logLik < cut && q.rho < b) b = q.rho;
  if (b < RHO_SEARCH_LIMIT || f(RHO_SEARCH_LIMIT) < 0) {
    const root = brentRoot(f, rhoHat, b, { tolerance: 1e-7 });
    upper = root.value;
    upperAtSearchLimit = false;
    converged &&= root.converged;
  }
  return { level, lower, upper, upperAtSearchLimit, converged };
}
