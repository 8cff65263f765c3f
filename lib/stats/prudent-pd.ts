/**
 * The most prudent upper bound of a PD for segments with few or no defaults (Pluto & Tasche 2005),
 * in its multi-period form with one independent factor per year (DESIGN.md "Most prudent PD").
 */
import { brentRoot } from './brent';
import { mixturePeriodLogLikelihood } from './mixture-likelihood';
import { assertPanel, type Panel } from './panel';

/** Result of {@link prudentPd}: the `prudentPd` block of a segment. */
export interface PrudentPd {
  confidence: number;
  rho: number;
  /** The most prudent upper bound of the PD. */
  upper: number;
  /** Total defaults and obligors over the years. */
  defaults: number;
  obligors: number;
  converged: boolean;
}

/** Most total defaults the convolution accepts (it costs (S + 1) integrals a year). */
export const MAX_PRUDENT_DEFAULTS = 2000;

/**
 * P(sum_t D_t <= S) for independent years with D_t | Z_t ~ Binomial(n_t, P(Z_t)), Z_t standard
 * normal, P the Vasicek conditional PD at (p, rho).
 *
 * Method: each year's probabilities P(D_t = j), j = 0..S, are one-period mixture likelihoods
 * (mixture-likelihood.ts, the mode-bracketed adaptive rule); the sum's law up to S is their
 * convolution truncated at S.
 *
 * @example probabilityAtMost({ obligors: [500, 500], defaults: [0, 0] }, 0.001, 0.12, 0) // P(no default in either year)
 */
export function probabilityAtMost(panel: Panel, p: number, rho: number, S: number): number {
  let law = new Float64Array(S + 1);
  law[0] = 1;
  for (let t = 0; t < panel.obligors.length; t++) {
    const n = panel.obligors[t];
    const top = Math.min(S, n);
    const pmf = new Float64Array(top + 1);
    for (let j = 0; j <= top; j++) pmf[j] = Math.exp(mixturePeriodLogLikelihood(n, j, p, rho));
    const next = new Float64Array(S + 1);
    for (let i = 0; i <= S; i++) {
      if (law[i] === 0) continue;
      for (let j = 0; j <= top && i + j <= S; j++) next[i + j] += law[i] * pmf[j];
    }
    law = next;
  }
  let s = 0;
  for (let i = 0; i <= S; i++) s += law[i];
  return Math.min(1, s);
}

/**
 * The most prudent PD: the largest p with P(sum_t D_t <= sum_t d_t) >= 1 - confidence, where the
 * years have independent standard normal factors Z_t and D_t | Z_t ~ Binomial(n_t, P(Z_t)),
 * P(z) = Phi((Phi^-1(p) - sqrt(rho) z) / sqrt(1 - rho)) (Pluto & Tasche 2005, multi-period
 * version with independent years; DESIGN.md "Most prudent PD").
 *
 * Method: P(sum <= S) (probabilityAtMost) decreases in p; its crossing of 1 - confidence is found
 * by Brent's root on the logit of p in [-30, 30] (tolerance 1e-10 in the logit). At rho = 0 the sum
 * is Binomial(N, p), N = sum n_t, and the bound is the one-sided Clopper-Pearson upper bound
 * Beta^-1(confidence; S + 1, N - S) (Clopper & Pearson 1934).
 *
 * Special cases: every obligor defaulted (S = N) gives upper = 1; confidence outside (0, 1), rho
 * outside [0, 1) or more than MAX_PRUDENT_DEFAULTS defaults throw RangeError with a sentence.
 *
 * @example prudentPd({ obligors: [400, 420, 450], defaults: [0, 0, 0] }, 0.12, 0.9).upper
 *
 * Reference: Pluto, K. & Tasche, D. (2005), "Thinking positively", Risk 18(8):72-78 (the most
 * prudent estimation principle; the multi-period case with a systematic factor per year);
 * Clopper, C. J. & Pearson, E. S. (1934), Biometrika 26:404-413.
 */
export function prudentPd(panel: Panel, rho: number, confidence = 0.9): PrudentPd {
  assertPanel(panel, 'prudentPd');
  if (!(confidence > 0 && confidence < 1)) throw new RangeError(`prudentPd: the confidence must be strictly between 0 and 1 (for example 0.9); got ${confidence}.`);
  if (!(rho >= 0 && rho < 1)) throw new RangeError(`prudentPd: rho must be in [0, 1); got ${rho}.`);
  const S = panel.defaults.reduce((s, v) => s + v, 0);
  const N = panel.obligors.reduce((s, v) => s + v, 0);
  if (S > MAX_PRUDENT_DEFAULTS) {
    throw new RangeError(`prudentPd: the segment has ${S} defaults; the most prudent bound is meant for segments with few defaults (at most ${MAX_PRUDENT_DEFAULTS}), where the likelihood estimate is not informative.`);
  }
  if (S === N) return { confidence, rho, upper: 1, defaults: S, obligors: N, converged: true };
  const target = 1 - confidence;
  const f = (u: number) => probabilityAtMost(panel, 1 / (1 + Math.exp(-u)), rho, S) - target;
  const root = brentRoot(f, -30, 30, { tolerance: 1e-10 });
  return { confidence, rho, upper: 1 / (1 + Math.exp(-root.value)), defaults: S, obligors: N, converged: root.converged };
}
