/**
 * The beta mixing law: the year's default rate pi_t ~ Beta(a, b), so the year's default count is
 * beta-binomial. Closed-form likelihood, no integral.
 *
 * Parametrised here by the mean p = a / (a + b) and the overdispersion theta = 1 / (a + b) >= 0
 * (theta = 0 is the binomial law without mixing), so that
 *
 *   log L = log C(n, d) + sum_{j<d} log(p + j theta) + sum_{j<n-d} log(1 - p + j theta) - sum_{j<n} log(1 + j theta)
 *         = log C(n, d) + log B(a + d, b + n - d) - log B(a, b)   (theta > 0),
 *
 * and the correlation of two obligors' default indicators is 1 / (a + b + 1) = theta / (1 + theta).
 *
 * References: Skellam, J. G. (1948), "A probability distribution derived from the binomial
 * distribution by regarding the probability of success as variable between the sets of trials",
 * JRSS B 10:257-261; Gordy, M. B. (2000), "A comparative anatomy of credit risk models", J. Banking
 * & Finance 24:119-149, section 2 (beta mixing of the default rate).
 */
import gammaln from '@stdlib/math-base-special-gammaln';
import { logBinomialCoefficient } from './log-binomial';
import { assertPanel, type Panel } from './panel';

/** Below this many terms a log rising factorial is summed term by term (exact, no cancellation). */
const SUM_BELOW = 64;
/** From this x on, a long log rising factorial comes from Stirling's series (no large log-gamma values to cancel). */
const STIRLING_FROM = 1e4;

/**
 * log of the rising factorial x (x + 1) ... (x + m - 1) = log Gamma(x + m) - log Gamma(x), x > 0.
 *
 * Method: the sum of logs for m < 64; for x below 1e4 the difference of log-gamma values (stdlib
 * gammaln, absolute error ~1e-16 x log x, below 1e-11); beyond, Stirling's series of the
 * difference, m log(x + m) - (x - 1/2) log1p(-m / (x + m)) - m + 1/(12 (x + m)) - 1/(12 x), whose
 * next term is below 3e-15 there, so no cancellation of large log-gamma values.
 *
 * Special cases: m = 0 gives 0.
 *
 * @example logRising(2.5, 3) // log(2.5 * 3.5 * 4.5) = 3.67630067...
 *
 * Reference: Abramowitz & Stegun (1964), 6.1.37 (Stirling's series).
 */
export function logRising(x: number, m: number): number {
  if (m === 0) return 0;
  if (m < SUM_BELOW) {
    let s = 0;
    for (let j = 0; j < m; j++) s += Math.log(x + j);
    return s;
  }
  if (x < STIRLING_FROM) return gammaln(x + m) - gammaln(x);
  const y = x + m;
  return m * Math.log(y) - (x - 0.5) * Math.log1p(-m / y) - m + 1 / (12 * y) - 1 / (12 * x);
}

/**
 * Log-probability of d defaults among n obligors under beta mixing with mean p and overdispersion
 * theta = 1 / (a + b) (module comment); theta = 0 is the binomial log-pmf.
 *
 * Special cases: p outside (0, 1), theta < 0 or not finite, or counts that are not whole numbers
 * with 0 <= d <= n throw RangeError.
 *
 * @example betaBinomialLogPmf(1000, 12, 2 / 152, 1 / 152) // scipy.stats.betabinom.logpmf(12, 1000, 2, 150)
 *
 * Reference: Skellam (1948), eq. (2).
 */
export function betaBinomialLogPmf(n: number, d: number, p: number, theta: number): number {
  if (!(p > 0 && p < 1)) throw new RangeError(`betaBinomialLogPmf: the mean p must be strictly between 0 and 1; got ${p}.`);
  if (!(theta >= 0) || !Number.isFinite(theta)) throw new RangeError(`betaBinomialLogPmf: the overdispersion theta must be a finite number at or above 0; got ${theta}.`);
  if (!Number.isInteger(n) || !Number.isInteger(d) || d < 0 || d > n) {
    throw new RangeError(`betaBinomialLogPmf: the counts must be whole numbers with 0 <= d <= n; got n = ${n}, d = ${d}.`);
  }
  return logBinomialCoefficient(n, d) + logBetaRatio(n, d, p, theta);
}

/** log B(a + d, b + n - d) - log B(a, b) in (p, theta), without the binomial coefficient. */
function logBetaRatio(n: number, d: number, p: number, theta: number): number {
  if (theta === 0) return d * Math.log(p) + (n - d) * Math.log1p(-p);
  // p + j theta = theta (a + j): the powers of theta cancel (d + (n - d) - n = 0).
  const a = p / theta;
  const b = (1 - p) / theta;
  return logRising(a, d) + logRising(b, n - d) - logRising(a + b, n);
}

/**
 * Log-likelihood of a default panel under beta mixing at (p, theta): the sum over periods of
 * {@link betaBinomialLogPmf}. theta = 0 is the binomial likelihood.
 *
 * @example betaBinomialLogLikelihood({ obligors: [1000, 1200], defaults: [10, 25] }, 0.015, 0.002)
 *
 * Reference: Skellam (1948).
 */
export function betaBinomialLogLikelihood(panel: Panel, p: number, theta: number): number {
  assertPanel(panel, 'betaBinomialLogLikelihood');
  let s = 0;
  for (let t = 0; t < panel.obligors.length; t++) s += betaBinomialLogPmf(panel.obligors[t], panel.defaults[t], p, theta);
  return s;
}

/** The Beta(a, b) parameters of mean p and overdispersion theta > 0: a = p / theta, b = (1 - p) / theta. */
export function betaParameters(p: number, theta: number): { a: number; b: number } {
  return { a: p / theta, b: (1 - p) / theta };
}

/** E[pi^2] of Beta(a, b) in (p, theta): p (p + theta) / (1 + theta), the joint default probability of two obligors. */
export function betaSecondMoment(p: number, theta: number): number {
  return (p * (p + theta)) / (1 + theta);
}
