/**
 * The chi-square confidence interval of rho for the closed-form Vasicek MLE (DESIGN.md key
 * `vasicekMle`, interval key `intervals.chiSquare`).
 */
import chisquareQuantile from '@stdlib/stats-base-dists-chisquare-quantile';
import { assertPanel, type Panel } from '../panel';
import { normalQuantile } from '../normal';

/** The approximation the interval rests on, in words (shown beside the interval). */
export const CHI_SQUARE_APPROXIMATION =
  'Exact only for infinitely large cohorts with independent years (the large-pool Vasicek model): then T s2 / s^2 follows chi-square with T - 1 degrees of freedom. With finite cohorts the binomial noise widens the spread of Phi^-1(DR), so the interval sits too high for small cohorts; with a persistent factor it is too narrow.';

/** A chi-square interval of rho. */
export interface ChiSquareInterval {
  status: 'ok';
  level: number;
  lower: number;
  upper: number;
  /** {@link CHI_SQUARE_APPROXIMATION}. */
  approximation: string;
}

/** No interval for these data, with the reason. */
export interface ChiSquareIntervalUndefined {
  status: 'undefined';
  reason: string;
}

/**
 * Confidence interval of rho from the chi-square law of the closed-form Vasicek variance.
 *
 * Under the large-pool model x_t = Phi^-1(DR_t) are independent normals with variance
 * s^2 = rho / (1 - rho), so with s2 = (1/T) sum (x_t - mean x)^2 (the closed form's divisor T),
 * T s2 / s^2 ~ chi-square(T - 1) (Cochran's theorem). The interval of s^2 at `level` is
 * [T s2 / q_(1+level)/2, T s2 / q_(1-level)/2] with q_a the chi-square(T - 1) quantile, and
 * rho = s^2 / (1 + s^2) is increasing in s^2, so
 *
 *   lower = L / (1 + L),  upper = U / (1 + U),  L = T s2 / q_(1+level)/2,  U = T s2 / q_(1-level)/2.
 *
 * Method: normalQuantile for the probits (Wichura 1988); chi-square quantiles by stdlib-js
 * (inverse regularised incomplete gamma function, ~1e-15 relative).
 *
 * Special cases (status `undefined` with a sentence): a default rate of 0 or 1 in any period
 * (its probit is infinite, as for the estimate itself); T < 2 (no degrees of freedom); every
 * probit equal (s2 = 0: the interval would collapse to the point 0). `level` outside (0, 1) or
 * invalid counts throw RangeError.
 *
 * @example vasicekChiSquareInterval({ obligors: [1000, 1000, 1000], defaults: [5, 20, 10] }, 0.95)
 *
 * Reference: Vasicek, O. (2002), "The distribution of loan portfolio value", Risk 15(12):160-162
 * (the probit of the default rate is normal); Cochran, W. G. (1934), "The distribution of quadratic
 * forms in a normal system", Proc. Cambridge Philos. Soc. 30:178-191; Mood, A. M., Graybill, F. A.
 * & Boes, D. C. (1974), Introduction to the Theory of Statistics, 3rd ed., section VIII.4.3 (the
 * confidence interval of a normal variance).
 */
export function vasicekChiSquareInterval(panel: Panel, level = 0.95): ChiSquareInterval | ChiSquareIntervalUndefined {
  if (!(level > 0 && level < 1)) {
    throw new RangeError(`vasicekChiSquareInterval: the level must be strictly between 0 and 1 (for example 0.95); got ${level}.`);
  }
  assertPanel(panel, 'vasicekChiSquareInterval');
  const T = panel.obligors.length;
  if (T < 2) {
    return { status: 'undefined', reason: 'The chi-square interval needs at least 2 periods (T - 1 degrees of freedom).' };
  }
  const x: number[] = [];
  for (let t = 0; t < T; t++) {
    const d = panel.defaults[t];
    const n = panel.obligors[t];
    if (d === 0 || d === n) {
      return {
        status: 'undefined',
        reason: `Period ${t + 1} has a default rate of ${d === 0 ? 0 : 1}; the closed form and its interval need Phi^-1 of every default rate, which is infinite there.`,
      };
    }
    x.push(normalQuantile(d / n));
  }
  let mu = 0;
  for (const v of x) mu += v;
  mu /= T;
  let ss = 0;
  for (const v of x) ss += (v - mu) * (v - mu);
  if (!(ss > 0)) {
    return { status: 'undefined', reason: 'Every period has the same default rate, so the spread of the probits is 0 and the interval would be the single point 0.' };
  }
  // T s2 = sum of squares
  const qHigh = chisquareQuantile(0.5 + level / 2, T - 1);
  const qLow = chisquareQuantile(0.5 - level / 2, T - 1);
  const L = ss / qHigh;
  const U = ss / qLow;
  return { status: 'ok', level, lower: L / (1 + L), upper: U / (1 + U), approximation: CHI_SQUARE_APPROXIMATION };
}
