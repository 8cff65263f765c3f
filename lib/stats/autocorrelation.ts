/**
 * Lag-1 autocorrelation of a yearly series and the band within which it is immaterial for T
 * independent years, and a serial-dependence test on the PIT sequence that works with
 * zero-default years.
 */
import { normalQuantile } from './normal';

/**
 * Lag-1 sample autocorrelation of a series.
 *
 * r1 = sum_{t=2..T} (x_t - m)(x_{t-1} - m) / sum_{t=1..T} (x_t - m)^2,  m = mean(x).
 *
 * Method: two-pass sums. This is the standard estimator of Box & Jenkins (the one plotted in
 * correlograms), biased towards -1/T in short series.
 *
 * Special cases: fewer than 3 values or a constant series throw RangeError; non-finite values
 * throw RangeError naming the position.
 *
 * @example lag1Autocorrelation([1, 2, 3, 4]) // 0.25
 *
 * Reference: Box, G. E. P. & Jenkins, G. M. (1976), Time Series Analysis: Forecasting and
 * Control, eq. (2.1.12); Bartlett, M. S. (1946), JRSS Supplement 8:27-41 (its variance ~ 1/T).
 */
export function lag1Autocorrelation(values: readonly number[]): number {
  const T = values.length;
  if (T < 3) throw new RangeError(`lag1Autocorrelation: need at least 3 values; got ${T}.`);
  let m = 0;
  for (let t = 0; t < T; t++) {
    if (!Number.isFinite(values[t])) {
      throw new RangeError(`lag1Autocorrelation: value ${t + 1} is ${values[t]}; every value must be a finite number.`);
    }
    m += values[t];
  }
  m /= T;
  let num = 0;
  let den = 0;
  for (let t = 0; t < T; t++) {
    const c = values[t] - m;
    den += c * c;
    if (t > 0) num += c * (values[t - 1] - m);
  }
  if (!(den > 0)) throw new RangeError('lag1Autocorrelation: the series is constant, so its autocorrelation is undefined.');
  return num / den;
}

/**
 * Threshold above which |r1| of the implied factor series is called material:
 * 1.96 / sqrt(T), the approximate two-sided 5% critical value of a lag-1 sample autocorrelation
 * of T independent values (Bartlett 1946: variance about 1/T). Why it matters: the likelihood,
 * the intervals and the bootstrap all treat years as independent draws of the factor; a
 * persistent factor makes the intervals too narrow and biases the estimate of rho downwards.
 * At T = 20 the threshold is 0.44, at T = 10 it is 0.62.
 *
 * Special cases: T must be a positive whole number, otherwise RangeError.
 *
 * @example autocorrelationThreshold(20) // 0.4383
 *
 * Reference: Bartlett, M. S. (1946), "On the theoretical specification and sampling properties of
 * autocorrelated time-series", JRSS Supplement 8:27-41; Box & Jenkins (1976), section 2.1.6.
 */
export function autocorrelationThreshold(T: number): number {
  if (!(Number.isInteger(T) && T >= 1)) throw new RangeError(`autocorrelationThreshold: T must be a positive whole number; got ${T}.`);
  return 1.96 / Math.sqrt(T);
}


/** Result of {@link pitSerialTest}. */
export interface PitSerialTest {
  /** Lag-1 autocorrelation of the normal scores Phi^-1(u_t) of the PIT values. */
  statistic: number;
  /** 1.96 / sqrt(T): the two-sided 5% band for independent years. */
  threshold: number;
  /** |statistic| > threshold. */
  material: boolean;
}

/**
 * A test of serial dependence between years that works with zero-default years: the lag-1
 * autocorrelation of the normal scores z_t = Phi^-1(u_t) of the (mid-point) PIT values u_t of the
 * default counts under the fitted model, against the band 1.96 / sqrt(T).
 *
 * Under the fitted model with independent yearly factors the u_t are independent, so any fixed
 * transform of them has lag-1 autocorrelation within +-1.96/sqrt(T) in about 95% of panels
 * (Bartlett 1946); a persistent factor makes consecutive counts, hence their PIT values, move
 * together. Unlike the implied factor Phi^-1 of the default rate, the PIT is finite for a year
 * without defaults (it is P(D = 0) / 2), so no year has to be left out.
 *
 * Method: normal scores by normalQuantile, then lag1Autocorrelation. The band is the large-T
 * approximation; the test is a screen, not an exact test (the AR(1) likelihood-ratio test of a
 * persistent-factor model is the exact one).
 *
 * Special cases: fewer than 3 values, a value outside (0, 1), or PIT values all equal (no variation
 * to correlate) throw RangeError with a sentence.
 *
 * @example pitSerialTest([0.2, 0.7, 0.4, 0.9, 0.1, 0.5]) // { statistic: -0.5..., threshold: 0.80, material: false }
 *
 * Reference: Diebold, F. X., Gunther, T. A. & Tay, A. S. (1998), "Evaluating density forecasts",
 * International Economic Review 39:863-883, section 3 (independence of the PIT sequence);
 * Berkowitz, J. (2001), "Testing density forecasts", J. Business & Economic Statistics 19:465-474
 * (normal scores of the PIT); Bartlett (1946) (the band).
 */
export function pitSerialTest(pit: readonly number[]): PitSerialTest {
  const T = pit.length;
  if (T < 3) throw new RangeError(`pitSerialTest: need at least 3 PIT values; got ${T}.`);
  const scores = pit.map((u, t) => {
    if (!(u > 0 && u < 1)) throw new RangeError(`pitSerialTest: PIT value ${t + 1} is ${u}; every value must lie strictly between 0 and 1.`);
    return normalQuantile(u);
  });
  if (scores.every((z) => z === scores[0])) {
    throw new RangeError('pitSerialTest: every PIT value is the same, so there is no variation whose serial correlation could be measured.');
  }
  const statistic = lag1Autocorrelation(scores);
  const threshold = autocorrelationThreshold(T);
  return { statistic, threshold, material: Math.abs(statistic) > threshold };
}
