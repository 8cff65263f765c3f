/**
 * Maximum likelihood for the Vasicek one-factor model with a persistent (AR(1)) factor: the
 * estimator `ar1Mle` of (p, rho, phi), and the profile likelihoods of rho and of phi its
 * intervals are built on (intervals/ar1-intervals.ts).
 */
import { Ar1Likelihood, type Ar1LikelihoodOptions } from '../ar1-likelihood';
import { boxNewtonMaximize } from '../box-newton';
import { assertPanel, type Panel } from '../panel';
import { normalCdf, normalQuantile } from '../normal';
import { binomialMle, RHO_SEARCH_LIMIT } from './binomial-mle';
import type { Estimate } from './types';

/** Largest |phi| the search considers; an estimate there is reported as at the edge. */
export const AR1_PHI_LIMIT = 0.99;
/** Fewest periods for which the AR(1) model is fitted (three parameters, one of them a lag). */
export const AR1_MIN_PERIODS = 6;
/** Smallest rho of the Newton search (rho = 0 itself is evaluated exactly and compared). */
const RHO_FLOOR = 1e-7;
const K_BOUND = 8.5;
const MAX_STEP = [1, 0.2, 0.4];

/** One point of an AR(1) profile: the profiled parameter fixed, the others re-maximised. */
export interface Ar1ProfilePoint {
  rho: number;
  /** The maximising phi; null at rho = 0, where phi has no effect. */
  phi: number | null;
  k: number;
  pd: number;
  logLik: number;
  /** Slope of the profile in the profiled parameter (envelope theorem); null at rho = 0. */
  slope: number | null;
  /** Second derivative of the profile (Schur complement of the Hessian); null where undefined. */
  curvature: number | null;
  converged: boolean;
}

/** The full maximum from a start. */
interface Ar1Maximum {
  k: number;
  rho: number;
  phi: number;
  logLik: number;
  converged: boolean;
  iterations: number;
  atBound: boolean[];
}

/**
 * Profile likelihoods of the AR(1)-factor model for one panel: l**(rho) = max over (p, phi), and
 * l***(phi) = max over (p, rho), with warm starts from the nearest point already solved.
 *
 * Method: projected Newton (box-newton.ts) in (k, rho, phi), k = Phi^-1(p), with the exact
 * gradient and Hessian of Ar1Likelihood, k in [-8.5, 8.5], rho in [1e-7, 0.995],
 * phi in [-0.99, 0.99], steps of at most 1, 0.2 and 0.4; converged when the Newton gain is below
 * 1e-10. At rho = 0 the profile is the binomial likelihood at the pooled rate, exactly (phi has no
 * effect). The profile slope is the partial derivative in the profiled parameter at the inner
 * maximum (envelope theorem), its curvature the Schur complement of the Hessian.
 *
 * Reference: Nocedal & Wright (2006), ch. 3 and 16; Venzon & Moolgavkar (1988).
 */
export class Ar1Profile {
  readonly likelihood: Ar1Likelihood;
  readonly pooledRate: number;
  private readonly solved: { k: number; rho: number; phi: number }[] = [];
  /** Inner maximisations that did not converge. */
  failures = 0;

  constructor(panel: Panel, options: Ar1LikelihoodOptions = {}) {
    this.likelihood = new Ar1Likelihood(panel, options);
    let sn = 0;
    let sd = 0;
    for (let t = 0; t < panel.obligors.length; t++) {
      sn += panel.obligors[t];
      sd += panel.defaults[t];
    }
    this.pooledRate = sd / sn;
    if (!(this.pooledRate > 0 && this.pooledRate < 1)) {
      throw new RangeError('Ar1Profile: the panel has no defaults (or only defaults), so p has no interior maximum and rho is not identified.');
    }
  }

  private problem(fixed: boolean[]) {
    const L = this.likelihood;
    return {
      evaluate: (x: readonly number[]) => {
        const e = L.logLikFull(x[0], x[1], x[2]);
        return { value: e.value, gradient: e.gradient, hessian: e.hessian };
      },
      lower: [-K_BOUND, RHO_FLOOR, -AR1_PHI_LIMIT],
      upper: [K_BOUND, RHO_SEARCH_LIMIT, AR1_PHI_LIMIT],
      maxStep: MAX_STEP,
      fixed,
      // at the rho floor the factor has (almost) no weight and phi (almost) no effect: hold it
      idleAt: (atBound: readonly boolean[], x: readonly number[]) => [false, false, atBound[1] && x[1] <= RHO_FLOOR],
    };
  }

  private nearest(index: 1 | 2, value: number): { k: number; rho: number; phi: number } {
    let best = this.solved[0];
    for (const s of this.solved) {
      const key = index === 1 ? s.rho : s.phi;
      const bestKey = index === 1 ? best.rho : best.phi;
      if (Math.abs(key - value) < Math.abs(bestKey - value)) best = s;
    }
    return best;
  }

  /** The full maximum from a start point (k, rho, phi). */
  maximize(start: { k: number; rho: number; phi: number }): Ar1Maximum {
    const r = boxNewtonMaximize(this.problem([false, false, false]), [start.k, Math.max(RHO_FLOOR, start.rho), start.phi]);
    this.solved.push({ k: r.x[0], rho: r.x[1], phi: r.x[2] });
    return { k: r.x[0], rho: r.x[1], phi: r.x[2], logLik: r.value, converged: r.converged, iterations: r.iterations, atBound: r.atBound };
  }

  /** The last point solved (a restart point when a profile beat the estimate). */
  lastSolved(): { k: number; rho: number; phi: number } {
    if (this.solved.length === 0) throw new RangeError('Ar1Profile.lastSolved: nothing has been solved yet.');
    return this.solved[this.solved.length - 1];
  }

  /** The binomial likelihood at the pooled rate: the profile of rho at rho = 0. */
  atZero(): Ar1ProfilePoint {
    const k = normalQuantile(this.pooledRate);
    return { rho: 0, phi: null, k, pd: this.pooledRate, logLik: this.likelihood.logLik(k, 0, 0), slope: null, curvature: null, converged: true };
  }

  /** l**(rho) = max over (k, phi) at fixed rho, with its slope and curvature in rho. */
  atRho(rho: number): Ar1ProfilePoint {
    if (!(rho >= 0 && rho <= RHO_SEARCH_LIMIT)) throw new RangeError(`Ar1Profile.atRho: rho must be in [0, ${RHO_SEARCH_LIMIT}]; got ${rho}.`);
    if (rho === 0) return this.atZero();
    if (this.solved.length === 0) throw new RangeError('Ar1Profile.atRho: maximise first (the profile needs a start).');
    const s = this.nearest(1, rho);
    const r = boxNewtonMaximize(this.problem([false, true, false]), [s.k, rho, s.phi]);
    if (!r.converged) this.failures++;
    this.solved.push({ k: r.x[0], rho, phi: r.x[2] });
    return this.point(r, 1);
  }

  /** l***(phi) = max over (k, rho) at fixed phi, with its slope and curvature in phi. */
  atPhi(phi: number): Ar1ProfilePoint {
    if (!(phi >= -AR1_PHI_LIMIT && phi <= AR1_PHI_LIMIT)) {
      throw new RangeError(`Ar1Profile.atPhi: phi must be in [-${AR1_PHI_LIMIT}, ${AR1_PHI_LIMIT}]; got ${phi}.`);
    }
    if (this.solved.length === 0) throw new RangeError('Ar1Profile.atPhi: maximise first (the profile needs a start).');
    const s = this.nearest(2, phi);
    const r = boxNewtonMaximize(this.problem([false, false, true]), [s.k, s.rho, phi]);
    if (!r.converged) this.failures++;
    this.solved.push({ k: r.x[0], rho: r.x[1], phi });
    // rho pushed to its floor: the factor has (almost) no weight; the binomial likelihood at rho = 0
    // may be higher still (the floor is not 0).
    if (r.x[1] <= 2 * RHO_FLOOR) {
      const zero = this.atZero();
      if (zero.logLik >= r.value) return { ...zero, rho: 0, phi, slope: 0, curvature: null };
    }
    return this.point(r, 2);
  }

  private point(r: ReturnType<typeof boxNewtonMaximize>, profiled: 1 | 2): Ar1ProfilePoint {
    const H = r.hessian;
    // Schur complement over the free coordinates (k and the other of rho/phi unless at a bound).
    const others = [0, profiled === 1 ? 2 : 1].filter((i) => !r.atBound[i]);
    let curvature: number | null = H[profiled][profiled];
    if (others.length === 1) {
      const i = others[0];
      curvature -= (H[profiled][i] * H[i][profiled]) / H[i][i];
    } else if (others.length === 2) {
      const [i, j] = others;
      const det = H[i][i] * H[j][j] - H[i][j] * H[j][i];
      const bi = H[profiled][i];
      const bj = H[profiled][j];
      curvature -= (bi * (H[j][j] * bi - H[i][j] * bj) + bj * (H[i][i] * bj - H[j][i] * bi)) / det;
    }
    if (!Number.isFinite(curvature)) curvature = null;
    return {
      rho: r.x[1],
      phi: r.x[2],
      k: r.x[0],
      pd: normalCdf(r.x[0]),
      logLik: r.value,
      slope: r.gradient[profiled],
      curvature,
      converged: r.converged,
    };
  }
}

/** Result of {@link ar1Mle}. */
export interface Ar1MleResult extends Estimate {
  /** The factor's AR(1) coefficient; null when undefined or when rho = 0 (phi has no effect there). */
  phi: number | null;
  /** Log-likelihood at the estimate (binomial coefficients included); null when undefined. */
  logLik: number | null;
  /** The maximum is at rho = 0. */
  atBoundary: boolean;
  /** The estimate of phi is at the edge of the search, |phi| = 0.99. */
  phiAtEdge: boolean;
  /** binomialMle's maximum (the independent-factor model, phi = 0); null when undefined. */
  logLikIndependent: number | null;
  converged: boolean;
  /** Newton iterations of the full maximisation. */
  iterations: number;
}

/** Options of {@link ar1Mle}. */
export interface Ar1MleOptions extends Ar1LikelihoodOptions {
  /** A start point to add to the default ones (used when a profile found a higher point). */
  start?: { pd: number; rho: number; phi: number };
}

function undefinedAr1(reason: string, logLikIndependent: number | null = null): Ar1MleResult {
  return {
    rho: null,
    pd: null,
    phi: null,
    status: 'undefined',
    reason,
    logLik: null,
    atBoundary: false,
    phiAtEdge: false,
    logLikIndependent,
    converged: true,
    iterations: 0,
  };
}

/**
 * Maximum-likelihood estimate of (p, rho, phi) for the Vasicek model with an AR(1) factor
 * (key `ar1Mle`).
 *
 * Maximises l(p, rho, phi) = log Int prod_t C(n_t, d_t) P(z_t)^d_t (1 - P(z_t))^(n_t - d_t)
 * p_phi(z_1..z_T) dz (ar1-likelihood.ts) over p in (0, 1), rho in [0, 0.995], phi in
 * [-0.99, 0.99].
 *
 * Method: binomialMle gives (p0, rho0), the maximum at phi = 0. The likelihood is evaluated at
 * eight starts (p0 with rho0 and 1.5 rho0, phi in {-0.5, 0, 0.5, 0.85}; plus options.start) and
 * projected Newton (Ar1Profile) runs from the best; the result is compared with the binomial
 * likelihood at rho = 0 and with binomialMle's maximum (the likelihood at phi = 0 is binomialMle's
 * exactly). The intervals (ar1-intervals.ts) evaluate the profiles around the estimate and
 * re-maximise from any point they find higher, so a second local maximum they cross is not missed.
 *
 * Special cases (status and sentence): fewer than 6 periods, no defaults at all or only defaults:
 * `undefined`; a maximum at rho = 0: rho = 0, phi null (the factor has no weight, so its
 * persistence is not identified), atBoundary; |phi| at the search edge 0.99: `clipped` (the
 * factor is close to a random walk, or alternates, and the stationary model is at its limit);
 * rho at 0.995: `clipped`; a search that did not converge: `not-converged`. Invalid counts throw
 * RangeError naming the period.
 *
 * @example ar1Mle({ obligors: new Array(20).fill(1000), defaults: [...] }).result // { rho, pd, phi, logLik, ... }
 *
 * Reference: McNeil, A. J. & Wendin, J. (2007), "Bayesian inference for generalized linear mixed
 * models of portfolio credit risk", Journal of Empirical Finance 14:131-149 (the model, with
 * autocorrelated random effects); Koopman, S. J., Lucas, A. & Schwaab, B. (2012), Journal of
 * Business & Economic Statistics 30:521-532 (maximum likelihood for latent dynamic default factors).
 */
export function ar1Mle(panel: Panel, options: Ar1MleOptions = {}): { result: Ar1MleResult; profile: Ar1Profile | null } {
  assertPanel(panel, 'ar1Mle');
  const T = panel.obligors.length;
  if (T < AR1_MIN_PERIODS) {
    return {
      result: undefinedAr1(
        `The AR(1) model needs at least ${AR1_MIN_PERIODS} periods to tell a persistent factor from an independent one; this panel has ${T}.`,
      ),
      profile: null,
    };
  }
  const independent = binomialMle(panel);
  if (independent.rho === null || independent.pd === null || independent.logLik === null) {
    return {
      result: undefinedAr1(independent.reason ?? 'The independent-factor fit has no estimate, so neither has the AR(1) model.'),
      profile: null,
    };
  }
  const profile = new Ar1Profile(panel, options);
  const L = profile.likelihood;
  const k0 = normalQuantile(independent.pd);
  const rho0 = Math.max(independent.rho, 0.01);
  const starts: { k: number; rho: number; phi: number }[] = [];
  for (const phi of [-0.5, 0, 0.5, 0.85]) {
    starts.push({ k: k0, rho: rho0, phi });
    starts.push({ k: k0, rho: Math.min(0.9, 1.5 * rho0), phi });
  }
  if (options.start) starts.push({ k: normalQuantile(options.start.pd), rho: Math.max(RHO_FLOOR, options.start.rho), phi: options.start.phi });
  let best = starts[0];
  let bestValue = -Infinity;
  for (const s of starts) {
    const v = L.logLik(s.k, s.rho, s.phi);
    if (v > bestValue) {
      bestValue = v;
      best = s;
    }
  }
  let top = profile.maximize(best);
  // phi = 0 with binomialMle's (p, rho) is a point of this model: never report less.
  if (independent.logLik > top.logLik + 1e-9 && independent.rho > 0) {
    const again = profile.maximize({ k: k0, rho: independent.rho, phi: 0 });
    if (again.logLik > top.logLik) top = again;
  }
  const zero = profile.atZero();
  const converged = top.converged;
  if (zero.logLik >= top.logLik || top.rho <= 2 * RHO_FLOOR) {
    {
      return {
        result: {
          rho: 0,
          pd: profile.pooledRate,
          phi: null,
          status: 'ok',
          reason: 'The likelihood is largest at rho = 0: the factor has no weight, so its persistence phi is not identified.',
          logLik: zero.logLik,
          atBoundary: true,
          phiAtEdge: false,
          logLikIndependent: independent.logLik,
          converged,
          iterations: top.iterations,
        },
        profile,
      };
    }
  }
  const phiAtEdge = Math.abs(top.phi) >= AR1_PHI_LIMIT - 1e-9;
  const base = {
    rho: top.rho,
    pd: normalCdf(top.k),
    phi: top.phi,
    logLik: top.logLik,
    atBoundary: false,
    phiAtEdge,
    logLikIndependent: independent.logLik,
    converged,
    iterations: top.iterations,
  };
  if (!converged || L.coarse > 0) {
    return {
      result: {
        ...base,
        status: 'not-converged',
        reason: L.coarse > 0 ? 'The factor integral needed more nodes than allowed; do not use this value.' : 'The likelihood maximisation did not meet its tolerance; do not use this value.',
      },
      profile,
    };
  }
  if (phiAtEdge) {
    return {
      result: {
        ...base,
        status: 'clipped',
        reason: `The likelihood is largest at the edge phi = ${top.phi > 0 ? '' : '-'}${AR1_PHI_LIMIT} of the search: the factor behaves like a ${top.phi > 0 ? 'random walk' : 'strictly alternating series'} over this window, which the stationary AR(1) model describes only at its limit.`,
      },
      profile,
    };
  }
  if (top.rho >= RHO_SEARCH_LIMIT - 1e-9) {
    return { result: { ...base, status: 'clipped', reason: `The likelihood is largest at the search limit rho = ${RHO_SEARCH_LIMIT}.` }, profile };
  }
  return { result: { ...base, status: 'ok' }, profile };
}
