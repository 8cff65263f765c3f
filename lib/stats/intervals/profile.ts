import { RHO_SEARCH_LIMIT, type BinomialMleResult, type ProfileLikelihood } from '../estimators/binomial-mle';
import { normalQuantile } from '../normal';
import { safeguardedNewtonRoot } from '../safeguarded-newton';

/** A profile-likelihood interval for rho. */
export interface ProfileInterval {
  level: number;
  lower: number;
  upper: number;
  /** The profile stays above the cut-off up to the search limit: the upper end is the limit. */
  upperAtSearchLimit: boolean;
  converged: boolean;
}

/** Absolute tolerance on rho of each end (the Newton step at the reported end is below it). */
const END_TOLERANCE = 1e-8;

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
 * Method: each end is the root of l*(rho) - cut-off between the estimate and the nearest profile
 * point known to lie below the cut-off (from binomialMle's points, or 0 for the lower end; for the
 * upper end else the first below it of the starting guess and the points reached from there by
 * Newton steps outward, or by tripling the distance from the estimate on the logit scale, up to
 * the search limit), found by
 * safeguarded Newton with the exact profile slope
 * (ProfilePoint.slope, the envelope theorem) as derivative and bisection whenever a step leaves
 * the bracket (absolute tolerance 1e-8 in rho). The first step starts from the quadratic
 * approximation of l* on the logit scale of rho at the estimate (the logit-Wald end), so each end
 * usually takes three or four profile points. The profile is unimodal in practice; the bracket is
 * taken from the points evaluated by binomialMle, so a second local maximum between them would be
 * missed.
 *
 * Special cases: when l*(0) is above the cut-off the lower end is 0 (the interval includes
 * independence); when l* stays above it up to RHO_SEARCH_LIMIT the upper end is that limit and
 * upperAtSearchLimit is true. `level` outside (0, 1) throws RangeError; an undefined MLE throws.
 *
 * @example profileInterval(profile, mle, 0.95) // { lower: 0.0118, upper: 0.1147, ... } for panel A
 *
 * Reference: Venzon, D. J. & Moolgavkar, S. H. (1988), "A method for computing
 * profile-likelihood-based confidence intervals", Applied Statistics 37:87-94; Wilks, S. S.
 * (1938), Annals of Mathematical Statistics 9:60-62; Press et al. (2007), Numerical Recipes,
 * 3rd ed., section 9.4 (safeguarded Newton).
 */
export function profileInterval(profile: ProfileLikelihood, mle: BinomialMleResult, level = 0.95): ProfileInterval {
  if (mle.rho === null || mle.logLik === null) {
    throw new RangeError('profileInterval: the maximum-likelihood estimate is undefined, so there is no interval.');
  }
  const drop = chiSquare1Quantile(level) / 2;
  const cut = mle.logLik - drop;
  const rhoHat = mle.rho;
  const known = mle.profilePoints;
  let converged = true;
  const f = (rho: number) => {
    const q = profile.at(rho);
    return { f: q.logLik - cut, df: q.slope };
  };
  // Quadratic model of l* at the estimate on eta = logit(rho): l* ~ l*(rho_hat) + C_eta (eta - eta_hat)^2 / 2,
  // C_eta = l*''(rho_hat) (rho_hat (1 - rho_hat))^2 (the slope is zero at an interior maximum).
  const top = known.find((q) => q.rho === rhoHat);
  let guessLower: number | undefined;
  let guessUpper: number | undefined;
  if (top && rhoHat > 0 && top.curvature < 0) {
    const v = rhoHat * (1 - rhoHat);
    const halfWidth = Math.sqrt((2 * drop) / (-top.curvature * v * v));
    const eta = Math.log(rhoHat / (1 - rhoHat));
    guessLower = 1 / (1 + Math.exp(-(eta - halfWidth)));
    guessUpper = 1 / (1 + Math.exp(-(eta + halfWidth)));
  } else if (top && rhoHat === 0 && top.slope < 0) {
    guessUpper = drop / -top.slope; // linear model at the boundary
  }
  const fHat = drop; // l*(rho_hat) - cut

  let lower = 0;
  const atZero = known.find((q) => q.rho === 0)?.logLik ?? profile.at(0).logLik;
  if (rhoHat > 0 && atZero < cut) {
    let a = 0;
    let fa = atZero - cut;
    for (const q of known) {
      if (q.rho < rhoHat && q.logLik < cut && q.rho > a) {
        a = q.rho;
        fa = q.logLik - cut;
      }
    }
    const root = safeguardedNewtonRoot(f, a, rhoHat, fa, fHat, { tolerance: END_TOLERANCE, start: guessLower });
    lower = root.value;
    converged &&= root.converged;
  }
  let upper = RHO_SEARCH_LIMIT;
  let upperAtSearchLimit = true;
  // Far end of the upper bracket: the nearest known point below the cut-off, else points from the
  // guess outwards (tripling the distance from the estimate on the logit scale), else the limit.
  let b = Number.NaN;
  let fb = Number.NaN;
  for (const q of known) {
    if (q.rho > rhoHat && q.logLik < cut && !(q.rho >= b)) {
      b = q.rho;
      fb = q.logLik - cut;
    }
  }
  let a = rhoHat;
  let fa = fHat;
  if (Number.isNaN(b)) {
    const logit = (r: number) => Math.log(r / (1 - r));
    let r = Math.min(RHO_SEARCH_LIMIT, guessUpper ?? rhoHat + 0.05);
    for (let steps = 0; steps < 30; steps++) {
      const q = f(r);
      if (q.f < 0 || r >= RHO_SEARCH_LIMIT) {
        b = r;
        fb = q.f;
        break;
      }
      a = r;
      fa = q.f;
      // Newton's step outward (it overshoots where l* is concave); else triple the logit distance.
      const newton = r - q.f / q.df;
      if (newton > r && newton - r < END_TOLERANCE) break; // converged to the end from inside

      const wider = rhoHat > 0 ? 1 / (1 + Math.exp(-(logit(r) + 2 * (logit(r) - logit(rhoHat))))) : 3 * r;
      r = Math.min(RHO_SEARCH_LIMIT, newton > r && newton < wider ? newton : wider);
    }
  }
  if (Number.isNaN(b)) {
    upper = a;
    upperAtSearchLimit = false;
  } else if (fb < 0) {
    const root = safeguardedNewtonRoot(f, a, b, fa, fb, { tolerance: END_TOLERANCE, start: b });
    upper = root.value;
    upperAtSearchLimit = false;
    converged &&= root.converged;
  }
  return { level, lower, upper, upperAtSearchLimit, converged };
}
