/**
 * The one-sample Kolmogorov-Smirnov test of uniformity on (0, 1), with the exact finite-sample
 * distribution of its statistic.
 */

/** Scale of the exponent bookkeeping of the matrix power (Marsaglia, Tsang & Wang 2003). */
const SCALE = 1e140;
const SCALE_LOG10 = 140;

function multiply(A: Float64Array, B: Float64Array, m: number): Float64Array {
  const C = new Float64Array(m * m);
  for (let i = 0; i < m; i++) {
    for (let j = 0; j < m; j++) {
      let s = 0;
      for (let k = 0; k < m; k++) s += A[i * m + k] * B[k * m + j];
      C[i * m + j] = s;
    }
  }
  return C;
}

/** H^n with a base-10 exponent kept aside: returns [matrix, exponent]. */
function power(H: Float64Array, m: number, n: number): [Float64Array, number] {
  if (n === 1) return [H.slice(), 0];
  const [half, e] = power(H, m, Math.floor(n / 2));
  let V = multiply(half, half, m);
  let eV = 2 * e;
  if (n % 2 === 1) V = multiply(H, V, m);
  const centre = Math.floor(m / 2);
  if (V[centre * m + centre] > SCALE) {
    for (let i = 0; i < m * m; i++) V[i] /= SCALE;
    eV += SCALE_LOG10;
  }
  return [V, eV];
}

/**
 * P(D_n < d), the exact distribution function of the two-sided Kolmogorov statistic
 * D_n = sup |F_n(u) - u| of n independent uniforms.
 *
 * Method: Marsaglia, Tsang & Wang (2003): with k = floor(n d) + 1, m = 2k - 1 and h = k - n d,
 * P(D_n < d) = n! / n^n (H^n)_{kk} for the m x m matrix H of their eq. (2), the power by repeated
 * squaring with the exponent kept apart; accurate to ~13 digits.
 *
 * Special cases: d <= 0 gives 0, d >= 1 gives 1; n not a whole number >= 1 throws RangeError.
 *
 * @example kolmogorovCdf(10, 0.274) // ~0.6284 (scipy.stats.kstwo.cdf(0.274, 10))
 *
 * Reference: Marsaglia, G., Tsang, W. W. & Wang, J. (2003), "Evaluating Kolmogorov's
 * distribution", Journal of Statistical Software 8(18):1-4.
 */
export function kolmogorovCdf(n: number, d: number): number {
  if (!Number.isInteger(n) || n < 1) throw new RangeError(`kolmogorovCdf: the sample size must be a whole number of at least 1; got ${n}.`);
  if (!(d > 0)) return 0;
  if (d >= 1) return 1;
  const k = Math.floor(n * d) + 1;
  const m = 2 * k - 1;
  const h = k - n * d;
  const H = new Float64Array(m * m);
  for (let i = 0; i < m; i++) for (let j = 0; j < m; j++) H[i * m + j] = i - j + 1 < 0 ? 0 : 1;
  for (let i = 0; i < m; i++) {
    H[i * m] -= Math.pow(h, i + 1);
    H[(m - 1) * m + i] -= Math.pow(h, m - i);
  }
  H[(m - 1) * m] += 2 * h - 1 > 0 ? Math.pow(2 * h - 1, m) : 0;
  for (let i = 0; i < m; i++) {
    for (let j = 0; j < m; j++) {
      if (i - j + 1 > 0) for (let g = 1; g <= i - j + 1; g++) H[i * m + j] /= g;
    }
  }
  const [Q, e] = power(H, m, n);
  let s = Q[(k - 1) * m + (k - 1)];
  let exponent = e;
  for (let i = 1; i <= n; i++) {
    s = (s * i) / n;
    if (s < 1 / SCALE) {
      s *= SCALE;
      exponent -= SCALE_LOG10;
    }
  }
  return Math.min(1, Math.max(0, s * Math.pow(10, exponent)));
}

/** Result of {@link ksUniformityTest}. */
export interface KsTest {
  /** D_n = sup |F_n(u) - u|. */
  statistic: number;
  /** P(D_n >= statistic) under uniformity, exact. */
  pValue: number;
}

/**
 * Kolmogorov-Smirnov test that values are a sample of the uniform law on (0, 1): the statistic
 * D_n = max_i max(i / n - u_(i), u_(i) - (i - 1) / n) of the sorted values and its exact p-value
 * 1 - P(D_n < D) ({@link kolmogorovCdf}).
 *
 * Special cases: an empty sample or a value outside [0, 1] throws RangeError.
 *
 * @example ksUniformityTest([0.1, 0.4, 0.7]) // statistic 0.2667, pValue ~0.96 (scipy.stats.kstest(x, 'uniform', method='exact'))
 *
 * Reference: Kolmogorov (1933); Smirnov (1948); Marsaglia, Tsang & Wang (2003) for the exact law;
 * Conover, W. J. (1999), Practical Nonparametric Statistics, 3rd ed., section 6.1.
 */
export function ksUniformityTest(values: readonly number[]): KsTest {
  const n = values.length;
  if (n === 0) throw new RangeError('ksUniformityTest: the sample is empty.');
  const u = values.map((v, i) => {
    if (!(v >= 0 && v <= 1)) throw new RangeError(`ksUniformityTest: value ${i + 1} is ${v}; every value must lie in [0, 1].`);
    return v;
  });
  u.sort((a, b) => a - b);
  let d = 0;
  for (let i = 0; i < n; i++) d = Math.max(d, (i + 1) / n - u[i], u[i] - i / n);
  return { statistic: d, pValue: Math.min(1, Math.max(0, 1 - kolmogorovCdf(n, d))) };
}
