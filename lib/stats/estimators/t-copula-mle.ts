/**
 * Maximum likelihood of the one-factor Student-t copula (p, rho, nu) for one panel, with the
 * profile likelihoods of rho and of nu and their intervals.
 */
import { gridMaximize } from '../grid-maximize';
import { likelihoodRatioEnds } from '../intervals/likelihood-ratio';
import { PROFILE_DROP_95 } from '../fit-warnings';
import { assertPanel, type Panel } from '../panel';
import { INVERSE_NU_LIMIT, studentT, TCopulaLikelihood, tQuantile } from '../t-copula-likelihood';
import type { TableAccuracy } from '../threshold-likelihood';
import { RHO_SEARCH_LIMIT } from './binomial-mle';
import type { EstimateStatus } from './types';

/** Largest 1/nu the search considers (nu >= 2.04); a maximum there is reported as clipped. */
export const INVERSE_NU_SEARCH_LIMIT = 0.49;
/** Grid of 1/nu of the nu profile (0 is the Gaussian limit, a candidate of its own). */
export const INVERSE_NU_GRID: readonly number[] = [0, 0.08, 0.17, 0.27, 0.38, INVERSE_NU_SEARCH_LIMIT];
/** Grid of sqrt(rho) of the rho search at fixed nu (0 is a candidate of its own). */
export const SQRT_RHO_GRID: readonly number[] = [0, 0.15, 0.3, 0.5, 0.7, Math.sqrt(RHO_SEARCH_LIMIT)];
/** Argument tolerance of the one-dimensional searches in sqrt(rho) and 1/nu. */
const SEARCH_TOLERANCE = 1e-4;
/** Newton decrement l_k^2 / |l_kk| below which the maximum over k_nu is extrapolated (gain < 5e-8). */
const NEWTON_DECREMENT = 1e-7;
/** Step of the central differences that give a profile's slope (envelope theorem). */
const SLOPE_STEP = 1e-5;

if (!(INVERSE_NU_SEARCH_LIMIT < INVERSE_NU_LIMIT)) throw new Error('t-copula-mle: the search limit of 1/nu must stay below 1/2.');

/** A profile-likelihood interval; an end at a bound is that bound, null when unbounded. */
export interface OpenInterval {
  level: number;
  lower: number | null;
  upper: number | null;
}

/** The fitted t copula. */
export interface TCopulaFit {
  rho: number | null;
  pd: number | null;
  /** Degrees of freedom; null at the Gaussian limit (nu = infinity) or when undefined. */
  nu: number | null;
  /** 1/nu (0 at the Gaussian limit). */
  inverseNu: number | null;
  logLik: number | null;
  /** Maximum of the Gaussian law on the same data (1/nu = 0), for the likelihood-ratio test. */
  gaussianLogLik: number | null;
  status: EstimateStatus;
  reason?: string;
  intervals: { profile: OpenInterval | null };
  /** Interval of nu; upper null when the profile stays above the cut-off up to nu = infinity. */
  nuInterval: OpenInterval | null;
  /** The profile of nu varies by less than the 95% cut-off over the whole range of 1/nu: nu is weakly identified. */
  nuProfileFlat: boolean | null;
  /** The nu profile on its grid: 1/nu and the log-likelihood maximised over (p, rho). */
  nuProfile: { inverseNu: number; logLik: number }[];
}

/** A point of a t-copula profile: the free parameters re-maximised. */
export interface TCopulaPoint {
  logLik: number;
  kt: number;
  rho: number;
  inverseNu: number;
  converged: boolean;
}

const nuOf = (w: number) => (w === 0 ? Number.POSITIVE_INFINITY : 1 / w);

/**
 * Profile likelihoods of the t copula for one panel, parametrised by k_nu = t_nu^-1(p),
 * a = sqrt(rho) and w = 1/nu (optimising in sqrt(rho) and 1/nu, as the ridge between them asks).
 *
 * Method: at fixed (rho, w) the maximum over k_nu is Newton's method with the exact k-derivatives
 * of TCopulaLikelihood (step halving when a step does not increase the value); at fixed rho the
 * maximum over w, and at fixed w over a, is gridMaximize (a grid with both ends as candidates,
 * then Brent), so rho = 0 and 1/nu = 0 are always explicit candidates and the whole region is
 * searched. The slope of a profile is the partial derivative of l at the inner maximum (envelope
 * theorem), by a central difference.
 *
 * Reference: Nocedal & Wright (2006), ch. 3; Brent (1973), ch. 5; Venzon & Moolgavkar (1988).
 */
export class TCopulaProfile {
  readonly likelihood: TCopulaLikelihood;
  readonly pooledRate: number;
  private lastPd: number;
  /** Inner maximisations that did not converge. */
  failures = 0;
  private readonly decrement: number;

  /**
   * @param options.newtonDecrement the Newton decrement below which the inner maximum over k_nu is
   * extrapolated (default 1e-7: the value then misses the maximum by far less than 1e-10).
   */
  constructor(panel: Panel, options: { newtonDecrement?: number; tableAccuracy?: Readonly<TableAccuracy> } = {}) {
    this.decrement = options.newtonDecrement ?? NEWTON_DECREMENT;
    this.likelihood = new TCopulaLikelihood(panel, options.tableAccuracy ? { tableAccuracy: options.tableAccuracy } : {});
    this.pooledRate = this.likelihood.pooledRate;
    this.lastPd = this.pooledRate;
    if (!(this.pooledRate > 0 && this.pooledRate < 1)) {
      throw new RangeError('TCopulaProfile: the panel has no defaults (or only defaults), so p has no interior maximum.');
    }
  }

  /** max over k_nu of l(k_nu, rho, w). */
  atRhoAndInverseNu(rho: number, w: number): TCopulaPoint {
    const nu = nuOf(w);
    const L = this.likelihood;
    let kt = tQuantile(this.lastPd, nu);
    let cur = L.logLikWithDerivatives(kt, rho, nu);
    let converged = false;
    let value = cur.value;
    for (let iteration = 0; iteration < 60; iteration++) {
      const decrement = cur.dkk < 0 ? (cur.dk * cur.dk) / -cur.dkk : Number.POSITIVE_INFINITY;
      if (decrement < this.decrement) {
        // The last Newton step is not taken but extrapolated: l + decrement / 2 at k - l_k / l_kk
        // (error of order l_kkk step^3, below 1e-12 at the default decrement), as binomialMle's inner maximisation.
        value = cur.value + 0.5 * decrement;
        kt -= cur.dk / cur.dkk;
        converged = true;
        break;
      }
      let step = cur.dkk < 0 ? -cur.dk / cur.dkk : Math.sign(cur.dk) * 0.25;
      if (Math.abs(step) > 1) step = Math.sign(step);
      let moved = false;
      for (let halvings = 0; halvings < 30; halvings++) {
        const next = L.logLikWithDerivatives(kt + step, rho, nu);
        if (next.value >= cur.value - 1e-12 * Math.abs(cur.value)) {
          kt += step;
          cur = next;
          value = cur.value;
          moved = true;
          break;
        }
        step *= 0.5;
      }
      if (!moved) {
        converged = Math.abs(cur.dk) < 1e-6 * Math.max(1, Math.abs(cur.value));
        break;
      }
    }
    if (!converged) this.failures++;
    this.lastPd = studentT(kt, nu);
    return { logLik: value, kt, rho, inverseNu: w, converged };
  }

  /** The rho profile: max over (p, nu) at rho. */
  atRho(rho: number): TCopulaPoint {
    let best: TCopulaPoint | null = null;
    const r = gridMaximize(
      (w) => {
        const q = this.atRhoAndInverseNu(rho, w);
        if (best === null || q.logLik > best.logLik) best = q;
        return q.logLik;
      },
      [...INVERSE_NU_GRID],
      SEARCH_TOLERANCE,
    );
    return { ...(best as unknown as TCopulaPoint), converged: r.converged };
  }

  /** The nu profile: max over (p, rho) at w = 1/nu. */
  atInverseNu(w: number): TCopulaPoint {
    let best: TCopulaPoint | null = null;
    const r = gridMaximize(
      (a) => {
        const q = this.atRhoAndInverseNu(Math.min(a * a, RHO_SEARCH_LIMIT), w);
        if (best === null || q.logLik > best.logLik) best = q;
        return q.logLik;
      },
      [...SQRT_RHO_GRID],
      SEARCH_TOLERANCE,
    );
    return { ...(best as unknown as TCopulaPoint), converged: r.converged };
  }

  /** d l / d rho at fixed (k_nu, w) (the rho profile's slope at its inner maximum); null at a bound. */
  rhoSlope(q: TCopulaPoint): number | null {
    const h = SLOPE_STEP;
    if (q.rho - h < 0 || q.rho + h >= 1) return null;
    const nu = nuOf(q.inverseNu);
    return (this.likelihood.logLik(q.kt, q.rho + h, nu) - this.likelihood.logLik(q.kt, q.rho - h, nu)) / (2 * h);
  }

  /** d l / d w at fixed (k_nu, rho) (the nu profile's slope at its inner maximum); null at a bound. */
  inverseNuSlope(q: TCopulaPoint): number | null {
    const h = SLOPE_STEP;
    if (q.inverseNu - h <= 0 || q.inverseNu + h > INVERSE_NU_LIMIT) return null;
    return (this.likelihood.logLik(q.kt, q.rho, 1 / (q.inverseNu + h)) - this.likelihood.logLik(q.kt, q.rho, 1 / (q.inverseNu - h))) / (2 * h);
  }
}

/** Why the t copula cannot be estimated on a panel (no defaults, only defaults, one year), or null. */
function undefinedReason(panel: Panel): string | null {
  let sn = 0;
  let sd = 0;
  for (let t = 0; t < panel.obligors.length; t++) {
    sn += panel.obligors[t];
    sd += panel.defaults[t];
  }
  if (sd === 0) return 'The panel has no defaults: p has no interior maximum, so the t copula is not estimated.';
  if (sd === sn) return 'Every obligor defaulted: p has no interior maximum, so the t copula is not estimated.';
  if (panel.obligors.length < 2) return 'A single year cannot show how default rates vary from year to year, so rho and nu cannot be estimated.';
  return null;
}

/**
 * The one-factor Student-t copula by maximum likelihood: (p, rho, nu) of the panel, with
 * profile-likelihood intervals for rho (p and nu re-maximised) and for nu (p and rho re-maximised).
 *
 * Method: the nu profile on the grid of 1/nu (INVERSE_NU_GRID, 0 = the Gaussian limit included),
 * each point maximised over sqrt(rho) on its grid (0 included) and k_nu by Newton; Brent's search
 * in 1/nu around the best grid point. The ridge of the model (the common V makes defaults
 * dependent even at rho = 0, so yearly counts identify (rho, nu) only weakly) is why both grids
 * include their bounds and the whole region is searched. Interval ends by likelihoodRatioEnds
 * with the envelope slopes. A nu profile that stays within the 95% cut-off (1.92) of its maximum
 * over the whole grid is flagged `nuProfileFlat`: nu is weakly identified, and the review says so
 * instead of printing a spuriously precise nu.
 *
 * Special cases (a status and a sentence, never NaN): no defaults or only defaults, or a single
 * year: `undefined`; the maximum at 1/nu = 0: `ok` with nu null (the Gaussian limit); at the search
 * limit 1/nu = 0.49 (nu = 2.04) or rho = 0.995: `clipped`; an inner search that did not converge:
 * `not-converged`. An interval end of nu that reaches infinity is null (unbounded).
 *
 * @example tCopulaMle({ obligors: [1000, 1200, 900], defaults: [10, 25, 3] })
 *
 * Reference: Frey & McNeil (2003); McNeil, Frey & Embrechts (2015), section 11.2 and 7.3; Venzon
 * & Moolgavkar (1988) for the intervals.
 */
export function tCopulaMle(panel: Panel, options: { level?: number; intervals?: boolean } = {}): TCopulaFit {
  assertPanel(panel, 'tCopulaMle');
  const level = options.level ?? 0.95;
  const withIntervals = options.intervals ?? true;
  const empty = (reason: string): TCopulaFit => ({
    rho: null,
    pd: null,
    nu: null,
    inverseNu: null,
    logLik: null,
    gaussianLogLik: null,
    status: 'undefined',
    reason,
    intervals: { profile: null },
    nuInterval: null,
    nuProfileFlat: null,
    nuProfile: [],
  });
  const why = undefinedReason(panel);
  if (why !== null) return empty(why);

  const profile = new TCopulaProfile(panel);
  // rho outside, (p, nu) inside: the inner tables of one rho serve the whole search over nu.
  const search = gridMaximize((a) => profile.atRho(Math.min(a * a, RHO_SEARCH_LIMIT)).logLik, [...SQRT_RHO_GRID], SEARCH_TOLERANCE);
  const gridPoints = INVERSE_NU_GRID.map((w) => profile.atInverseNu(w));
  const gaussian = gridPoints[0];
  // The best of the rho-outside search and of the nu profile's grid (searched the other way round);
  // a 1/nu whose gain over the Gaussian limit is below 1e-6 in log-likelihood is that limit.
  let best = profile.atRho(Math.min(search.x * search.x, RHO_SEARCH_LIMIT));
  for (const q of gridPoints) if (q.logLik > best.logLik) best = q;
  if (best.inverseNu > 0 && best.logLik - gaussian.logLik < 1e-6) best = gaussian;
  const values = gridPoints.map((q) => q.logLik);
  const flat = Math.max(...values) - Math.min(...values) < PROFILE_DROP_95;
  const nu = best.inverseNu === 0 ? null : 1 / best.inverseNu;
  const pd = studentT(best.kt, nuOf(best.inverseNu));

  let rhoInterval: OpenInterval | null = null;
  let nuInterval: OpenInterval | null = null;
  let intervalsConverged = true;
  if (withIntervals) {
    const rhoEnds = likelihoodRatioEnds(
      (rho) => {
        const q = profile.atRho(rho);
        return { logLik: q.logLik, slope: profile.rhoSlope(q) };
      },
      { estimate: best.rho, maxLogLik: best.logLik + 1e-9, lower: 0, upper: RHO_SEARCH_LIMIT, level, tolerance: 1e-6 },
    );
    rhoInterval = { level, lower: rhoEnds.lower, upper: rhoEnds.upper };
    const wEnds = likelihoodRatioEnds(
      (w) => {
        const q = profile.atInverseNu(w);
        return { logLik: q.logLik, slope: profile.inverseNuSlope(q) };
      },
      { estimate: best.inverseNu, maxLogLik: best.logLik + 1e-9, lower: 0, upper: INVERSE_NU_SEARCH_LIMIT, level, tolerance: 1e-6 },
    );
    nuInterval = { level, lower: 1 / wEnds.upper, upper: wEnds.lowerAtBound || wEnds.lower === 0 ? null : 1 / wEnds.lower };
    intervalsConverged = rhoEnds.converged && wEnds.converged;
  }

  const converged = search.converged && best.converged && profile.failures === 0 && intervalsConverged;
  const atNuLimit = best.inverseNu >= INVERSE_NU_SEARCH_LIMIT;
  const atRhoLimit = best.rho >= RHO_SEARCH_LIMIT;
  const status: EstimateStatus = !converged ? 'not-converged' : atNuLimit || atRhoLimit ? 'clipped' : 'ok';
  const sentences: string[] = [];
  if (!converged) sentences.push('A search for the maximum or an interval end did not meet its tolerance; do not use these values.');
  if (atNuLimit) sentences.push(`The maximum lies at the smallest nu searched (${(1 / INVERSE_NU_SEARCH_LIMIT).toFixed(2)}): the tail may be fatter still.`);
  if (atRhoLimit) sentences.push(`The maximum lies at the search limit of rho (${RHO_SEARCH_LIMIT}).`);
  if (nu === null) sentences.push('The maximum is the Gaussian limit (nu = infinity): the data show no fatter joint tail than the Gaussian copula.');
  if (best.rho === 0 && nu !== null) sentences.push('The maximum lies at rho = 0 with a finite nu: the common factor V alone makes defaults dependent.');
  if (flat) sentences.push('The profile of nu is flat: these years identify nu only weakly, so its value is not a finding.');
  return {
    rho: best.rho,
    pd,
    nu,
    inverseNu: best.inverseNu,
    logLik: best.logLik,
    gaussianLogLik: gaussian.logLik,
    status,
    ...(sentences.length > 0 ? { reason: sentences.join(' ') } : {}),
    intervals: { profile: rhoInterval },
    nuInterval,
    nuProfileFlat: flat,
    nuProfile: gridPoints.map((q) => ({ inverseNu: q.inverseNu, logLik: q.logLik })),
  };
}

/** Newton decrement of the inner maximum over k_nu in {@link tCopulaMaxima} (value short of the maximum by ~1e-6 at most, see there). */
export const LR_NEWTON_DECREMENT = 1e-3;

/**
 * Tables of the inner likelihood in {@link tCopulaMaxima}: base spacing 1 (not 1/2), each interval
 * verified at its midpoint to 1e-8 max(1, drop) in value (not 1e-10) and 1e-5 in slope (not 1e-7).
 */
export const LR_TABLE_ACCURACY: Readonly<TableAccuracy> = { spacing: 1, tolerance: 1e-8, slopeTolerance: 1e-5 };

/** The two maxima of the likelihood-ratio test of the Gaussian copula against the t copula. */
export interface TCopulaMaxima {
  /** max over (p, rho, nu) of the t-copula log-likelihood; null when undefined. */
  logLik: number | null;
  /** max over (p, rho) of the Gaussian law (1/nu = 0); null when undefined. */
  gaussianLogLik: number | null;
  /** `undefined` (with the sentence of tCopulaMle), `not-converged`, or `ok`. */
  status: 'ok' | 'not-converged' | 'undefined';
  reason?: string;
}

/**
 * The two maxima of the likelihood-ratio statistic of the Gaussian copula against the t copula,
 * and nothing else: what each replication of the test's parametric bootstrap and power study
 * needs (copula-lr-test.ts), where tCopulaMle's estimates, intervals and nu profile are not used.
 *
 * Method: tCopulaMle's own search, less what only its other outputs need: the Gaussian maximum is
 * the nu profile at 1/nu = 0 (each sqrt(rho) on its grid, then Brent), the t maximum the search
 * with rho outside and (p, nu) inside (both grids with their bounds as candidates), without the
 * nu profile's other grid points (a second way to the same maximum, which tCopulaMle keeps for
 * the profile's shape) and without evaluating the maximum again. Three levers more: (1) when the
 * best sqrt(rho) of the grid is 0, the probe that decides whether rho = 0 is the maximum holds
 * 1/nu at its maximum at rho = 0 instead of searching it again (envelope theorem: the difference
 * is of second order in the probe's step of 1.5e-4 in sqrt(rho), and tables at rho ~ 2e-8 are
 * the dearest of all); (2) the inner maximum over k_nu stops at a Newton decrement of 1e-3
 * instead of 1e-7 and adds the extrapolated gain (decrement / 2), whose error is of the third
 * order of the last step; (3) the tables of the inner likelihood are laid at spacing 1 and
 * verified to 1e-8 max(1, drop) ({@link LR_TABLE_ACCURACY}) instead of 1e-10: within the 40
 * log-units of an outer integral that is at most 4e-7 per period, so 2 x 20 x 4e-7 = 1.6e-5 on the
 * statistic of a 20-year panel. The statistic agrees with tCopulaMle's to within 1e-4 (a test on
 * seeded Gaussian and t panels checks it, tests/unit/stats/copula/copula-lr-test.test.ts): far
 * below what moves a bootstrap p-value or a power, unless a replication's statistic lies within
 * 1e-4 of the observed one or of the critical value.
 *
 * Special cases: as tCopulaMle (no defaults, only defaults, one year: `undefined` with its
 * sentence); a search that did not converge: `not-converged`. A t maximum whose gain over the
 * Gaussian one is below 1e-6 is the Gaussian one (as in tCopulaMle), so the statistic is then 0.
 *
 * @example tCopulaMaxima({ obligors: [1000, 1200, 900], defaults: [10, 25, 3] })
 *
 * Reference: Frey & McNeil (2003); Self & Liang (1987) for the test; Brent (1973), ch. 5.
 */
export function tCopulaMaxima(panel: Panel): TCopulaMaxima {
  assertPanel(panel, 'tCopulaMaxima');
  const why = undefinedReason(panel);
  if (why !== null) return { logLik: null, gaussianLogLik: null, status: 'undefined', reason: why };
  const profile = new TCopulaProfile(panel, { newtonDecrement: LR_NEWTON_DECREMENT, tableAccuracy: LR_TABLE_ACCURACY });
  const gaussian = profile.atInverseNu(0);
  let best = gaussian;
  let atZero: TCopulaPoint | null = null;
  const search = gridMaximize(
    (a) => {
      const q = profile.atRho(Math.min(a * a, RHO_SEARCH_LIMIT));
      if (a === 0) atZero = q;
      if (q.logLik > best.logLik) best = q;
      return q.logLik;
    },
    [...SQRT_RHO_GRID],
    SEARCH_TOLERANCE,
    {
      endProbe: (end, probe) => {
        const zero = atZero as TCopulaPoint | null;
        return end === 0 && zero !== null ? profile.atRhoAndInverseNu(probe * probe, zero.inverseNu).logLik : undefined;
      },
    },
  );
  if (best.inverseNu > 0 && best.logLik - gaussian.logLik < 1e-6) best = gaussian;
  const converged = search.converged && gaussian.converged && best.converged && profile.failures === 0;
  return {
    logLik: best.logLik,
    gaussianLogLik: gaussian.logLik,
    status: converged ? 'ok' : 'not-converged',
    ...(converged ? {} : { reason: 'A search for the maximum did not meet its tolerance; this panel gives no statistic.' }),
  };
}
