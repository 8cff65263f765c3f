/**
 * Maximum likelihood of the logit-normal mixing law for one panel, with the equivalent asset
 * correlation and its profile-likelihood interval.
 */
import { brentRoot } from '../brent';
import { equivalentRho, gaussianSecondMoment } from '../equivalent-rho';
import { boxNewtonMaximize } from '../box-newton';
import { gridMaximize } from '../grid-maximize';
import { likelihoodRatioEnds } from '../intervals/likelihood-ratio';
import { LogitNormalLikelihood, logitNormalMoment } from '../logit-normal-mixing';
import { assertPanel, type Panel } from '../panel';
import { RHO_SEARCH_LIMIT } from './binomial-mle';
import { mixingLawPooledRate, type EquivalentRhoFit, type ProfileInterval } from './mixing-law-panel';
import type { EstimateStatus } from './types';

/** Largest sigma the search considers (a default rate that is nearly 0 or 1 every year). */
export const SIGMA_SEARCH_LIMIT = 8;

/** The fitted logit-normal law. */
export interface LogitNormalFit extends EquivalentRhoFit {
  mu: number | null;
  sigma: number | null;
}

const logit = (p: number) => Math.log(p / (1 - p));

/**
 * The (mu, sigma) of the logit-normal law with mean default rate p and equivalent rho r, or null
 * when no sigma up to the search limit reaches that joint default probability.
 *
 * Method: at fixed sigma, E[pi] increases in mu, so mu(sigma) is Brent's root of E[pi] = p; along
 * that curve E[pi^2] increases with sigma (the variance of pi at a fixed mean), so sigma is Brent's
 * root of E[pi^2] = Phi2(k, k; r). Moments by logitNormalMoment.
 */
export function logitNormalFromEquivalent(p: number, r: number): { mu: number; sigma: number } | null {
  const muAt = (sigma: number) => {
    const centre = logit(p);
    return brentRoot((mu) => logitNormalMoment(mu, sigma, 1) - p, centre - 2 - 3 * sigma * sigma, centre + 2 + 3 * sigma * sigma, { tolerance: 1e-12 }).value;
  };
  if (r === 0) return { mu: logit(p), sigma: 0 };
  const target = gaussianSecondMoment(p, r);
  const gap = (sigma: number) => logitNormalMoment(muAt(sigma), sigma, 2) - target;
  if (gap(SIGMA_SEARCH_LIMIT) < 0) return null;
  const sigma = brentRoot(gap, 0, SIGMA_SEARCH_LIMIT, { tolerance: 1e-10 }).value;
  return { mu: muAt(sigma), sigma };
}

/**
 * Logit-normal mixing by maximum likelihood: the year's default rate is s(mu + sigma Z), reported
 * with pd = E[pi], the equivalent asset correlation (the Gaussian rho with the same pd and joint
 * default probability E[pi^2]) and its profile-likelihood interval (the likelihood maximised
 * subject to each value of the equivalent rho).
 *
 * Method: projected Newton in (mu, sigma), sigma in [0, 8] (box-newton.ts), with the exact gradient
 * and Hessian of LogitNormalLikelihood (posterior moments), from three starts: sigma = 0 held (the
 * binomial law, a candidate of its own), sigma = 0.3 and sigma = 1 at the pooled rate's logit. The interval:
 * the law re-parametrised by (p, r) (logitNormalFromEquivalent), l*(r) = max over logit p, ends by
 * likelihoodRatioEnds; an end at 0 or 0.995 is that bound.
 *
 * Special cases (a status and a sentence, never NaN): no defaults, only defaults, or a single year:
 * `undefined`; the maximum at sigma = 0 (no spread beyond chance): `ok` with equivalent rho 0; at
 * the search limit of sigma: `clipped`.
 *
 * @example logitNormalMle({ obligors: [1200, 1350, 1500], defaults: [10, 25, 8] })
 *
 * Reference: McNeil, Frey & Embrechts (2015), section 11.2.4; Venzon & Moolgavkar (1988).
 */
export function logitNormalMle(panel: Panel, options: { level?: number; intervals?: boolean } = {}): LogitNormalFit {
  assertPanel(panel, 'logitNormalMle');
  const level = options.level ?? 0.95;
  const empty = (reason: string): LogitNormalFit => ({ mu: null, sigma: null, pd: null, equivalentRho: null, logLik: null, status: 'undefined', reason, intervals: { profile: null } });
  const prelude = mixingLawPooledRate(panel, 'the logit-normal law');
  if (prelude.reason !== null) return empty(prelude.reason);
  const L = new LogitNormalLikelihood(panel);
  const centre = logit(prelude.pooled);
  const problem = (fixed?: boolean[]) => ({
    evaluate: (x: readonly number[]) => L.logLikFull(x[0], x[1]),
    lower: [centre - 30, 0],
    upper: [centre + 30, SIGMA_SEARCH_LIMIT],
    maxStep: [1, 0.5],
    fixed,
  });
  // Starts: sigma = 0 (the binomial law, a candidate of its own), a small and a large spread.
  const runs = [
    boxNewtonMaximize(problem([false, true]), [centre, 0], { tolerance: 1e-11 }),
    boxNewtonMaximize(problem(), [centre - 0.05, 0.3], { tolerance: 1e-11 }),
    boxNewtonMaximize(problem(), [centre - 0.5, 1.0], { tolerance: 1e-11 }),
  ];
  let best = runs[0];
  for (const r of runs) if (r.value > best.value + 1e-9) best = r;
  const search = { value: best.value, converged: best.converged };
  const at = { converged: best.converged };
  const mu = best.x[0];
  const sigma = best.x[1];
  const pd = logitNormalMoment(mu, sigma, 1);
  const rEq = equivalentRho(pd, logitNormalMoment(mu, sigma, 2));
  let profile: ProfileInterval | null = null;
  let intervalConverged = true;
  if (options.intervals ?? true) {
    const profileAt = (r: number) => {
      const best = gridMaximize(
        (x) => {
          const law = logitNormalFromEquivalent(1 / (1 + Math.exp(-x)), r);
          return law === null ? Number.NEGATIVE_INFINITY : L.logLik(law.mu, law.sigma);
        },
        [-1.5, -0.5, -0.15, 0, 0.15, 0.5, 1.5].map((u) => centre + u),
        1e-7,
      );
      return best.value;
    };
    const ends = likelihoodRatioEnds((r) => ({ logLik: profileAt(r), slope: null }), {
      estimate: Math.min(rEq, RHO_SEARCH_LIMIT),
      maxLogLik: Math.max(search.value, profileAt(Math.min(rEq, RHO_SEARCH_LIMIT))) + 1e-7,
      lower: 0,
      upper: RHO_SEARCH_LIMIT,
      level,
      tolerance: 1e-5,
    });
    profile = { level, lower: ends.lower, upper: ends.upper };
    intervalConverged = ends.converged;
  }
  const converged = search.converged && at.converged && intervalConverged && L.unconverged === 0;
  const status: EstimateStatus = !converged ? 'not-converged' : sigma >= SIGMA_SEARCH_LIMIT ? 'clipped' : 'ok';
  return {
    mu,
    sigma,
    pd,
    equivalentRho: rEq,
    logLik: search.value,
    status,
    ...(status === 'not-converged'
      ? { reason: 'A search for the maximum or an interval end did not meet its tolerance; do not use these values.' }
      : status === 'clipped'
        ? { reason: `The maximum lies at the search limit of sigma (${SIGMA_SEARCH_LIMIT}): the years look all-or-nothing.` }
        : sigma === 0
          ? { reason: 'The maximum is the binomial law without mixing (sigma = 0): the data show no spread of default rates beyond chance.' }
          : {}),
    intervals: { profile },
  };
}

