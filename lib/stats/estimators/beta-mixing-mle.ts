/**
 * Maximum likelihood of the beta mixing law (beta-binomial) for one panel, with the equivalent
 * asset correlation and its profile-likelihood interval.
 */
import { betaBinomialLogLikelihood, betaParameters } from '../beta-binomial';
import { gaussianSecondMoment } from '../equivalent-rho';
import { gridMaximize } from '../grid-maximize';
import { likelihoodRatioEnds } from '../intervals/likelihood-ratio';
import { assertPanel, type Panel } from '../panel';
import { RHO_SEARCH_LIMIT } from './binomial-mle';
import { mixingLawPooledRate, type EquivalentRhoFit, type ProfileInterval } from './mixing-law-panel';
import type { EstimateStatus } from './types';

/** Equivalent rho at which the profile is evaluated first (the ends are candidates of their own). */
export const EQUIVALENT_RHO_GRID: readonly number[] = [0, 0.002, 0.01, 0.03, 0.07, 0.15, 0.3, 0.5, 0.75, RHO_SEARCH_LIMIT];

export type { ProfileInterval };

/** The fitted beta law. */
export interface BetaMixingFit extends EquivalentRhoFit {
  /** Beta(a, b) of the default rate; null when the maximum is the binomial law (a, b infinite). */
  a: number | null;
  b: number | null;
}

/** Overdispersion theta = 1 / (a + b) of the beta law with mean p and equivalent rho r. */
export function betaThetaFromEquivalentRho(p: number, r: number): number {
  if (r === 0) return 0;
  const second = gaussianSecondMoment(p, r);
  // E[pi^2] = p (p + theta) / (1 + theta)  =>  theta = (E[pi^2] - p^2) / (p - E[pi^2])
  return Math.max(0, (second - p * p) / (p - second));
}

/** log(p / (1 - p)) and its inverse. */
const logit = (p: number) => Math.log(p / (1 - p));
const expit = (x: number) => 1 / (1 + Math.exp(-x));

/**
 * The profile of the beta law in its equivalent rho: l*(r) = max over p of l(p, theta(p, r)), with
 * the maximising p. The beta law is one-to-one with (p, r), so the maximum of l* is the MLE.
 */
export function betaEquivalentRhoProfile(panel: Panel, r: number, pooledRate: number): { logLik: number; pd: number } {
  const centre = logit(pooledRate);
  const f = (x: number) => {
    const p = expit(x);
    return betaBinomialLogLikelihood(panel, p, betaThetaFromEquivalentRho(p, r));
  };
  // The fitted mean lies near the pooled rate; a wide grid in logit p keeps extreme r safe.
  const grid = [-6, -3, -1.5, -0.5, 0, 0.5, 1.5, 3].map((u) => centre + u);
  const best = gridMaximize(f, grid, 1e-9);
  return { logLik: best.value, pd: expit(best.x) };
}

/**
 * Beta mixing by maximum likelihood: the year's default rate pi_t ~ Beta(a, b), counts
 * beta-binomial; reported with pd = a / (a + b), the equivalent asset correlation (the Gaussian rho
 * with the same pd and joint default probability E[pi^2]) and its profile-likelihood interval.
 *
 * Method: the beta law is parametrised by (p, r), r its equivalent rho (theta = 1 / (a + b) follows
 * in closed form from Phi2(k, k; r) = p (p + theta) / (1 + theta)); the profile l*(r) maximises
 * over logit p by a grid and Brent's search, and r by a grid on [0, 0.995] (r = 0, the binomial law,
 * is a candidate of its own) and Brent. The interval is {r : l*(r) >= l* max - chi2_1(level) / 2}
 * by likelihoodRatioEnds (an end at 0 or 0.995 is that bound).
 *
 * Special cases (a status and a sentence, never NaN): no defaults or only defaults: `undefined`
 * (p has no interior maximum); a single year: `undefined` (a spread of default rates across years
 * cannot be seen in one year); the maximum at r = 0: `ok` with a and b null (the binomial law,
 * a + b infinite); at the search limit: `clipped`.
 *
 * @example betaMixingMle({ obligors: [1200, 1350, 1500], defaults: [10, 25, 8] })
 *
 * Reference: Skellam (1948); Gordy (2000), section 3; Venzon & Moolgavkar (1988) for the interval.
 */
export function betaMixingMle(panel: Panel, options: { level?: number; intervals?: boolean } = {}): BetaMixingFit {
  assertPanel(panel, 'betaMixingMle');
  const level = options.level ?? 0.95;
  const empty = (reason: string): BetaMixingFit => ({ a: null, b: null, pd: null, equivalentRho: null, logLik: null, status: 'undefined', reason, intervals: { profile: null } });
  const prelude = mixingLawPooledRate(panel, 'the beta law');
  if (prelude.reason !== null) return empty(prelude.reason);
  const pooled = prelude.pooled;
  const profile = (r: number) => betaEquivalentRhoProfile(panel, r, pooled);
  const best = gridMaximize((r) => profile(r).logLik, [...EQUIVALENT_RHO_GRID], 1e-8);
  const r = best.x;
  const at = profile(r);
  const theta = betaThetaFromEquivalentRho(at.pd, r);
  const ab = theta > 0 ? betaParameters(at.pd, theta) : null;
  const ends =
    (options.intervals ?? true)
      ? likelihoodRatioEnds((x) => ({ logLik: profile(x).logLik, slope: null }), {
          estimate: r,
          maxLogLik: best.value,
          lower: 0,
          upper: RHO_SEARCH_LIMIT,
          level,
          tolerance: 1e-6,
        })
      : null;
  const status: EstimateStatus = !best.converged || (ends !== null && !ends.converged) ? 'not-converged' : r >= RHO_SEARCH_LIMIT ? 'clipped' : 'ok';
  return {
    a: ab ? ab.a : null,
    b: ab ? ab.b : null,
    pd: at.pd,
    equivalentRho: r,
    logLik: best.value,
    status,
    ...(status === 'clipped'
      ? { reason: `The maximum lies at the search limit of the equivalent rho (${RHO_SEARCH_LIMIT}): the years look all-or-nothing, and a is near 0.` }
      : status === 'not-converged'
        ? { reason: 'The search for the maximum or for an interval end did not meet its tolerance.' }
        : ab === null
          ? { reason: 'The maximum is the binomial law without mixing (a + b infinite): the data show no spread of default rates beyond chance.' }
          : {}),
    intervals: { profile: ends === null ? null : { level, lower: ends.lower, upper: ends.upper } },
  };
}
