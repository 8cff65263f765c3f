import { brentMinimize, type IterativeResult } from '../brent';
import { MixtureLikelihood, type Panel } from '../mixture-likelihood';
import { normalCdf, normalQuantile } from '../normal';
import type { Estimate } from './types';

/** Largest rho the optimiser and the profile search consider (the integrand degenerates at 1). */
export const RHO_SEARCH_LIMIT = 0.995;

/** Coarse grid of rho for locating the maximum before Brent's search (never only a start point). */
const RHO_GRID = [0, 0.005, 0.015, 0.03, 0.05, 0.08, 0.12, 0.18, 0.26, 0.36, 0.5, 0.66, 0.82, 0.94, RHO_SEARCH_LIMIT];

/** One point of the profile log-likelihood: p re-maximised at a fixed rho. */
export interface ProfilePoint {
  rho: number;
  /** max over p of the log-likelihood at this rho. */
  logLik: number;
  /** The maximising p and k = Phi^-1(p). */
  pd: number;
  k: number;
  converged: boolean;
  iterations: number;
}

/**
 * The profile log-likelihood of rho for one panel, l*(rho) = max_p l(p, rho), with p re-maximised
 * at each rho.
 *
 * Method: at rho = 0 the maximiser is the pooled rate sum d / sum n (binomial likelihood, exact).
 * For rho > 0, Newton's method in k = Phi^-1(p) with the exact first and second k-derivatives of
 * the integrated likelihood (computed at the same quadrature nodes), a step limit of 1 in k,
 * backtracking whenever a step does not increase l, and a gradient step where the curvature is not
 * negative; started from the previous solution (warm start). Converged when the step is below
 * 1e-10 in k (relative change of p below ~1e-9).
 *
 * Reference: Gordy & Heitfield (2002), eq. (4); Nocedal, J. & Wright, S. J. (2006), Numerical
 * Optimization, 2nd ed., ch. 3 (line search Newton).
 */
export class ProfileLikelihood {
  readonly likelihood: MixtureLikelihood;
  private warmK: number;
  /** Profile evaluations whose inner maximisation did not converge. */
  failures = 0;

  constructor(panel: Panel) {
    this.likelihood = new MixtureLikelihood(panel);
    const rate = this.likelihood.pooledRate;
    if (!(rate > 0 && rate < 1)) {
      throw new RangeError(
        'ProfileLikelihood: the panel has no defaults (or only defaults), so p has no interior maximum and rho is not identified.',
      );
    }
    this.warmK = normalQuantile(rate);
  }

  /** l*(rho) and the maximising p. */
  at(rho: number): ProfilePoint {
    if (!(rho >= 0 && rho < 1)) {
      throw new RangeError(`ProfileLikelihood: rho must be in [0, 1); got ${rho}.`);
    }
    if (rho === 0) {
      const k = normalQuantile(this.likelihood.pooledRate);
      return { rho, logLik: this.likelihood.logLik(k, 0), pd: this.likelihood.pooledRate, k, converged: true, iterations: 0 };
    }
    const result = this.maximiseK(rho, this.warmK);
    if (result.converged) this.warmK = result.k;
    else this.failures++;
    return { rho, logLik: result.value, pd: normalCdf(result.k), k: result.k, converged: result.converged, iterations: result.iterations };
  }

  private maximiseK(rho: number, start: number): { k: number; value: number; converged: boolean; iterations: number } {
    const L = this.likelihood;
    let k = start;
    let cur = L.logLikWithDerivatives(k, rho);
    for (let iteration = 1; iteration <= 60; iteration++) {
      let step = cur.dkk < 0 ? -cur.dk / cur.dkk : Math.sign(cur.dk) * 0.25;
      if (step > 1) step = 1;
      if (step < -1) step = -1;
      let next = L.logLikWithDerivatives(k + step, rho);
      let halvings = 0;
      while (!(next.value >= cur.value - 1e-12 * Math.abs(cur.value)) && halvings < 40) {
        step *= 0.5;
        next = L.logLikWithDerivatives(k + step, rho);
        halvings++;
      }
      if (halvings === 40) return { k, value: cur.value, converged: Math.abs(cur.dk) < 1e-6, iterations: iteration };
      k += step;
      cur = next;
      if (Math.abs(step) < 1e-10) return { k, value: cur.value, converged: true, iterations: iteration };
    }
    return { k, value: cur.value, converged: false, iterations: 60 };
  }
}

/** Result of {@link binomialMle}. */
export interface BinomialMleResult extends Estimate {
  /** Log-likelihood at the estimate, binomial coefficients included; null when undefined. */
  logLik: number | null;
  /** True when the maximum is at rho = 0 exactly. */
  atBoundary: boolean;
  /** Brent's search over rho and every inner maximisation met their tolerances. */
  converged: boolean;
  /** Iterations of Brent's search over rho. */
  iterations: number;
  /** Profile points computed on the way (the coarse grid and Brent's iterates), for reuse. */
  profilePoints: ProfilePoint[];
}

/** Options of {@link binomialMle}. */
export interface BinomialMleOptions {
  /** Absolute tolerance on rho of Brent's search (default 1e-8). */
  tolerance?: number;
}

function undefinedMle(reason: string): BinomialMleResult {
  return {
    rho: null,
    pd: null,
    status: 'undefined',
    reason,
    logLik: null,
    atBoundary: false,
    converged: true,
    iterations: 0,
    profilePoints: [],
  };
}

/**
 * Binomial-mixture maximum-likelihood estimate of (p, rho) (Gordy & Heitfield 2002).
 *
 * Maximises l(p, rho) = sum_t log Int C(n_t, d_t) P(x)^d_t (1 - P(x))^(n_t - d_t) phi(x) dx over
 * p in (0, 1), rho in [0, RHO_SEARCH_LIMIT] (DESIGN.md key `binomialMle`).
 *
 * Method: the profile l*(rho) = max_p l(p, rho) (ProfileLikelihood: Newton in Phi^-1(p) with exact
 * derivatives) is evaluated on a fixed coarse grid of 15 values of rho from 0 to 0.995; Brent's
 * minimiser (1973) then searches -l* between the neighbours of the best grid point to an absolute
 * tolerance of 1e-8 in rho. So the search is not trapped at a stationary start point and finds the
 * best of several local maxima if the grid separates them. The integral is the mode-bracketed
 * adaptive Gauss-Kronrod rule of mixture-likelihood.ts (relative error ~1e-12).
 *
 * Special cases: when the best grid point is rho = 0 and Brent's search does not improve on it,
 * the estimate is rho = 0 with atBoundary = true and p the pooled rate sum d / sum n (the binomial
 * maximum); a maximum at the search limit is returned with status `clipped`; a panel without
 * defaults (or with only defaults) has no interior maximum in p: status `undefined`. Invalid
 * counts throw RangeError naming the period.
 *
 * @example binomialMle({ obligors: [1000, 1050, 1100], defaults: [8, 12, 25] })
 *
 * Reference: Gordy, M. B. & Heitfield, E. (2002), "Estimating default correlations from short
 * panels of credit rating performance data", Federal Reserve Board working paper, eq. (4);
 * Brent (1973), ch. 5.
 */
export function binomialMle(panel: Panel, options: BinomialMleOptions = {}): BinomialMleResult {
  return binomialMleWithProfile(panel, options).result;
}

/** {@link binomialMle} that also hands back the profile object for the interval methods. */
export function binomialMleWithProfile(
  panel: Panel,
  options: BinomialMleOptions = {},
): { result: BinomialMleResult; profile: ProfileLikelihood | null } {
  const likelihoodCheck = new MixtureLikelihood(panel); // validates the counts (RangeError)
  const rate = likelihoodCheck.pooledRate;
  if (rate === 0) {
    return {
      result: undefinedMle('No period has a default: the likelihood keeps increasing as p -> 0, so neither p nor rho is identified.'),
      profile: null,
    };
  }
  if (rate === 1) {
    return { result: undefinedMle('Every obligor defaulted in every period: p and rho are not identified.'), profile: null };
  }
  const profile = new ProfileLikelihood(panel);
  const points: ProfilePoint[] = [];
  const grid = RHO_GRID.map((rho) => {
    const point = profile.at(rho);
    points.push(point);
    return point;
  });
  let best = 0;
  for (let i = 1; i < grid.length; i++) if (grid[i].logLik > grid[best].logLik) best = i;
  // Warm start near the best grid point.
  profile.at(grid[best].rho === 0 ? grid[1].rho : grid[best].rho);
  const lower = RHO_GRID[Math.max(0, best - 1)];
  const upper = RHO_GRID[Math.min(RHO_GRID.length - 1, best + 1)];
  const search: IterativeResult & { fValue: number } = brentMinimize(
    (rho) => {
      const point = profile.at(rho);
      points.push(point);
      return -point.logLik;
    },
    lower,
    upper,
    { tolerance: options.tolerance ?? 1e-8, maxIterations: 200 },
  );
  let rhoHat = search.value;
  let top = profile.at(rhoHat);
  const atZero = grid[0];
  let atBoundary = false;
  if (atZero.logLik >= top.logLik) {
    rhoHat = 0;
    top = atZero;
    atBoundary = true;
  }
  const converged = search.converged && profile.failures === 0;
  points.sort((a, b) => a.rho - b.rho);
  const base = {
    rho: rhoHat,
    pd: top.pd,
    logLik: top.logLik,
    atBoundary,
    converged,
    iterations: search.iterations,
    profilePoints: points,
  };
  if (!converged) {
    return {
      result: { ...base, status: 'not-converged', reason: 'The likelihood maximisation did not meet its tolerance; do not use this value.' },
      profile,
    };
  }
  if (rhoHat >= RHO_SEARCH_LIMIT - 10 * (options.tolerance ?? 1e-8)) {
    return {
      result: { ...base, status: 'clipped', reason: `The likelihood is largest at the search limit rho = ${RHO_SEARCH_LIMIT}.` },
      profile,
    };
  }
  return { result: { ...base, status: 'ok' }, profile };
}
