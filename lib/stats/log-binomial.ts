/**
 * Logarithms of binomial coefficients and binomial probabilities, accurate for counts in the
 * tens of millions, where C(n, k) itself overflows and log-gamma differences lose digits.
 *
 * Method throughout: Loader's saddle-point decomposition. With stirlerr(n) = log(n!) -
 * log(sqrt(2 pi n) (n/e)^n) and the deviance term bd0(x, m) = x log(x/m) + m - x, both computed
 * without cancellation, every piece of the log-probability is small or of one sign, so the result
 * has a small absolute error (~1e-15 near the mode) instead of the ~1e-8 that
 * lgamma(n+1) - lgamma(k+1) - lgamma(n-k+1) leaves at n = 1e7.
 *
 * Reference: Loader, C. (2000), "Fast and Accurate Computation of Binomial Probabilities",
 * technical report, Bell Labs (the method behind R's dbinom), eqs. (3)-(5).
 */

const LN_2PI = 1.8378770664093454836;

// stirlerr(n) = lgamma(n + 1) - (n + 1/2) log(n) + n - log(sqrt(2 pi)) for n = 1..15,
// computed to 20 digits with mpmath 1.3 (values agree with Loader 2000, table in the appendix).
const STIRLERR_TABLE = [
  NaN, 0.08106146679532725822, 0.041340695955409294094, 0.027677925684998339149,
  0.020790672103765093112, 0.016644691189821192163, 0.013876128823070747999,
  0.011896709945891770095, 0.010411265261972096497, 0.0092554621827127329177,
  0.0083305634333628712565, 0.007573675487951840795, 0.0069428401072095298657,
  0.0064089941880042070684, 0.0059513701127588477356, 0.005554733551962801371,
];
const S0 = 1 / 12;
const S1 = 1 / 360;
const S2 = 1 / 1260;
const S3 = 1 / 1680;
const S4 = 1 / 1188;

/**
 * Error of Stirling's approximation to log(n!), for an integer n >= 1.
 *
 * stirlerr(n) = log(n!) - (n + 1/2) log n + n - log sqrt(2 pi)
 *
 * Method: table for n <= 15; otherwise the asymptotic series 1/(12n) - 1/(360n^3) + 1/(1260n^5)
 * - 1/(1680n^7) + 1/(1188n^9), truncated by n as in Loader (2000). Relative accuracy ~1e-16.
 *
 * @example stirlingError(20) // 0.004166319691996922
 *
 * Reference: Loader (2000), section 2; Abramowitz & Stegun (1964) eq. 6.1.41.
 */
export function stirlingError(n: number): number {
  if (!Number.isInteger(n) || n < 1) {
    throw new RangeError(`stirlingError: n must be a positive integer, got ${String(n)}.`);
  }
  if (n <= 15) return STIRLERR_TABLE[n];
  const nn = n * n;
  if (n > 500) return (S0 - S1 / nn) / n;
  if (n > 80) return (S0 - (S1 - S2 / nn) / nn) / n;
  if (n > 35) return (S0 - (S1 - (S2 - S3 / nn) / nn) / nn) / n;
  return (S0 - (S1 - (S2 - (S3 - S4 / nn) / nn) / nn) / nn) / n;
}

/**
 * Deviance term bd0(x, m) = x log(x / m) + m - x >= 0, for x >= 0 and m > 0.
 *
 * Method: for |x - m| < 0.1 (x + m), the series bd0 = (x - m) v + 2x sum_{j>=1} v^(2j+1)/(2j+1)
 * with v = (x - m)/(x + m), which avoids the cancellation of x log(x/m) against m - x; otherwise the
 * direct formula. Relative accuracy ~1e-15.
 *
 * Reference: Loader (2000), eq. (5).
 */
export function binomialDeviance(x: number, m: number): number {
  if (x === 0) return m;
  if (Math.abs(x - m) < 0.1 * (x + m)) {
    let v = (x - m) / (x + m);
    let s = (x - m) * v;
    let ej = 2 * x * v;
    v *= v;
    for (let j = 1; j < 1000; j++) {
      ej *= v;
      const s1 = s + ej / (2 * j + 1);
      if (s1 === s) return s1;
      s = s1;
    }
    return s;
  }
  return x * Math.log(x / m) + m - x;
}

function assertCounts(fn: string, n: number, k: number): void {
  if (!Number.isInteger(n) || n < 0) {
    throw new RangeError(`${fn}: n must be a non-negative integer count, got ${String(n)}.`);
  }
  if (!Number.isInteger(k) || k < 0 || k > n) {
    throw new RangeError(
      `${fn}: k must be an integer between 0 and n = ${n}, got ${String(k)}.`,
    );
  }
}

/**
 * Natural logarithm of the binomial coefficient C(n, k) = n! / (k! (n - k)!).
 *
 * log C(n, k) = stirlerr(n) - stirlerr(k) - stirlerr(n-k) + k log(n/k) - (n-k) log1p(-k/n)
 *               - (1/2) log(2 pi k (n - k) / n)
 *
 * Method: Loader's decomposition above (every term is computed to full relative accuracy and the
 * two large terms are positive), so the result is accurate to a few ulp for any n up to 2^53,
 * where the lgamma difference loses ~log10(n) digits.
 *
 * Special cases: k = 0 or k = n -> 0; n, k must be integers with 0 <= k <= n, otherwise
 * RangeError.
 *
 * @example logBinomialCoefficient(10, 3) // log(120) = 4.787491742782046
 *
 * Reference: Loader (2000), eqs. (3)-(4).
 */
export function logBinomialCoefficient(n: number, k: number): number {
  assertCounts('logBinomialCoefficient', n, k);
  if (k === 0 || k === n) return 0;
  if (k > n - k) k = n - k;
  const nmk = n - k;
  return (
    stirlingError(n) -
    stirlingError(k) -
    stirlingError(nmk) +
    k * Math.log(n / k) -
    nmk * Math.log1p(-k / n) -
    0.5 * (LN_2PI + Math.log(k) + Math.log1p(-k / n))
  );
}

/** Loader's binomial log-pmf for 0 < k < n and mean counts np = n p, nq = n q, both > 0. */
function loaderInterior(k: number, n: number, np: number, nq: number): number {
  const nmk = n - k;
  return (
    stirlingError(n) -
    stirlingError(k) -
    stirlingError(nmk) -
    binomialDeviance(k, np) -
    binomialDeviance(nmk, nq) -
    // log(k (n-k) / n) without forming 1 - k/n, which loses digits when k is close to n
    0.5 * (LN_2PI + Math.log(k) + Math.log(nmk / n))
  );
}

/**
 * Natural logarithm of the binomial probability mass function,
 * log P(K = k) = log C(n, k) + k log p + (n - k) log(1 - p).
 *
 * Method: for 0 < k < n and 0 < p < 1, Loader's saddle-point form
 * stirlerr(n) - stirlerr(k) - stirlerr(n-k) - bd0(k, np) - bd0(n-k, nq) - (1/2) log(2 pi k (n-k)/n),
 * with q = 1 - p; absolute error ~1e-15 near the mode even for n = 1e7 and p = 1e-7. At k = 0 the
 * exact n log1p(-p) and at k = n the exact n log p.
 *
 * Special cases: p = 0: 0 at k = 0, -Infinity otherwise; p = 1: 0 at k = n, -Infinity
 * otherwise; n = 0: 0. Non-integer or out-of-range counts (k > n, negative) and p outside [0, 1]
 * throw RangeError.
 *
 * @example binomialLogPmf(3, 10, 0.2) // log(0.201326592) = -1.6028744...
 *
 * Reference: Loader (2000), eq. (5); Johnson, Kemp & Kotz (2005), Univariate Discrete
 * Distributions, eq. 3.1.
 */
export function binomialLogPmf(k: number, n: number, p: number): number {
  assertCounts('binomialLogPmf', n, k);
  if (typeof p !== 'number' || Number.isNaN(p) || p < 0 || p > 1) {
    throw new RangeError(`binomialLogPmf: p must be a probability in [0, 1], got ${String(p)}.`);
  }
  if (n === 0) return 0;
  if (p === 0) return k === 0 ? 0 : -Infinity;
  if (p === 1) return k === n ? 0 : -Infinity;
  if (k === 0) return n * Math.log1p(-p);
  if (k === n) return n * Math.log(p);
  return loaderInterior(k, n, n * p, n * (1 - p));
}

/** Smallest probability for which exp(log p) keeps full relative precision (no subnormal). */
const MIN_NORMAL_LOG = Math.log(2.2250738585072014e-308);

/**
 * Binomial log-pmf given log p and log(1 - p) rather than p, for conditional default
 * probabilities that underflow (log p = -800) or sit within 1e-17 of 1.
 *
 * Method: when p = exp(logP) and q = exp(log1mP) are normal doubles and 0 < k < n, Loader's
 * saddle-point form as in binomialLogPmf with np = n exp(logP), nq = n exp(log1mP) (the two need
 * not sum exactly to n: bd0's derivative vanishes at the mode, so the mismatch costs only
 * ~n ulp (1 - k/np)); otherwise the direct sum log C(n, k) + k logP + (n - k) log1mP, accurate in
 * relative terms because the result is then large in magnitude.
 *
 * Special cases: logP = -Infinity (p = 0) gives 0 at k = 0 and -Infinity otherwise;
 * log1mP = -Infinity (p = 1) gives 0 at k = n and -Infinity otherwise. logP and log1mP must be
 * <= 0 and not NaN; they are not checked for consistency (log(e^logP + e^log1mP) = 0) beyond that.
 *
 * @example binomialLogPmfFromLogs(3, 10, Math.log(0.2), Math.log(0.8)) // -1.6028744...
 *
 * Reference: Loader (2000), eq. (5).
 */
export function binomialLogPmfFromLogs(
  k: number,
  n: number,
  logP: number,
  log1mP: number,
): number {
  assertCounts('binomialLogPmfFromLogs', n, k);
  if (Number.isNaN(logP) || Number.isNaN(log1mP) || logP > 0 || log1mP > 0) {
    throw new RangeError(
      `binomialLogPmfFromLogs: logP and log1mP must be logarithms of probabilities (<= 0), got ${String(logP)} and ${String(log1mP)}.`,
    );
  }
  if (n === 0) return 0;
  if (logP === -Infinity) return k === 0 ? 0 : -Infinity;
  if (log1mP === -Infinity) return k === n ? 0 : -Infinity;
  if (k === 0) return n * log1mP;
  if (k === n) return n * logP;
  if (logP > MIN_NORMAL_LOG && log1mP > MIN_NORMAL_LOG) {
    return loaderInterior(k, n, n * Math.exp(logP), n * Math.exp(log1mP));
  }
  return logBinomialCoefficient(n, k) + k * logP + (n - k) * log1mP;
}
