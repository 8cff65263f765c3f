import { brentMinimize } from '../brent';
import { safeguardedNewtonRoot } from '../safeguarded-newton';
import { MixtureLikelihood, type Panel } from '../mixture-likelihood';
import { normalCdf, normalQuantile } from '../normal';
import type { Estimate } from './types';

/** Largest rho the optimiser and the profile search consider (the integrand degenerates at 1). */
export const RHO_SEARCH_LIMIT = 0.995;

/**
 * Coarse grid of rho on which the profile and its slope are evaluated before the Newton search
 * (never only a start point). With the slope at each point a maximum between two grid points is
 * seen as a sign change, so this grid resolves what a value-only grid twice as fine would.
 */
export const RHO_GRID: readonly number[] = [0, 0.02, 0.05, 0.1, 0.2, 0.35, 0.55, 0.8];

/**
 * Tolerance on the Newton step in k = Phi^-1(p) at which the inner maximisation stops. The value
 * then reported is the quadratic extrapolation l - l_k^2 / (2 l_kk), whose error is of the order
 * of |l_kkk| step^3 (below 1e-14 here), and the slope is corrected to first order in the step.
 */
const K_TOLERANCE = 1e-6;

/** One point of the profile log-likelihood: p re-maximised at a fixed rho. */
export interface ProfilePoint {
  rho: number;
  /** max over p of the log-likelihood at this rho. */
  logLik: number;
  /** The maximising p and k = Phi^-1(p). */
  pd: number;
  k: number;
  /** Slope of l* in rho: by the envelope theorem, d l / d rho at the maximising k. */
  slope: number;
  /** Second derivative of l* in rho, l_rr - l_kr^2 / l_kk at the maximising k. */
  curvature: number;
  /** The inner maximisation met its tolerance (false for a one-step estimate that did not). */
  converged: boolean;
  /** Likelihood evaluations used for this point (0 when it came from the cache). */
  iterations: number;
}

/**
 * The profile log-likelihood of rho for one panel, l*(rho) = max_p l(p, rho), with p re-maximised
 * at each rho, and its first two derivatives in rho.
 *
 * Method: at rho = 0 the maximiser is the pooled rate sum d / sum n (binomial likelihood, exact).
 * For rho > 0, Newton's method in k = Phi^-1(p) (l is concave in k: each period's integrand is
 * log-concave jointly in x and k, Prekopa 1973) with the exact first and second k-derivatives of
 * the integrated likelihood, a step limit of 1 in k, and backtracking whenever a step does not
 * increase l. It starts from the nearest solved rho moved along the tangent of the path,
 * k*(rho) ~ k*(rho0) - (l_kr / l_kk) (rho - rho0), so that nearby rho usually need one or two
 * likelihood evaluations. Converged when the Newton step is below 1e-6 in k; the value is then
 * the Newton-extrapolated maximum l - l_k^2 / (2 l_kk) (error O(step^3), below 1e-14 here), the
 * slope l_rho + l_kr step (envelope theorem, error O(step^2)) and the curvature
 * l_rr - l_kr^2 / l_kk (implicit function theorem). Solved points are cached by rho.
 *
 * Reference: Gordy & Heitfield (2002), eq. (4); Nocedal, J. & Wright, S. J. (2006), Numerical
 * Optimization, 2nd ed., ch. 3 (line search Newton); Prekopa, A. (1973), "On logarithmic concave
 * measures and functions", Acta Sci. Math. 34:335-343.
 */
export class ProfileLikelihood {
  readonly likelihood: MixtureLikelihood;
  private readonly pooledK: number;
  // Solved points (rho, k*, dk*/drho) kept for warm starts, in order of computation.
  private readonly warmRho: number[] = [];
  private readonly warmK: number[] = [];
  private readonly warmDkDr: number[] = [];
  private readonly cache = new Map<number, ProfilePoint>();
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
    this.pooledK = normalQuantile(rate);
  }

  private remember(rho: number, k: number, dkdr: number): void {
    this.warmRho.push(rho);
    this.warmK.push(k);
    this.warmDkDr.push(Number.isFinite(dkdr) ? dkdr : 0);
  }

  /** Start for k*(rho): the tangent at the nearest solved rho (the pooled k before any). */
  private startK(rho: number): number {
    let best = -1;
    for (let i = 0; i < this.warmRho.length; i++) {
      if (best < 0 || Math.abs(this.warmRho[i] - rho) < Math.abs(this.warmRho[best] - rho)) best = i;
    }
    if (best < 0) return this.pooledK;
    const predicted = this.warmK[best] + this.warmDkDr[best] * (rho - this.warmRho[best]);
    return Number.isFinite(predicted) && Math.abs(predicted - this.warmK[best]) < 1 ? predicted : this.warmK[best];
  }

  /** l*(rho), the maximising p, and the slope and curvature of l* at rho. */
  at(rho: number): ProfilePoint {
    return this.solve(rho, false);
  }

  /**
   * A one-evaluation estimate of the profile at rho: one Newton step in k from the warm start,
   * with the Newton-extrapolated value and slope (errors O(step^3) and O(step^2)). Exact (and
   * `converged`) when that step is below the tolerance, otherwise an estimate for locating the
   * maximum on a coarse grid only. Not counted as a failure.
   */
  estimate(rho: number): ProfilePoint {
    return this.solve(rho, true);
  }

  private solve(rho: number, oneStep: boolean): ProfilePoint {
    if (!(rho >= 0 && rho < 1)) {
      throw new RangeError(`ProfileLikelihood: rho must be in [0, 1); got ${rho}.`);
    }
    const cached = this.cache.get(rho);
    if (cached) return { ...cached, iterations: 0 };
    const L = this.likelihood;
    if (rho === 0) {
      const k = this.pooledK;
      const e = L.logLikFull(k, 0);
      this.remember(0, k, -e.dkr / e.dkk);
      // l_k = 0 here up to rounding: the pooled rate is the binomial maximum.
      const point = {
        rho,
        logLik: e.value,
        pd: L.pooledRate,
        k,
        slope: e.dr,
        curvature: e.drr - (e.dkr * e.dkr) / e.dkk,
        converged: true,
        iterations: 1,
      };
      this.cache.set(rho, point);
      return point;
    }
    let k = this.startK(rho);
    let cur = L.logLikFull(k, rho);
    let evaluations = 1;
    let stalled = false;
    for (let iteration = 1; iteration <= 61; iteration++) {
      const concave = cur.dkk < 0;
      let step = concave ? -cur.dk / cur.dkk : Math.sign(cur.dk) * 0.25;
      const small = concave && (Math.abs(step) <= K_TOLERANCE || stalled);
      if (small || (oneStep && concave && Math.abs(step) < 1)) {
        const kStar = k + step;
        this.remember(rho, kStar, -cur.dkr / cur.dkk);
        const point = {
          rho,
          logLik: cur.value + 0.5 * cur.dk * step,
          pd: normalCdf(kStar),
          k: kStar,
          slope: cur.dr + cur.dkr * step,
          curvature: cur.drr - (cur.dkr * cur.dkr) / cur.dkk,
          converged: small,
          iterations: evaluations,
        };
        if (small) this.cache.set(rho, point);
        return point;
      }
      if (step > 1) step = 1;
      if (step < -1) step = -1;
      let next = L.logLikFull(k + step, rho);
      evaluations++;
      let halvings = 0;
      while (!(next.value >= cur.value - 1e-12 * Math.abs(cur.value)) && halvings < 40) {
        step *= 0.5;
        next = L.logLikFull(k + step, rho);
        evaluations++;
        halvings++;
      }
      if (halvings === 40) {
        // No step increases l beyond rounding. For cohorts of 10^9 the value carries rounding
        // noise of ~1e-8 relative and l_k of ~1e-4, which no Newton step can beat: when the gain
        // the Newton step predicts, l_k^2 / (2 |l_kk|), is below 1e-8 relative the maximum is
        // reached as far as the arithmetic can tell (a statistically nil difference); else it failed.
        if (concave && (0.5 * cur.dk * cur.dk) / -cur.dkk <= 1e-8 * Math.max(1, Math.abs(cur.value))) {
          stalled = true;
          continue;
        }
        break;
      }
      k += step;
      cur = next;
    }
    // Not converged within 60 Newton steps (or stuck): report the last iterate as such.
    const converged = Math.abs(cur.dk) < 1e-6;
    if (!converged && !oneStep) this.failures++;
    const point = {
      rho,
      logLik: cur.value,
      pd: normalCdf(k),
      k,
      slope: cur.dr,
      curvature: cur.drr - (cur.dkr * cur.dkr) / cur.dkk,
      converged,
      iterations: evaluations,
    };
    if (converged) this.cache.set(rho, point);
    return point;
  }
}

/** Result of {@link binomialMle}. */
export interface BinomialMleResult extends Estimate {
  /** Log-likelihood at the estimate, binomial coefficients included; null when undefined. */
  logLik: number | null;
  /** True when the maximum is at rho = 0 exactly. */
  atBoundary: boolean;
  /** The search over rho and every inner maximisation met their tolerances. */
  converged: boolean;
  /** Iterations of the search over rho (after the grid). */
  iterations: number;
  /** Profile points computed on the way (the coarse grid and the search's iterates), sorted by rho, for reuse. */
  profilePoints: ProfilePoint[];
}

/** Options of {@link binomialMle}. */
export interface BinomialMleOptions {
  /** Absolute tolerance on rho of the search (default 1e-9; never finer than 1e-6 standard errors of rho). */
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
 * Method: the profile l*(rho) = max_p l(p, rho) and its slope (ProfileLikelihood: Newton in
 * Phi^-1(p) with exact derivatives) are evaluated on the coarse grid RHO_GRID (8 values from 0 to
 * 0.8). From the best grid point the slope says on which side the maximum lies; the bracket
 * between it and its neighbour (or the search limit 0.995) with slope > 0 at the left end and < 0
 * at the right end holds a stationary point, found as the root of the slope by safeguarded Newton
 * (the profile's curvature as derivative, bisection when a step leaves the bracket; absolute
 * tolerance 1e-9 in rho by default, or 1e-6 standard errors of rho if coarser). If the slopes do not bracket a sign change (a local minimum
 * between grid points), Brent's minimiser (1973) searches the two grid intervals around the best
 * point instead. So the search is not trapped at a stationary start point and finds the best of
 * several local maxima if the grid separates them. The integral is the mode-bracketed adaptive
 * Gauss-Kronrod rule of mixture-likelihood.ts (relative error ~1e-12). A T = 20 panel takes
 * about 20-25 likelihood evaluations (the 15-point value grid with Brent's search took ~110).
 *
 * Special cases: when the best grid point is rho = 0 with a negative slope there (the score test
 * direction), or no interior point beats it, the estimate is rho = 0 with atBoundary = true and p
 * the pooled rate sum d / sum n (the binomial maximum); a maximum at the search limit is returned
 * with status `clipped`; a panel without defaults (or with only defaults) has no interior maximum
 * in p: status `undefined`. Invalid counts throw RangeError naming the period.
 *
 * @example binomialMle({ obligors: [1000, 1050, 1100], defaults: [8, 12, 25] })
 *
 * Reference: Gordy, M. B. & Heitfield, E. (2002), "Estimating default correlations from short
 * panels of credit rating performance data", Federal Reserve Board working paper, eq. (4);
 * Press et al. (2007), Numerical Recipes, 3rd ed., section 9.4 (safeguarded Newton);
 * Brent (1973), ch. 5.
 */
export function binomialMle(panel: Panel, options: BinomialMleOptions = {}): BinomialMleResult {
  return binomialMleWithProfile(panel, options).result;
}

/**
 * The derivative to use in Newton's step for the root of the profile slope s(rho): c + 2 s / rho
 * (c the curvature), which is Newton's step for rho s(rho) as a function of lambda = 1 / rho.
 * For large cohorts l* behaves like (T/2) log lambda - lambda S / 2 (the Vasicek large-pool
 * likelihood), whose lambda-derivative times lambda is linear in lambda, so this step is nearly
 * exact where the plain step in rho undershoots badly near 0; at the root (s = 0) it equals c, so
 * convergence stays quadratic.
 */
function reciprocalNewtonSlope(q: ProfilePoint): number {
  return q.rho > 0 ? q.curvature + (2 * q.slope) / q.rho : q.curvature;
}

/** {@link binomialMle} that also hands back the profile object for the interval methods. */
export function binomialMleWithProfile(
  panel: Panel,
  options: BinomialMleOptions = {},
): { result: BinomialMleResult; profile: ProfileLikelihood | null } {
  new MixtureLikelihood(panel); // validates the counts (RangeError naming the period)
  try {
    return search(panel, options);
  } catch (err) {
    // An integral that failed (mixture-likelihood.ts says where) is this estimate's failure, not the caller's.
    if (!(err instanceof RangeError)) throw err;
    return {
      result: {
        ...undefinedMle(`The likelihood could not be evaluated: ${err.message}`),
        status: 'not-converged',
        converged: false,
      },
      profile: null,
    };
  }
}

function search(panel: Panel, options: BinomialMleOptions): { result: BinomialMleResult; profile: ProfileLikelihood | null } {
  const likelihoodCheck = new MixtureLikelihood(panel);
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
  const tolerance = options.tolerance ?? 1e-9;
  const profile = new ProfileLikelihood(panel);
  const points: ProfilePoint[] = [];
  const at = (rho: number): ProfilePoint => {
    const point = profile.at(rho);
    points.push(point);
    return point;
  };
  // One-step estimates on the grid (exact at rho = 0); only the bracket ends are then solved.
  const grid = RHO_GRID.map((rho) => {
    const point = profile.estimate(rho);
    if (point.converged) points.push(point);
    return point;
  });
  let best = 0;
  for (let i = 1; i < grid.length; i++) if (grid[i].logLik > grid[best].logLik) best = i;
  const atZero = grid[0];

  let top = atZero;
  let iterations = 0;
  let searchConverged = true;
  // Bracket [ends[i], ends[i + 1]] with slope >= 0 at the left end and <= 0 at the right end,
  // found from the best grid point and moved (with solved ends) while the solved slopes say the
  // maximum lies further left or right.
  const ends = [...RHO_GRID, RHO_SEARCH_LIMIT];
  let i = grid[best].slope > 0 ? best : best - 1;
  let direction = 0;
  let fallback = false;
  while (i >= 0) {
    const left = at(ends[i]);
    const right = at(ends[i + 1]);
    if (left.slope >= 0 && right.slope <= 0) {
      // Stop at 1e-6 standard errors of rho (1 / sqrt(-curvature)) if that is coarser than the
      // tolerance: for cohorts of millions the slope carries quadrature noise of ~1e-8 relative
      // to its terms, which no finer tolerance can beat, and such a step is statistically nil.
      const start = left.logLik >= right.logLik ? left : right;
      const tol = start.curvature < 0 ? Math.max(tolerance, 1e-6 / Math.sqrt(-start.curvature)) : tolerance;
      let last = left;
      const search = safeguardedNewtonRoot(
        (rho) => {
          last = at(rho);
          return { f: last.slope, df: reciprocalNewtonSlope(last) };
        },
        left.rho,
        right.rho,
        left.slope,
        right.slope,
        { tolerance: tol, start: start.rho, maxIterations: 100 },
      );
      iterations = search.iterations;
      searchConverged = search.converged;
      top = search.value === last.rho ? last : profile.at(search.value); // evaluated before: cached
      break;
    }
    if (left.slope > 0 && right.slope > 0 && direction >= 0) {
      if (i + 1 === ends.length - 1) {
        top = right; // increasing up to the search limit: clipped below
        break;
      }
      direction = 1;
      i++;
    } else if (left.slope < 0 && right.slope < 0 && direction <= 0) {
      direction = -1;
      i--; // at i = -1 the maximum is at rho = 0 (negative slope there)
    } else {
      fallback = true; // a local minimum between the ends, or the slopes disagree with the grid
      break;
    }
  }
  if (fallback) {
    // Search the value itself around the bracket with Brent's minimiser.
    const lower = ends[Math.max(0, i - 1)];
    const upper = ends[Math.min(ends.length - 1, i + 2)];
    const search = brentMinimize((rho) => -at(rho).logLik, lower, upper, { tolerance, maxIterations: 200 });
    iterations = search.iterations;
    searchConverged = search.converged;
    top = at(search.value);
  }
  let rhoHat = top.rho;
  let atBoundary = false;
  if (atZero.logLik >= top.logLik) {
    rhoHat = 0;
    top = atZero;
    atBoundary = true;
  }
  const converged = searchConverged && profile.failures === 0;
  points.sort((a, b) => a.rho - b.rho);
  const base = {
    rho: rhoHat,
    pd: top.pd,
    logLik: top.logLik,
    atBoundary,
    converged,
    iterations,
    profilePoints: points,
  };
  if (!converged) {
    return {
      result: { ...base, status: 'not-converged', reason: 'The likelihood maximisation did not meet its tolerance; do not use this value.' },
      profile,
    };
  }
  if (rhoHat >= RHO_SEARCH_LIMIT - 10 * tolerance) {
    return {
      result: { ...base, status: 'clipped', reason: `The likelihood is largest at the search limit rho = ${RHO_SEARCH_LIMIT}.` },
      profile,
    };
  }
  return { result: { ...base, status: 'ok' }, profile };
}
