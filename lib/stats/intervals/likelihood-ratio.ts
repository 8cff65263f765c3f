/**
 * The ends of a likelihood-ratio (profile-likelihood) confidence interval of one parameter with
 * bounds, given its profile log-likelihood and slope: the generic search behind the AR(1) model's
 * intervals for rho and phi.
 */
import { safeguardedNewtonRoot } from '../safeguarded-newton';
import { chiSquare1Quantile } from './profile';

/** A point of a profile log-likelihood: its value and slope in the profiled parameter (null where none is available, at a bound). */
export interface ProfileValue {
  logLik: number;
  slope: number | null;
}

/** The interval's ends and whether each reached the parameter's bound. */
export interface LikelihoodRatioEnds {
  level: number;
  lower: number;
  upper: number;
  /** The profile stays above the cut-off down to the lower bound (lower is that bound). */
  lowerAtBound: boolean;
  /** The profile stays above the cut-off up to the upper bound (upper is that bound). */
  upperAtBound: boolean;
  converged: boolean;
}

/** Options of {@link likelihoodRatioEnds}. */
export interface LikelihoodRatioOptions {
  /** The maximum-likelihood estimate of the parameter, inside [lower, upper]. */
  estimate: number;
  /** The maximum of the log-likelihood (the profile's value at the estimate). */
  maxLogLik: number;
  /** Bounds of the parameter (the profile is evaluated on [lower, upper]). */
  lower: number;
  upper: number;
  /** Confidence level in (0, 1); default 0.95. */
  level?: number;
  /** First step from the estimate on each side (default 5% of the range). */
  firstStep?: number;
  /** Absolute tolerance on each end (default 1e-7). */
  tolerance?: number;
}

/**
 * Likelihood-ratio confidence interval of a scalar parameter theta with bounds:
 *
 *   { theta in [lower, upper] : l*(theta) >= l(theta_hat) - chi2_1(level) / 2 },
 *
 * with l* the profile log-likelihood (the other parameters re-maximised at each theta), assumed
 * unimodal.
 *
 * Method: on each side, steps outward from the estimate (first `firstStep`, then Newton's step
 * for l* = cut-off from the slope, or doubling the distance when that does not move outward) until
 * a point below the cut-off or the bound is reached; the end is then the root of l* - cut-off in
 * that bracket by safeguarded Newton with the profile slope as derivative (bisection when a step
 * leaves the bracket; absolute tolerance 1e-7). Where l* stays above the cut-off up to a bound,
 * the end is that bound.
 *
 * Special cases: level outside (0, 1), an estimate outside [lower, upper] or a non-finite maximum
 * throw RangeError; a profile value above the maximum by more than 1e-6 throws RangeError naming
 * it (the estimate is not the maximum; the caller re-maximises from there).
 *
 * @example likelihoodRatioEnds((x) => ({ logLik: -x * x, slope: -2 * x }), { estimate: 0, maxLogLik: 0, lower: -5, upper: 5 }) // +-1.3859
 *
 * Reference: Venzon, D. J. & Moolgavkar, S. H. (1988), "A method for computing
 * profile-likelihood-based confidence intervals", Applied Statistics 37:87-94; Wilks, S. S.
 * (1938), Annals of Mathematical Statistics 9:60-62.
 */
export function likelihoodRatioEnds(profile: (theta: number) => ProfileValue, options: LikelihoodRatioOptions): LikelihoodRatioEnds {
  const level = options.level ?? 0.95;
  const { estimate, maxLogLik, lower, upper } = options;
  if (!(estimate >= lower && estimate <= upper)) {
    throw new RangeError(`likelihoodRatioEnds: the estimate ${estimate} lies outside [${lower}, ${upper}].`);
  }
  if (!Number.isFinite(maxLogLik)) throw new RangeError(`likelihoodRatioEnds: the maximum log-likelihood must be finite; got ${maxLogLik}.`);
  const drop = chiSquare1Quantile(level) / 2;
  const cut = maxLogLik - drop;
  const tolerance = options.tolerance ?? 1e-7;
  const firstStep = options.firstStep ?? 0.05 * (upper - lower);
  let converged = true;
  const at = (theta: number): ProfileValue => {
    const q = profile(theta);
    if (q.logLik > maxLogLik + 1e-6) {
      throw new HigherMaximumError(theta, q.logLik, maxLogLik);
    }
    return q;
  };
  const end = (side: -1 | 1): { value: number; atBound: boolean } => {
    const bound = side < 0 ? lower : upper;
    if (estimate === bound) return { value: bound, atBound: true };
    let inside = estimate;
    let fInside = drop; // l*(estimate) - cut
    let x = estimate + side * Math.min(firstStep, Math.abs(bound - estimate));
    for (let steps = 0; steps < 60; steps++) {
      const q = at(x);
      const f = q.logLik - cut;
      if (f < 0) {
        const [a, b, fa, fb] = side > 0 ? [inside, x, fInside, f] : [x, inside, f, fInside];
        const root = safeguardedNewtonRoot(
          (t) => {
            const r = at(t);
            return { f: r.logLik - cut, df: r.slope ?? Number.NaN };
          },
          a,
          b,
          fa,
          fb,
          { tolerance, start: x },
        );
        converged &&= root.converged;
        return { value: root.value, atBound: false };
      }
      if (x === bound) return { value: bound, atBound: true };
      inside = x;
      fInside = f;
      // Newton's step towards the cut-off from the slope, else double the distance from the estimate.
      const newton = q.slope !== null && q.slope * side < 0 ? x - f / q.slope : Number.NaN;
      const doubled = estimate + 2 * (x - estimate);
      let next = Number.isFinite(newton) && (newton - x) * side > 0 ? newton : doubled;
      // never less than a tenth of the distance already covered, never past the bound
      if (Math.abs(next - x) < 0.1 * Math.abs(x - estimate)) next = x + 0.1 * (x - estimate);
      x = side > 0 ? Math.min(bound, next) : Math.max(bound, next);
    }
    converged = false;
    return { value: inside, atBound: false };
  };
  const lo = end(-1);
  const hi = end(1);
  return { level, lower: lo.value, upper: hi.value, lowerAtBound: lo.atBound, upperAtBound: hi.atBound, converged };
}

/** Thrown by {@link likelihoodRatioEnds} when the profile exceeds the stated maximum. */
export class HigherMaximumError extends RangeError {
  constructor(
    readonly theta: number,
    readonly logLik: number,
    readonly maxLogLik: number,
  ) {
    super(
      `likelihoodRatioEnds: the profile at ${theta} (${logLik}) exceeds the stated maximum (${maxLogLik}); the estimate is not the maximum, re-maximise from there.`,
    );
    this.name = 'HigherMaximumError';
  }
}
