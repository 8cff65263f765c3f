import type { Panel } from '../panel';
import { momentEstimate } from './moment-estimate';
import { undefinedEstimate, type Estimate } from './types';

/**
 * Method-of-moments estimate of the asset correlation from the default-rate variance, corrected
 * for the binomial noise of finite cohorts.
 *
 * p = mean(DR_t), s2 = sample variance of DR_t (divisor T - 1), h = mean(1 / n_t),
 * V = max(0, (s2 - p (1 - p) h) / (1 - h)), and rho solves Phi2(k, k; rho) - p^2 = V
 * (DESIGN.md key `momentVarianceCorrected`). The correction follows from
 * Var(DR_t) = Var(P) + (E[P(1 - P)]) / n_t with E[P(1 - P)] = p(1 - p) - Var(P).
 *
 * Method: as momentVariance (momentEstimate).
 *
 * Special cases: V <= 0 (all the observed variance is binomial noise) gives rho = 0 with status
 * `clipped`, as the definition clips; status `undefined` (null values and a reason) for fewer than
 * 2 periods, p = 0 or 1, every cohort of one obligor (h = 1), or V >= p(1 - p). Invalid counts
 * throw RangeError naming the period.
 *
 * @example momentVarianceCorrected({ obligors: [1000, 1000, 1000], defaults: [5, 20, 10] }).rho
 *
 * Reference: Gordy (2000), Journal of Banking & Finance 24:119-149, section 4 (moment matching with
 * finite cohorts); de Servigny, A. & Renault, O. (2002), "Default correlation: empirical evidence",
 * Standard & Poor's working paper.
 */
export function momentVarianceCorrected(panel: Panel): Estimate {
  return momentEstimate('momentVarianceCorrected', panel, {
    atOrBelowZero: (p) => ({
      rho: 0,
      pd: p,
      status: 'clipped',
      reason: 'Binomial noise of the cohort sizes explains all the observed variance of the default rate; the corrected target is clipped at 0.',
    }),
    tooLarge: (_p, v, maximum) =>
      undefinedEstimate(`The corrected variance ${v.toPrecision(4)} is at least the largest the model allows at this PD (${maximum.toPrecision(4)}).`),
  });
}
