/**
 * The persistent-factor (AR(1)) part of a segment fit (fit-panel.ts): ar1Mle with its intervals,
 * the profile of phi and the LR test of phi = 0; the autocorrelation-corrected variance moments;
 * and what the serial-dependence checks of the diagnostics take from them.
 */
import type { PersistenceCheck } from './diagnostics';
import { ar1Mle, type Ar1MleResult } from './estimators/ar1-mle';
import { momentTarget } from './estimators/moment-target';
import { momentVarianceAutocorrected } from './estimators/moment-variance-autocorrected';
import type { Estimate } from './estimators/types';
import type { Ar1MleDto, AutocorrectedMomentDto } from './fit-result';
import { ar1Fit } from './intervals/ar1-intervals';
import type { Panel } from './panel';
import type { StageTimer } from './stage-timer';

/** The estimate fields of an estimator's result (its other fields, such as logLik, left out). */
export function estimateOf(e: Estimate): Estimate {
  return e.reason === undefined ? { rho: e.rho, pd: e.pd, status: e.status } : { rho: e.rho, pd: e.pd, status: e.status, reason: e.reason };
}

/**
 * ar1Mle with its profile interval of rho, the interval and profile of phi (20 points) and the LR
 * test of phi = 0, as the result's `estimates.ar1Mle`.
 *
 * Method: ar1Fit (re-maximising when a profile finds a higher point), timed by `timer` under
 * `ar1Mle`, `ar1Mle.profile`, `ar1Mle.phiInterval` and `ar1Mle.phiProfile`.
 *
 * Special cases: an undefined or not-converged estimate carries its status and sentence with null
 * intervals; when a search for an interval end fails (a RangeError of ar1Fit), the estimate is
 * kept and the intervals are null with the error's sentence in `intervalNotes.profile`.
 *
 * @example ar1MleDto({ obligors, defaults }, 0.95, new StageTimer())
 *
 * Reference: McNeil & Wendin (2007); Venzon & Moolgavkar (1988); Wilks (1938).
 */
export function ar1MleDto(panel: Panel, level: number, timer: StageTimer): Ar1MleDto {
  const point = (r: Ar1MleResult) => ({ ...estimateOf(r), phi: r.phi, logLik: r.logLik, atBoundary: r.atBoundary, phiAtEdge: r.phiAtEdge, logLikIndependent: r.logLikIndependent });
  try {
    const fit = ar1Fit(panel, { level, timer });
    return {
      ...point(fit.result),
      intervals: { profile: fit.profile },
      phiInterval: fit.phiInterval,
      lrTestPhi0: fit.lrTestPhi0,
      phiProfile: fit.cutoff === null ? null : { points: fit.phiProfile, cutoff: fit.cutoff },
    };
  } catch (err) {
    if (!(err instanceof RangeError)) throw err;
    const { result } = timer.time('ar1Mle', () => ar1Mle(panel));
    return {
      ...point(result),
      intervals: { profile: null },
      phiInterval: null,
      lrTestPhi0: null,
      phiProfile: null,
      intervalNotes: { profile: `The intervals of the AR(1) model could not be computed: ${err.message}` },
    };
  }
}

/** momentVarianceAutocorrected with the correction it applied (no bootstrap yet). */
export function autocorrectedDto(panel: Panel): AutocorrectedMomentDto {
  const e = momentVarianceAutocorrected(panel);
  const target = momentTarget('momentVarianceAutocorrected', panel);
  return {
    ...estimateOf(e),
    intervals: { bootstrap: null },
    correction: target.kind === 'target' && target.correction ? target.correction : null,
  };
}

/**
 * The AR(1) model's LR test of phi = 0 as a serial-dependence check of the diagnostics, or why it
 * could not run.
 *
 * @example persistenceCheck(ar1MleDto(panel, 0.95, timer)) // { status: 'ok', phi, statistic, pValue }
 */
export function persistenceCheck(ar1: Ar1MleDto | null): PersistenceCheck {
  if (ar1 === null) return { status: 'not-run', reason: 'Not run: the AR(1) model was not among the models of this fit.' };
  if (ar1.lrTestPhi0 === null) {
    const why = ar1.intervalNotes?.profile ?? ar1.reason ?? 'the AR(1) model has no estimate for these data.';
    return { status: 'not-run', reason: `Not computed: ${why.charAt(0).toLowerCase()}${why.slice(1)}` };
  }
  return { status: 'ok', phi: ar1.phi, statistic: ar1.lrTestPhi0.statistic, pValue: ar1.lrTestPhi0.pValue };
}
