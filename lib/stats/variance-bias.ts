/**
 * The bias of the sample variance of an autocorrelated series: E[s^2] / sigma^2 for a stationary
 * series whose autocorrelations are those of an AR(1), rho_h = r^h.
 */

/**
 * Mean of the sample variance of a stationary AR(1) series, relative to the series' variance.
 *
 * For a stationary series x_1..x_T with variance sigma^2 and autocorrelations rho_h, the sample
 * variance s^2 = (1 / (T - 1)) sum_t (x_t - mean x)^2 has mean
 *
 *   E[s^2] = sigma^2 (1 - (2 / (T - 1)) sum_(h=1..T-1) (1 - h / T) rho_h),
 *
 * because Var(mean x) = (sigma^2 / T) (1 + 2 sum_h (1 - h / T) rho_h) and
 * E[s^2] = (T / (T - 1)) (sigma^2 - Var(mean x)). This function returns the factor in brackets
 * with rho_h = r^h, the autocorrelations of an AR(1) with coefficient r. With positive
 * autocorrelation the factor is below 1: the sample variance of a persistent series is biased low.
 *
 * Method: the finite sum, h = 1..T-1 (T is a number of years, so at most a few hundred terms).
 * For |r| < 1 the factor is positive (it is E[s^2] / sigma^2 of a non-degenerate series).
 *
 * Special cases: r = 0 gives 1 exactly; T must be a whole number from 2 to 10,000 and r a number
 * strictly between -1 and 1 (at +-1 the series is not stationary), else RangeError.
 *
 * @example sampleVarianceBiasFactor(20, 0.6) // 0.8618...
 * @example sampleVarianceBiasFactor(3, -0.8) // 1.32
 *
 * Reference: Anderson, T. W. (1971), The Statistical Analysis of Time Series, Wiley, section 8.2
 * (moments of the sample mean and variance of a stationary process); Bayley, G. V. & Hammersley,
 * J. M. (1946), "The effective number of independent observations in an autocorrelated time
 * series", Supplement to the Journal of the Royal Statistical Society 8(2):184-197.
 */
export function sampleVarianceBiasFactor(T: number, r: number): number {
  if (!Number.isInteger(T) || T < 2 || T > 10_000) {
    throw new RangeError(`sampleVarianceBiasFactor: T must be a whole number of periods from 2 to 10000; got ${T}.`);
  }
  if (!(r > -1 && r < 1)) {
    throw new RangeError(`sampleVarianceBiasFactor: the autocorrelation r must be strictly between -1 and 1 (a stationary series); got ${r}.`);
  }
  if (r === 0) return 1;
  let sum = 0;
  let power = 1;
  for (let h = 1; h < T; h++) {
    power *= r;
    sum += (1 - h / T) * power;
  }
  return 1 - (2 / (T - 1)) * sum;
}
