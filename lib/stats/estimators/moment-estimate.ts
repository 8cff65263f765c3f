import type { Panel } from '../panel';
import { solveMomentEquation } from './moment-equation';
import { momentTarget, type MomentEstimatorKey } from './moment-target';
import { undefinedEstimate, type Estimate } from './types';

/** What a moment estimator makes of the two edge cases of its target (the rest is common). */
export interface MomentEdges {
  /**
   * A target at or below 0: the estimate to report (an undefined one with a sentence, or the
   * definition's clip at rho = 0), given the mean default rate p.
   */
  atOrBelowZero: (p: number) => Estimate;
  /**
   * A target at least the largest the model allows, p(1 - p) at rho = 1: the estimate to report,
   * given p, the target, that largest value and the statistic the target is made of (momentTarget).
   */
  tooLarge: (p: number, target: number, maximum: number, statistic: number) => Estimate;
}

/**
 * The common body of the moment estimators: their target (momentTarget), then rho from
 * Phi2(k, k; rho) - p^2 = target (solveMomentEquation), with each estimator's own answer at the
 * two edges of the target.
 *
 * Method: momentTarget; a target `kind: 'undefined'` is reported with its sentence; a target at or
 * below 0 goes to `edges.atOrBelowZero`; otherwise Brent's root finder on the cancellation-free
 * excess (solveMomentEquation); `too-large` goes to `edges.tooLarge`; a root finder that missed its
 * tolerance gives status `not-converged` with the last iterate; else status `ok`.
 *
 * Special cases: as momentTarget (invalid counts throw RangeError naming the period).
 *
 * @example momentEstimate('momentVariance', panel, { atOrBelowZero: () => undefinedEstimate('...'), tooLarge: () => undefinedEstimate('...') })
 *
 * Reference: Gordy, M. B. (2000), "A comparative anatomy of credit risk models", Journal of
 * Banking & Finance 24:119-149, section 4 (moment matching).
 */
export function momentEstimate(key: MomentEstimatorKey, panel: Panel, edges: MomentEdges): Estimate {
  const m = momentTarget(key, panel);
  if (m.kind === 'undefined') return undefinedEstimate(m.reason);
  const { p, target, statistic } = m;
  if (!(target > 0)) return edges.atOrBelowZero(p);
  const solution = solveMomentEquation(p, target);
  if (solution.kind === 'too-large') return edges.tooLarge(p, target, solution.maximum, statistic);
  if (!solution.converged) {
    return { rho: solution.rho, pd: p, status: 'not-converged', reason: 'The root finder did not meet its tolerance.' };
  }
  return { rho: solution.rho, pd: p, status: 'ok' };
}
