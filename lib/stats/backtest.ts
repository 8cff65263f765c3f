/**
 * Backtest of a published (p, rho) on years it was not fitted to: for each new year, the default
 * rate against the fitted Vasicek quantiles, the probability of at least that many defaults under
 * the binomial mixture with the year's own cohort, the year's mid-PIT and its log-likelihood; over
 * the years, the counts of quantile exceedances with the probability of at least that many under
 * independent years.
 *
 * For year t with n_t obligors and d_t defaults, at (p, rho), k = Phi^-1(p):
 *
 *   q_a = Phi((k + sqrt(rho) Phi^-1(a)) / sqrt(1 - rho))           (Vasicek default-rate quantile)
 *   above_a = [d_t / n_t > q_a]                                     (a = 0.95, 0.99)
 *   log L_t = log Int C(n_t, d_t) P(x)^d_t (1 - P(x))^(n_t - d_t) phi(x) dx
 *   P(D_t >= d_t) = 1 - P(D_t < d_t),   midPit_t = P(D_t < d_t) + P(D_t = d_t) / 2
 *   P(at least m of T years above q_a) = sum_{j >= m} C(T, j) (1 - a)^j a^(T - j)
 *
 * Method: the quantile by vasicekQuantile; the likelihood by the mode-bracketed adaptive
 * integral of mixture-likelihood.ts; the mid-PIT by count-pit.ts; P(D >= d) as
 * 1 - midPit + P(D = d) / 2 (absolute error ~1e-12; reported tail probabilities below ~1e-10 are
 * that close to 0); the binomial tail by summing binomialLogPmf. The quantile is that of an
 * infinitely granular pool (as the fit's exceedance diagnostics), while P(D >= d) accounts for the
 * year's finite cohort: a small cohort can exceed the quantile by binomial noise alone, which the
 * tail probability shows.
 *
 * Special cases: rho = 0 makes the default rate degenerate at p (every quantile is p) and the
 * counts binomial. p outside (0, 1), rho outside [0, 1), an empty panel, or counts that are not
 * whole numbers with 0 <= d <= n and n >= 1 throw RangeError naming the year.
 *
 * @example backtestPublished({ obligors: [5000], defaults: [450] }, 0.02, 0.1).years[0].above99 // true (9% against a 99% quantile of 8.2%)
 *
 * Reference: Vasicek (2002), Risk 15(12):160-162 (the quantile); Gordy & Heitfield (2002), eq. (4)
 * (the mixture likelihood); Czado, Gneiting & Held (2009), Biometrics 65:1254-1261 (mid-PIT);
 * BCBS (2005), "Studies on the validation of internal rating systems", Working Paper 14, section
 * 5 (backtests of default rates against their predicted distribution, with the binomial count of
 * exceedances under independent years).
 */
import { countMidPit } from './count-pit';
import { binomialLogPmf } from './log-binomial';
import { mixturePeriodLogLikelihood } from './mixture-likelihood';
import { vasicekQuantile } from './vasicek';

export interface BacktestYear {
  obligors: number;
  defaults: number;
  /** d / n */
  rate: number;
  /** Vasicek default-rate quantiles at 95% and 99% at the tested (p, rho). */
  q95: number;
  q99: number;
  above95: boolean;
  above99: boolean;
  /** log P(D = d) under the binomial mixture (binomial coefficient included). */
  logLik: number;
  /** P(D >= d) under the binomial mixture with this year's cohort. */
  tailProbability: number;
  /** P(D < d) + P(D = d) / 2. */
  midPit: number;
}

export interface BacktestResult {
  years: BacktestYear[];
  /** Sum of the years' log-likelihoods. */
  logLik: number;
  exceedances: {
    above95: number;
    above99: number;
    /** T (1 - a): how many exceedances to expect. */
    expected95: number;
    expected99: number;
    /** P(at least above_a exceedances in T independent years). */
    pAtLeast95: number;
    pAtLeast99: number;
  };
}

/** P(X >= m) for X ~ Binomial(T, q). */
function binomialUpperTail(m: number, T: number, q: number): number {
  if (m <= 0) return 1;
  let s = 0;
  for (let j = m; j <= T; j++) s += Math.exp(binomialLogPmf(j, T, q));
  return Math.min(1, s);
}

export function backtestPublished(panel: { obligors: readonly number[]; defaults: readonly number[] }, p: number, rho: number): BacktestResult {
  if (!(p > 0 && p < 1)) throw new RangeError(`backtestPublished: p must be strictly between 0 and 1; got ${p}.`);
  if (!(rho >= 0 && rho < 1)) throw new RangeError(`backtestPublished: rho must be in [0, 1); got ${rho}.`);
  const T = panel.obligors.length;
  if (T === 0 || panel.defaults.length !== T) {
    throw new RangeError(`backtestPublished: give one default count per year (obligors has ${T} years, defaults ${panel.defaults.length}); at least one year.`);
  }
  const q95 = vasicekQuantile(0.95, p, rho);
  const q99 = vasicekQuantile(0.99, p, rho);
  const years: BacktestYear[] = panel.obligors.map((n, t) => {
    const d = panel.defaults[t];
    if (!Number.isSafeInteger(n) || n < 1 || !Number.isSafeInteger(d) || d < 0 || d > n) {
      throw new RangeError(`backtestPublished: year ${t + 1} has obligors = ${n} and defaults = ${d}; need whole numbers with 0 <= defaults <= obligors and obligors >= 1.`);
    }
    const rate = d / n;
    const logLik = mixturePeriodLogLikelihood(n, d, p, rho);
    const midPit = countMidPit(n, d, p, rho);
    const tail = Math.min(1, Math.max(0, 1 - midPit + 0.5 * Math.exp(logLik)));
    return { obligors: n, defaults: d, rate, q95, q99, above95: rate > q95, above99: rate > q99, logLik, tailProbability: tail, midPit };
  });
  const above95 = years.filter((y) => y.above95).length;
  const above99 = years.filter((y) => y.above99).length;
  return {
    years,
    logLik: years.reduce((s, y) => s + y.logLik, 0),
    exceedances: {
      above95,
      above99,
      expected95: 0.05 * T,
      expected99: 0.01 * T,
      pAtLeast95: binomialUpperTail(above95, T, 0.05),
      pAtLeast99: binomialUpperTail(above99, T, 0.01),
    },
  };
}
