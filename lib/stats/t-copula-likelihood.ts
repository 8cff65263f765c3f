/**
 * The likelihood of a default panel under the one-factor Student-t copula, with its first two
 * derivatives in the threshold k_nu = t_nu^-1(p): the evaluator tCopulaMle and its profiles use.
 *
 * A period's likelihood is the nested integral of t-copula-mixing.ts; the panel's log-likelihood
 * is the sum over periods (binomial coefficients included). At 1/nu = 0 (nu = Infinity) the law is
 * the Gaussian one and the evaluator is MixtureLikelihood's at k = k_nu = Phi^-1(p), exactly.
 *
 * References: Frey, R. & McNeil, A. J. (2003), Journal of Risk 6(1):59-92; Gordy, M. B. &
 * Heitfield, E. (2002), Federal Reserve Board working paper, eq. (4) (the Gaussian case).
 */
import studentTCdf from '@stdlib/stats-base-dists-t-cdf';
import studentTQuantile from '@stdlib/stats-base-dists-t-quantile';
import { LogConcaveIntegrator, type LogConcaveOptions } from './log-concave-integral';
import { PeriodWarmStarts } from './period-warm-starts';
import { MixtureLikelihood, type IntegrationReport } from './mixture-likelihood';
import { normalCdf, normalQuantile } from './normal';
import type { Panel } from './panel';
import { panelArrays } from './panel-arrays';
import { TCopulaPeriodIntegrand, T_COPULA_MOMENTS } from './t-copula-mixing';
import { FULL_TABLE_ACCURACY, ThresholdLikelihood, type TableAccuracy } from './threshold-likelihood';

/** Sets of inner tables kept for recent values of rho (a search returns to its grid points). */
const KEPT_TABLES = 24;

/** Largest 1/nu (nu > 2, so that W = nu / V has a finite mean). */
export const INVERSE_NU_LIMIT = 0.5;

/** Value and first two derivatives in k_nu of a t-copula log-likelihood. */
export interface TCopulaLogLik {
  value: number;
  dk: number;
  dkk: number;
}

/**
 * The Student-t distribution function T_nu(x); nu = Infinity is the standard normal.
 *
 * Method: stdlib-js (regularised incomplete beta). Special cases: nu must be positive.
 *
 * @example studentT(-3.747, 4) // ~0.01
 *
 * Reference: Abramowitz & Stegun (1964), 26.7.1.
 */
export function studentT(x: number, nu: number): number {
  if (!(nu > 0)) throw new RangeError(`studentT: the degrees of freedom nu must be positive; got ${nu}.`);
  return nu === Number.POSITIVE_INFINITY ? normalCdf(x) : studentTCdf(x, nu);
}

/**
 * The Student-t quantile t_nu^-1(q), q in (0, 1); nu = Infinity is Phi^-1(q).
 *
 * Method: stdlib-js (inverse of the regularised incomplete beta). Special cases: q outside (0, 1)
 * or nu not positive throw RangeError.
 *
 * @example studentTQuantile(0.01, 4) // -3.746947...
 *
 * Reference: Abramowitz & Stegun (1964), 26.7.
 */
export function tQuantile(q: number, nu: number): number {
  if (!(q > 0 && q < 1)) throw new RangeError(`tQuantile: the probability must be strictly between 0 and 1; got ${q}.`);
  if (!(nu > 0)) throw new RangeError(`tQuantile: the degrees of freedom nu must be positive; got ${nu}.`);
  return nu === Number.POSITIVE_INFINITY ? normalQuantile(q) : studentTQuantile(q, nu);
}

/**
 * Evaluates the t-copula log-likelihood of one panel at many (k_nu, rho, nu), keeping per-period
 * warm starts (outer modes and widths) and counting integrals above tolerance (report()).
 *
 * Method: each period by the nested log-concave integral of TCopulaPeriodIntegrand (outer over
 * s = sqrt(V / nu) with curvature bound nu on (0, inf), inner over the normal factor: exactly, or
 * with `tabulate` (the default) from the period's verified table of the inner likelihood in its
 * threshold at the current rho, which a search over p and nu at one rho reuses); the
 * k_nu-derivatives are outer posterior moments (t-copula-mixing.ts). Periods with the same counts
 * (n, d) share one integral (and one table), counted as many times as they occur: the panel's sum
 * is the same, and a panel of equal cohorts with repeated counts (several years without a default)
 * costs less. Accuracy is checked against a brute-force two-dimensional SciPy rule in
 * tests/unit/stats/t-copula-likelihood.test.ts.
 *
 * Special cases: nu = Infinity delegates to MixtureLikelihood; rho must be in [0, 1), nu > 1 (the
 * estimator keeps nu > 2), k_nu finite; otherwise RangeError. A failed period integral throws a
 * RangeError naming the period.
 */
export class TCopulaLikelihood {
  readonly periods: number;
  readonly obligors: Float64Array;
  readonly defaults: Float64Array;
  /** Total defaults / total obligors. */
  readonly pooledRate: number;
  private readonly logChoose: Float64Array;
  /**
   * Periods with the same counts (n, d) have the same integral at every parameter: one integral per
   * group, weighted by its size (a panel of equal cohorts often repeats a count, zero above all).
   */
  private readonly groupFirst: Int32Array;
  private readonly groupSize: Float64Array;
  private readonly warm: PeriodWarmStarts;
  private readonly integrand = new TCopulaPeriodIntegrand();
  /** The periods' inner likelihoods in the threshold, one set per recent rho (most recent last). */
  private readonly tables = new Map<number, ThresholdLikelihood[]>();
  /** Read the inner Gaussian likelihood from verified tables (threshold-likelihood.ts) instead of integrating each time. */
  private readonly tabulate: boolean;
  private readonly tableAccuracy: Readonly<TableAccuracy>;
  private readonly integrator = new LogConcaveIntegrator(T_COPULA_MOMENTS);
  private readonly gaussian: MixtureLikelihood;
  private lastNu = Number.NaN;
  /** The outer integrals' options, reused (curvature bound nu, lower limit 0, the period's warm start). */
  private readonly options: LogConcaveOptions = { curvatureBound: 2, lower: 0 };
  evaluations = 0;
  /** Period integrals that missed the tolerance of the adaptive rule (their finite values are used). */
  get unconverged(): number {
    return this.warm.unconverged;
  }

  /**
   * @param options.tabulate read the inner likelihood from verified tables (default true);
   * options.tableAccuracy their spacing and tolerances (default FULL_TABLE_ACCURACY, 1e-10).
   */
  constructor(panel: Panel, options: { tabulate?: boolean; tableAccuracy?: Readonly<TableAccuracy> } = {}) {
    ({ periods: this.periods, obligors: this.obligors, defaults: this.defaults, logChoose: this.logChoose, pooledRate: this.pooledRate } = panelArrays(panel, 'TCopulaLikelihood'));
    this.tabulate = options.tabulate ?? true;
    this.tableAccuracy = options.tableAccuracy ?? FULL_TABLE_ACCURACY;
    const T = this.periods;
    const groupOf = new Map<string, number>();
    const first: number[] = [];
    const size: number[] = [];
    for (let t = 0; t < T; t++) {
      const key = `${this.obligors[t]}/${this.defaults[t]}`;
      const g = groupOf.get(key);
      if (g === undefined) {
        groupOf.set(key, first.length);
        first.push(t);
        size.push(1);
      } else {
        size[g]++;
      }
    }
    this.groupFirst = Int32Array.from(first);
    this.groupSize = Float64Array.from(size);
    this.warm = new PeriodWarmStarts(first.length);
    this.gaussian = new MixtureLikelihood(panel);
  }

  /** Integrals that missed the tolerance so far (outer and inner), as MixtureLikelihood reports them. */
  report(): IntegrationReport {
    const g = this.gaussian.report();
    return {
      evaluations: this.evaluations,
      unconverged: this.warm.unconverged + this.tableMisses + [...this.tables.values()].reduce((sum, set) => sum + set.reduce((s, i) => s + i.unconverged, 0), 0) + g.unconverged,
      worstRelativeError: Math.max(this.warm.worstRelativeError, g.worstRelativeError),
    };
  }

  private tableMisses = 0;

  /** The inner likelihoods of every group of periods at rho: a kept set (moved to most recent) or a new one. */
  private tablesAt(rho: number): ThresholdLikelihood[] {
    const kept = this.tables.get(rho);
    if (kept !== undefined) {
      this.tables.delete(rho);
      this.tables.set(rho, kept);
      return kept;
    }
    if (this.tables.size >= KEPT_TABLES) {
      const oldest = this.tables.keys().next().value as number;
      const dropped = this.tables.get(oldest)!;
      this.tableMisses += dropped.reduce((s, i) => s + i.unconverged, 0);
      this.tables.delete(oldest);
    }
    const made = Array.from(this.groupFirst, (t) => {
      const inner = new ThresholdLikelihood(this.tableAccuracy);
      inner.set(this.obligors[t], this.defaults[t], this.logChoose[t], rho);
      return inner;
    });
    this.tables.set(rho, made);
    return made;
  }

  /** Log-likelihood at (k_nu, rho, nu). */
  logLik(kt: number, rho: number, nu: number): number {
    return this.evaluate(kt, rho, nu, false).value;
  }

  /** Log-likelihood and its first two k_nu-derivatives at (k_nu, rho, nu). */
  logLikWithDerivatives(kt: number, rho: number, nu: number): TCopulaLogLik {
    return this.evaluate(kt, rho, nu, true);
  }

  /** The sentence of a failed integral of group g: its first period, the others with the same counts, the parameters. */
  private failure(g: number, kt: number, rho: number, nu: number, reason: string | undefined): string {
    const t = this.groupFirst[g];
    const others = this.groupSize[g] - 1;
    const same = others > 0 ? ` and ${others} other period${others === 1 ? '' : 's'} with the same counts` : '';
    return `t-copula log-likelihood: the integral of period ${t + 1}${same} (n = ${this.obligors[t]}, d = ${this.defaults[t]}) failed at k_nu = ${kt}, rho = ${rho}, nu = ${nu}: ${reason}.`;
  }

  private evaluate(kt: number, rho: number, nu: number, derivatives: boolean): TCopulaLogLik {
    if (!Number.isFinite(kt)) throw new RangeError(`t-copula log-likelihood: k_nu = t_nu^-1(p) must be finite (0 < p < 1); got ${kt}.`);
    if (!(rho >= 0 && rho < 1)) throw new RangeError(`t-copula log-likelihood: rho must be in [0, 1); got ${rho}.`);
    if (!(nu > 1)) throw new RangeError(`t-copula log-likelihood: the degrees of freedom nu must be above 1 (Infinity for the Gaussian limit); got ${nu}.`);
    this.evaluations++;
    if (nu === Number.POSITIVE_INFINITY) {
      const g = this.gaussian.logLikWithDerivatives(kt, rho);
      return { value: g.value, dk: g.dk, dkk: g.dkk };
    }
    // Warm starts are only good for nearby nu: the law of s narrows as nu grows.
    if (!(Math.abs(nu - this.lastNu) <= 0.2 * nu)) this.warm.forget();
    this.lastNu = nu;
    const f = this.integrand;
    f.setParameters(kt, nu);
    const inner = this.tablesAt(rho);
    const M = this.integrator.moments;
    let value = 0;
    let dk = 0;
    let dkk = 0;
    const groups = this.groupFirst.length;
    const options = this.options;
    options.curvatureBound = nu;
    for (let g = 0; g < groups; g++) {
      f.setPeriod(inner[g], this.tabulate);
      const r = this.integrator.integrate(f, this.warm.optionsInto(g, options));
      this.warm.record(g, r, () => this.failure(g, kt, rho, nu, r.reason));
      const m = this.groupSize[g];
      value += m * r.value;
      if (derivatives) {
        const uMode = f.uAtMode;
        dk += m * (uMode + M[0]);
        dkk += m * (M[2] + Math.max(0, M[1] - M[0] * M[0]));
      }
    }
    if (!Number.isFinite(value) || (derivatives && !(Number.isFinite(dk) && Number.isFinite(dkk)))) {
      throw new RangeError(`t-copula log-likelihood: the integral failed at k_nu = ${kt}, rho = ${rho}, nu = ${nu} (a value or a derivative is not finite).`);
    }
    return { value, dk, dkk };
  }
}

/**
 * Log-likelihood of a default panel under the one-factor Student-t copula at (p, rho, nu):
 * the sum over periods of log Int Int C(n, d) P(x, s)^d (1 - P(x, s))^(n - d) phi(x) f_nu(s) dx ds,
 * P(x, s) = Phi((t_nu^-1(p) s - sqrt(rho) x) / sqrt(1 - rho)), f_nu the law of sqrt(chi2_nu / nu).
 *
 * Method: nested mode-bracketed adaptive Gauss-Kronrod (t-copula-mixing.ts).
 *
 * Special cases: nu = Infinity is the Gaussian binomial-mixture likelihood; p outside (0, 1),
 * rho outside [0, 1) or nu <= 1 throw RangeError.
 *
 * @example tCopulaLogLikelihood({ obligors: [1000, 1200], defaults: [10, 25] }, 0.015, 0.05, 5)
 *
 * Reference: Frey & McNeil (2003), section 3; McNeil, Frey & Embrechts (2015), section 11.2.
 */
export function tCopulaLogLikelihood(panel: Panel, p: number, rho: number, nu: number): number {
  if (!(p > 0 && p < 1)) throw new RangeError(`tCopulaLogLikelihood: the probability of default p must be strictly between 0 and 1; got ${p}.`);
  return new TCopulaLikelihood(panel).logLik(tQuantile(p, nu), rho, nu);
}

/** p = T_nu(k_nu), the PD of a threshold under the t copula (nu = Infinity: Phi). */
export function tCopulaPd(kt: number, nu: number): number {
  return studentT(kt, nu);
}
