/**
 * The granular probability integral transform (PIT) of each year's default count under any mixing
 * law (default-rate-law.ts), and the summary a validator reads: a uniformity test and the years in
 * the law's extreme tails. One routine for every law: the law contributes only its default-rate
 * distribution.
 */
import { binomialLogPmfFromLogs } from './log-binomial';
import { LogConcaveIntegrator, type LogConcaveIntegrand } from './log-concave-integral';
import type { DefaultRateLaw } from './default-rate-law';
import { ksUniformityTest } from './kolmogorov-smirnov';
import { logistic, logLogistic } from './logit-normal-mixing';
import { normalQuantile } from './normal';
import { normalTails, TAIL_SLOTS } from './normal-tails';
import { assertPanel, type Panel } from './panel';
import { createRng } from './random';

const LN_SQRT_2PI = 0.9189385332046727418;

/** What the PIT values are, in words (the output says which PIT it is). */
export const LAW_PIT_METHOD =
  "mid-PIT of the year's default count under the law at its fitted values, P(D < d) + P(D = d) / 2 (Czado, Gneiting & Held 2009)";

/** Two-sided level of the tail years: P(D >= d) or P(D <= d) below half of it. */
export const PIT_TAIL_LEVEL = 0.01;

/**
 * The density of B ~ Beta(j + 1, n - j) in the law's coordinate y, times F(b(y)):
 * probit: log(n - j) + log Binomial(j; n, Phi(y)) - log Phi(-y) + log phi(y) + log F,
 * logit:  log(n - j) + log Binomial(j; n, s(y)) + log s(y) + log F,
 * the binomial term in Loader's saddle-point form (no cancellation of large terms). Every part is
 * concave in y (the law's log F by construction), so the product is a log-concave spike.
 */
class CountCdfIntegrand implements LogConcaveIntegrand {
  readonly moments = 0;
  private readonly T = new Float64Array(TAIL_SLOTS);
  private readonly F = new Float64Array(3);
  private n = 1;
  private j = 0;
  private logNj = 0;
  constructor(private readonly law: DefaultRateLaw) {}

  set(n: number, j: number): void {
    this.n = n;
    this.j = j;
    this.logNj = Math.log(n - j);
  }

  guess(): number {
    const b = Math.min(Math.max((this.j + 0.5) / (this.n + 1), 1e-300), 1 - 1e-16);
    return this.law.scale === 'probit' ? normalQuantile(b) : Math.log(b) - Math.log1p(-b);
  }

  private spike(y: number, out: Float64Array | null): number {
    const { n, j } = this;
    if (this.law.scale === 'probit') {
      const T = this.T;
      normalTails(y, T);
      if (out) {
        out[1] = j * T[2] - (n - j - 1) * T[3] - y;
        out[2] = -j * T[4] - (n - j - 1) * T[5] - 1;
      }
      return this.logNj + binomialLogPmfFromLogs(j, n, T[0], T[1]) - T[1] - 0.5 * y * y - LN_SQRT_2PI;
    }
    const lp = logLogistic(y);
    const lq = logLogistic(-y);
    if (out) {
      const s = logistic(y);
      const sc = logistic(-y);
      out[1] = (j + 1) * sc - (n - j) * s;
      out[2] = -(n + 1) * s * sc;
    }
    return this.logNj + binomialLogPmfFromLogs(j, n, lp, lq) + lp;
  }

  derivatives(y: number, out: Float64Array): void {
    const F = this.F;
    this.law.logCdf(y, F);
    if (F[0] === Number.NEGATIVE_INFINITY) {
      out[0] = F[0];
      out[1] = F[1];
      out[2] = F[2];
      return;
    }
    out[0] = this.spike(y, out) + F[0];
    out[1] += F[1];
    out[2] += F[2];
  }

  node(y: number): number {
    this.law.logCdf(y, this.F);
    if (this.F[0] === Number.NEGATIVE_INFINITY) return this.F[0];
    return this.spike(y, null) + this.F[0];
  }
}

/**
 * Evaluates P(D <= j) for D | pi ~ Binomial(n, pi), pi from a mixing law, reusing one integrand and
 * integrator (not thread-safe: one per law and thread).
 */
export class LawCountCdf {
  private readonly integrand: CountCdfIntegrand;
  private readonly integrator = new LogConcaveIntegrator(0);
  constructor(private readonly law: DefaultRateLaw) {
    this.integrand = new CountCdfIntegrand(law);
  }

  /**
   * P(D <= j) = E[F(B)], B ~ Beta(j + 1, n - j) (module comment of lawCountCdf); 0 for j < 0 and 1
   * for j >= n.
   */
  cdf(n: number, j: number): number {
    if (j < 0) return 0;
    if (j >= n) return 1;
    this.integrand.set(n, j);
    const lower = this.law.lower;
    const r = this.integrator.integrate(this.integrand, {
      curvatureBound: this.law.scale === 'probit' ? 1 : 0,
      ...(lower > Number.NEGATIVE_INFINITY ? { lower } : {}),
    });
    if (!r.converged) {
      throw new RangeError(`the probability of at most ${j} defaults among ${n} obligors did not converge: ${r.reason}.`);
    }
    return Math.min(1, Math.exp(r.value));
  }
}

/**
 * P(D <= j) of a year with n obligors when D | pi ~ Binomial(n, pi) and the default rate pi follows
 * a mixing law with distribution function F:
 *
 *   P(D <= j) = E_pi[P(Binomial(n, pi) <= j)] = E_pi[P(B > pi)] = E_B[F(B)],  B ~ Beta(j + 1, n - j),
 *
 * by the order-statistic identity P(Binomial(n, pi) <= j) = P(Beta(j + 1, n - j) > pi) with B
 * independent of pi (Johnson, Kemp & Kotz 2005, eq. 3.9).
 *
 * Method: the Beta density is a log-concave spike in the law's coordinate (width ~ 1 / sqrt(n) for
 * a cohort of n, the narrow ridge of the likelihoods) and the law's log F is concave there
 * (default-rate-law.ts), so the integral is one call of the log-concave integrator
 * (log-concave-integral.ts: mode-bracketed adaptive Gauss-Kronrod, relative tolerance 1e-8),
 * with curvature bound 1 on the probit scale. A point-mass law (no mixing) is the integral above
 * its rate: the binomial distribution function. Nested integrals (the t copula's F) use their
 * own integrator. The binomial term in Loader's form keeps ~1e-9 relative accuracy up to n ~ 1e9.
 *
 * Special cases: j < 0 gives 0 and j >= n gives 1 (so d = 0 and d = n give finite PITs); counts
 * that are not whole numbers with n >= 1 throw RangeError; an integral that fails throws
 * RangeError with the reason.
 *
 * @example lawCountCdf(gaussianRateLaw(0.005, 0.1), 500, 0) // P(D = 0)
 *
 * Reference: Johnson, N. L., Kemp, A. W. & Kotz, S. (2005), Univariate Discrete Distributions, 3rd
 * ed., eq. 3.9 (the binomial distribution function as an incomplete beta function).
 */
export function lawCountCdf(law: DefaultRateLaw, n: number, j: number): number {
  if (!Number.isSafeInteger(n) || n < 1 || !Number.isInteger(j)) {
    throw new RangeError(`lawCountCdf: need a whole number of obligors n >= 1 and a whole count; got n = ${n}, count = ${j}.`);
  }
  return new LawCountCdf(law).cdf(n, j);
}

/** The PIT of each year under one law and its summary (`modelComparison.laws[i].pit`). */
export interface LawPit {
  /** 'mid': u_t = P(D_t < d_t) + P(D_t = d_t) / 2 (LAW_PIT_METHOD). */
  method: 'mid';
  /** Mid-PIT of each year. */
  values: number[];
  /** P(D_t < d_t) and P(D_t <= d_t) of each year: the range of the randomised PIT. */
  below: number[];
  atOrBelow: number[];
  /**
   * Kolmogorov-Smirnov test of uniformity on the randomised PIT u_t = P(D_t < d_t) + V_t P(D_t = d_t),
   * V_t uniform from `seed` (exactly uniform under the law at its true values); the p-value is the
   * exact finite-sample one and does not allow for the parameters being fitted on the same years.
   */
  uniformity: { test: 'kolmogorov-smirnov'; randomised: true; seed: number; statistic: number; pValue: number };
  /** Years (0-based period indices) with P(D_t >= d_t) < level / 2 (upper) or P(D_t <= d_t) < level / 2 (lower). */
  tails: { level: number; upper: number[]; lower: number[] };
}

/**
 * The granular PIT of every year of a panel under a mixing law at its fitted values, with the
 * uniformity test and the tail years (see {@link LawPit}).
 *
 * The randomisation draws V_1..V_T in period order from createRng(seed) (MT19937), the same draws
 * for every law of a segment, so that the laws' tests are compared on common random numbers.
 *
 * Special cases: a zero-default year has P(D < 0) = 0, a year where every obligor defaulted
 * P(D <= n) = 1; every value is finite. An invalid panel throws RangeError naming the period.
 *
 * @example lawPanelPit(gaussianRateLaw(0.01, 0.1), { obligors: [500, 500], defaults: [0, 9] }, 1)
 *
 * Reference: Czado, C., Gneiting, T. & Held, L. (2009), "Predictive model assessment for count
 * data", Biometrics 65:1254-1261 (randomised and mid PIT of a count); Diebold, Gunther & Tay (1998),
 * International Economic Review 39:863-883 (PIT uniformity); Marsaglia, Tsang & Wang (2003) (the
 * exact Kolmogorov law).
 */
export function lawPanelPit(law: DefaultRateLaw, panel: Panel, seed: number): LawPit {
  assertPanel(panel, 'lawPanelPit');
  const cdf = new LawCountCdf(law);
  const below: number[] = [];
  const atOrBelow: number[] = [];
  const values: number[] = [];
  const randomised: number[] = [];
  const rng = createRng(seed);
  const upper: number[] = [];
  const lower: number[] = [];
  const half = PIT_TAIL_LEVEL / 2;
  panel.obligors.forEach((n, t) => {
    const d = panel.defaults[t];
    let lo: number;
    let hi: number;
    try {
      lo = cdf.cdf(n, d - 1);
      hi = cdf.cdf(n, d);
    } catch (err) {
      throw new RangeError(`lawPanelPit: period ${t + 1}: ${(err as Error).message}`);
    }
    if (hi < lo) hi = lo; // two integrals, each to 1e-8: keep the pair ordered
    below.push(lo);
    atOrBelow.push(hi);
    values.push(0.5 * (lo + hi));
    randomised.push(lo + rng.uniform() * (hi - lo));
    if (1 - lo < half) upper.push(t);
    if (hi < half) lower.push(t);
  });
  const ks = ksUniformityTest(randomised);
  return {
    method: 'mid',
    values,
    below,
    atOrBelow,
    uniformity: { test: 'kolmogorov-smirnov', randomised: true, seed, statistic: ks.statistic, pValue: ks.pValue },
    tails: { level: PIT_TAIL_LEVEL, upper, lower },
  };
}
