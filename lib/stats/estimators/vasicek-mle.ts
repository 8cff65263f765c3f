import { assertPanel, type Panel } from '../mixture-likelihood';
import { normalCdf, normalQuantile } from '../normal';
import { undefinedEstimate, type Estimate } from './types';

/**
 * Closed-form maximum-likelihood estimate of (p, rho) for the Vasicek default-rate distribution
 * (the large-pool approximation, which treats each DR_t as an exact draw of the conditional PD).
 *
 * x_t = Phi^-1(DR_t), mu = mean(x), s2 = (1 / T) sum (x_t - mu)^2,
 * rho = s2 / (1 + s2), p = Phi(mu / sqrt(1 + s2)) (DESIGN.md key `vasicekMle`).
 * Since Phi^-1(DR) is normal with mean k / sqrt(1 - rho) and variance rho / (1 - rho) under the
 * model, these are the normal MLEs mapped back.
 *
 * Method: direct evaluation (normalQuantile, Wichura 1988, ~1e-16 relative).
 *
 * Special cases: any DR_t equal to 0 or 1 makes Phi^-1(DR_t) infinite, so the estimate is
 * `undefined` with the period named (not patched with a substitute rate); T = 1 is `undefined`
 * too (one period identifies no variance: s2 would be 0 by construction, not an estimate).
 * Invalid counts throw RangeError naming the period.
 *
 * @example vasicekMle({ obligors: [1000, 1000, 1000], defaults: [5, 20, 10] }).rho
 *
 * Reference: Vasicek, O. (2002), "The distribution of loan portfolio value", Risk 15(12):160-162
 * (the distribution of the default rate, whose probit is normal).
 */
export function vasicekMle(panel: Panel): Estimate {
  assertPanel(panel, 'vasicekMle');
  const T = panel.obligors.length;
  if (T < 2) {
    return undefinedEstimate('A single period identifies no variance of the default rate, so the closed form has no correlation to give; it needs at least 2 periods.');
  }
  const x: number[] = [];
  for (let t = 0; t < T; t++) {
    const d = panel.defaults[t];
    const n = panel.obligors[t];
    if (d === 0 || d === n) {
      const zeros = panel.defaults.filter((v, i) => v === 0 || v === panel.obligors[i]).length;
      return undefinedEstimate(
        `Period ${t + 1} has a default rate of ${d === 0 ? 0 : 1}${zeros > 1 ? ` (${zeros} periods in all)` : ''}; the closed form needs Phi^-1 of every default rate, which is infinite there.`,
      );
    }
    x.push(normalQuantile(d / n));
  }
  let mu = 0;
  for (const v of x) mu += v;
  mu /= T;
  let s2 = 0;
  for (const v of x) s2 += (v - mu) * (v - mu);
  s2 /= T;
  return { rho: s2 / (1 + s2), pd: normalCdf(mu / Math.sqrt(1 + s2)), status: 'ok' };
}
