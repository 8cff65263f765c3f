import { assertPanel, type Panel } from '../mixture-likelihood';
import { defaultRates, mean, solveMomentEquation } from './moment-equation';
import { sampleVariance } from './moment-variance';
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
 * Method: as momentVariance (solveMomentEquation).
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
  assertPanel(panel, 'momentVarianceCorrected');
  const T = panel.obligors.length;
  if (T < 2) return undefinedEstimate('The variance of the default rate needs at least 2 periods.');
  const dr = defaultRates(panel.obligors, panel.defaults);
  const p = mean(dr);
  if (p === 0) return undefinedEstimate('No period has a default, so the mean default rate is 0 and the moment equation has no solution.');
  if (p === 1) return undefinedEstimate('Every obligor defaulted in every period, so the moment equation has no solution.');
  const h = mean(panel.obligors.map((n) => 1 / n));
  if (h >= 1) return undefinedEstimate('Every cohort has a single obligor, so the binomial correction divides by zero.');
  const s2 = sampleVariance(dr);
  const v = (s2 - p * (1 - p) * h) / (1 - h);
  if (!(v > 0)) {
    return {
      rho: 0,
      pd: p,
      status: 'clipped',
      reason: 'Binomial noise of the cohort sizes explains all the observed variance of the default rate; the corrected target is clipped at 0.',
    };
  }
  const solution = solveMomentEquation(p, v);
  if (solution.kind === 'too-large') {
    return undefinedEstimate(
      `The corrected variance ${v.toPrecision(4)} is at least the largest the model allows at this PD (${solution.maximum.toPrecision(4)}).`,
    );
  }
  if (!solution.converged) {
    return { rho: solution.rho, pd: p, status: 'not-converged', reason: 'The root finder did not meet its tolerance.' };
  }
  return { rho: solution.rho, pd: p, status: 'ok' };
}
