/**
 * Inference for the AR(1)-factor model (estimators/ar1-mle.ts): the profile-likelihood interval of
 * rho with p and phi re-maximised, the profile of phi with its interval, and the likelihood-ratio
 * test of phi = 0 against the independent-factor model. `ar1Fit` runs the estimator and all of
 * them, re-maximising when a profile finds a higher point than the first search.
 */
import { ar1Mle, AR1_PHI_LIMIT, type Ar1MleOptions, type Ar1MleResult, type Ar1Profile } from '../estimators/ar1-mle';
import { RHO_SEARCH_LIMIT } from '../estimators/binomial-mle';
import type { Panel } from '../panel';
import { normalCdf } from '../normal';
import { HigherMaximumError, likelihoodRatioEnds, type LikelihoodRatioEnds } from './likelihood-ratio';
import { StageTimer } from '../stage-timer';
import { chiSquare1Quantile } from './profile';

/** A likelihood-ratio interval; an end that reached the parameter's bound is reported as the bound (0 or 1 for rho, -1 or 1 for phi). */
export interface Ar1Interval {
  level: number;
  lower: number;
  upper: number;
  /** The profile stays above the cut-off to the lower bound (lower is 0 for rho, -1 for phi). */
  lowerAtBound: boolean;
  /** The profile stays above the cut-off to the upper bound (upper is 1). */
  upperAtBound: boolean;
}

/** The likelihood-ratio test of phi = 0. */
export interface LrTestPhi0 {
  /** 2 (l(p, rho, phi) - l_independent), at least 0. */
  statistic: number;
  /** P(chi-square(1) >= statistic). */
  pValue: number;
}

/** ar1Mle with everything its review needs. */
export interface Ar1Fit {
  result: Ar1MleResult;
  /** Profile-likelihood interval of rho (p and phi re-maximised); null without an estimate. */
  profile: Ar1Interval | null;
  /** Profile-likelihood interval of phi (p and rho re-maximised); null without an estimate or when not asked for. */
  phiInterval: Ar1Interval | null;
  /** The profile of phi, l***(phi), on a grid plus the estimate, increasing in phi; [] without an estimate. */
  phiProfile: { phi: number; logLik: number }[];
  /** The cut-off of both intervals, logLik - chi2_1(level) / 2; null without an estimate. */
  cutoff: number | null;
  lrTestPhi0: LrTestPhi0 | null;
  /** Times the search was restarted from a higher point a profile found. */
  restarts: number;
}

/** Options of {@link ar1Fit}. */
export interface Ar1FitOptions extends Ar1MleOptions {
  /** Confidence level of both intervals; default 0.95. */
  level?: number;
  /** Points of the phi profile grid in [-0.95, 0.95] (default 20; 0 for none). */
  phiProfilePoints?: number;
  /** Compute the interval of phi (default true; the estimator audit needs only rho's). */
  phiInterval?: boolean;
  /** Times the parts (stages `ar1Mle`, `ar1Mle.profile`, `ar1Mle.phiInterval`, `ar1Mle.phiProfile`); none by default. */
  timer?: StageTimer;
}

/**
 * Likelihood-ratio test of phi = 0 (the independent-factor model) against the AR(1) factor.
 *
 * S = 2 (l_AR1 - l_0), l_0 = binomialMle's maximum; phi = 0 is inside (-1, 1), so under the null
 * S is asymptotically chi-square(1) (Wilks 1938) and P(S >= s) = 2 Phi(-sqrt(s)).
 *
 * Special cases: a statistic below 0 by rounding (within 1e-7) is 0 with p-value 1; clearly
 * negative (the AR(1) maximum below the nested model's), or non-finite input, throws RangeError.
 * When rho_hat = 0 phi is not identified and the test has no power (S = 0).
 *
 * @example lrTestPhiZero(-124.9558, -127.4966) // { statistic: 5.08, pValue: 0.024 }
 *
 * Reference: Wilks, S. S. (1938), "The large-sample distribution of the likelihood ratio for
 * testing composite hypotheses", Annals of Mathematical Statistics 9:60-62.
 */
export function lrTestPhiZero(logLik: number, logLikIndependent: number): LrTestPhi0 {
  if (!Number.isFinite(logLik) || !Number.isFinite(logLikIndependent)) {
    throw new RangeError(`lrTestPhiZero: both log-likelihoods must be finite; got ${logLik} and ${logLikIndependent}.`);
  }
  let statistic = 2 * (logLik - logLikIndependent);
  if (statistic < 0) {
    if (statistic >= -1e-7) statistic = 0;
    else {
      throw new RangeError(
        `lrTestPhiZero: the AR(1) maximum (${logLik}) is below the independent model's (${logLikIndependent}), which it contains; the AR(1) search did not find its maximum.`,
      );
    }
  }
  return { statistic, pValue: statistic === 0 ? 1 : 2 * normalCdf(-Math.sqrt(statistic)) };
}

function reported(ends: LikelihoodRatioEnds, lowerBound: number, upperBound: number): Ar1Interval {
  return {
    level: ends.level,
    lower: ends.lowerAtBound ? lowerBound : ends.lower,
    upper: ends.upperAtBound ? upperBound : ends.upper,
    lowerAtBound: ends.lowerAtBound,
    upperAtBound: ends.upperAtBound,
  };
}

/** Half-width of the quadratic approximation of a profile with curvature c, at the cut-off drop. */
function quadraticHalfWidth(curvature: number | null, drop: number, fallback: number): number {
  return curvature !== null && curvature < 0 ? Math.sqrt((2 * drop) / -curvature) : fallback;
}

/**
 * Profile-likelihood interval of rho under the AR(1)-factor model, p and phi re-maximised:
 * { rho : l**(rho) >= l(p_hat, rho_hat, phi_hat) - chi2_1(level) / 2 }.
 *
 * Method: likelihoodRatioEnds on Ar1Profile.atRho over [0, 0.995], first step the quadratic
 * half-width from the profile's curvature at the estimate; l**(0) is the binomial likelihood at
 * the pooled rate.
 *
 * Special cases: an end beyond the search range is reported as 0 or 1 with lowerAtBound or
 * upperAtBound (DESIGN.md); an undefined estimate throws RangeError; a profile point above the
 * maximum throws HigherMaximumError (ar1Fit re-maximises from it).
 *
 * @example ar1ProfileInterval(profile, result, 0.95) // { lower, upper, ... }
 *
 * Reference: Venzon & Moolgavkar (1988); Wilks (1938).
 */
export function ar1ProfileInterval(profile: Ar1Profile, mle: Ar1MleResult, level = 0.95): Ar1Interval {
  if (mle.rho === null || mle.logLik === null) throw new RangeError('ar1ProfileInterval: the AR(1) estimate is undefined, so there is no interval.');
  const drop = chiSquare1Quantile(level) / 2;
  let curvature: number | null = null;
  if (mle.rho > 0) curvature = profile.atRho(mle.rho).curvature;
  const ends = likelihoodRatioEnds((rho) => profile.atRho(rho), {
    estimate: mle.rho,
    maxLogLik: mle.logLik,
    lower: 0,
    upper: RHO_SEARCH_LIMIT,
    level,
    firstStep: Math.min(0.2, quadraticHalfWidth(curvature, drop, 0.05)),
  });
  if (!ends.converged) throw new RangeError('ar1ProfileInterval: the search for an end of the interval did not converge.');
  return reported(ends, 0, 1);
}

/**
 * Profile-likelihood interval of phi, p and rho re-maximised:
 * { phi : l***(phi) >= l(p_hat, rho_hat, phi_hat) - chi2_1(level) / 2 }.
 *
 * Method: likelihoodRatioEnds on Ar1Profile.atPhi over [-0.99, 0.99].
 *
 * Special cases: at rho_hat = 0 phi is not identified and every phi is as likely: [-1, 1] with
 * both ends at their bounds; ends beyond +-0.99 are reported as -1 or 1 (DESIGN.md); an undefined
 * estimate throws RangeError.
 *
 * @example ar1PhiInterval(profile, result, 0.95)
 *
 * Reference: Venzon & Moolgavkar (1988).
 */
export function ar1PhiInterval(profile: Ar1Profile, mle: Ar1MleResult, level = 0.95): Ar1Interval {
  if (mle.rho === null || mle.logLik === null) throw new RangeError('ar1PhiInterval: the AR(1) estimate is undefined, so there is no interval.');
  if (mle.phi === null) return { level, lower: -1, upper: 1, lowerAtBound: true, upperAtBound: true };
  const drop = chiSquare1Quantile(level) / 2;
  const curvature = profile.atPhi(mle.phi).curvature;
  const ends = likelihoodRatioEnds((phi) => profile.atPhi(phi), {
    estimate: mle.phi,
    maxLogLik: mle.logLik,
    lower: -AR1_PHI_LIMIT,
    upper: AR1_PHI_LIMIT,
    level,
    firstStep: Math.min(0.5, quadraticHalfWidth(curvature, drop, 0.2)),
  });
  if (!ends.converged) throw new RangeError('ar1PhiInterval: the search for an end of the interval did not converge.');
  return reported(ends, -1, 1);
}

/**
 * The profile of phi on a grid: l***(phi) = max over (p, rho) at phi = -0.95 + 1.9 i / (points - 1),
 * plus the estimate, increasing in phi (for the chart beside the interval).
 *
 * Special cases: points = 0 gives only the estimate; at rho_hat = 0 the profile is flat at the
 * binomial maximum (phi has no effect); throws HigherMaximumError when a grid point beats the
 * estimate (ar1Fit re-maximises from it).
 *
 * @example ar1PhiProfileCurve(profile, result, 20)
 */
export function ar1PhiProfileCurve(profile: Ar1Profile, mle: Ar1MleResult, points = 20): { phi: number; logLik: number }[] {
  if (mle.rho === null || mle.logLik === null) return [];
  if (!Number.isInteger(points) || points < 0 || points > 400) {
    throw new RangeError(`ar1PhiProfileCurve: points must be a whole number from 0 to 400; got ${points}.`);
  }
  const grid: number[] = [];
  for (let i = 0; i < points; i++) grid.push(points === 1 ? 0 : -0.95 + (1.9 * i) / (points - 1));
  const out: { phi: number; logLik: number }[] = [];
  if (mle.phi === null) {
    for (const phi of grid) out.push({ phi, logLik: mle.logLik });
    return out;
  }
  out.push({ phi: mle.phi, logLik: mle.logLik });
  // from the estimate outwards, so each point starts from its neighbour
  const up = grid.filter((x) => x > mle.phi!).sort((a, b) => a - b);
  const down = grid.filter((x) => x < mle.phi!).sort((a, b) => b - a);
  for (const phi of [...up, ...down]) {
    const q = profile.atPhi(phi);
    if (q.logLik > mle.logLik + 1e-6) throw new HigherMaximumError(phi, q.logLik, mle.logLik);
    out.push({ phi, logLik: Math.min(q.logLik, mle.logLik) });
  }
  return out.sort((a, b) => a.phi - b.phi);
}

/**
 * ar1Mle with its rho interval, phi interval, phi profile and the LR test of phi = 0.
 *
 * Method: ar1Mle, then ar1ProfileInterval, ar1PhiInterval and ar1PhiProfileCurve; when one of them
 * meets a point above the estimate (HigherMaximumError: the first search stopped at a lower local
 * maximum), ar1Mle is run again with that point as an added start (at most 3 times) and
 * everything is recomputed. lrTestPhiZero against binomialMle's maximum.
 *
 * Special cases: an undefined estimate (T < 6, no defaults) gives null intervals and test with the
 * estimate's reason; a `not-converged` estimate gives no intervals either.
 *
 * @example ar1Fit({ obligors, defaults }, { level: 0.95 })
 *
 * Reference: McNeil & Wendin (2007); Venzon & Moolgavkar (1988); Wilks (1938).
 */
export function ar1Fit(panel: Panel, options: Ar1FitOptions = {}): Ar1Fit {
  const level = options.level ?? 0.95;
  if (!(level > 0 && level < 1)) throw new RangeError(`ar1Fit: the level must be strictly between 0 and 1; got ${level}.`);
  const timer = options.timer ?? new StageTimer();
  const { timer: _timer, ...mleOptions } = options;
  let start = options.start;
  for (let restarts = 0; ; restarts++) {
    const { result, profile } = timer.time('ar1Mle', () => ar1Mle(panel, { ...mleOptions, start }));
    if (profile === null || result.rho === null || result.logLik === null || result.status === 'not-converged') {
      return { result, profile: null, phiInterval: null, phiProfile: [], cutoff: null, lrTestPhi0: null, restarts };
    }
    try {
      const rhoInterval = timer.time('ar1Mle.profile', () => ar1ProfileInterval(profile, result, level));
      const phiInterval = options.phiInterval === false ? null : timer.time('ar1Mle.phiInterval', () => ar1PhiInterval(profile, result, level));
      const phiProfile = timer.time('ar1Mle.phiProfile', () => ar1PhiProfileCurve(profile, result, options.phiProfilePoints ?? 20));
      return {
        result,
        profile: rhoInterval,
        phiInterval,
        phiProfile,
        cutoff: result.logLik - chiSquare1Quantile(level) / 2,
        lrTestPhi0: lrTestPhiZero(result.logLik, result.logLikIndependent!),
        restarts,
      };
    } catch (err) {
      if (!(err instanceof HigherMaximumError) || restarts >= 3) throw err;
      // re-maximise from the higher point the profile found
      const point = profile.lastSolved();
      start = { pd: normalCdf(point.k), rho: point.rho, phi: point.phi };
    }
  }
}
