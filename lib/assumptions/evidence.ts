import type { AssumptionMixingLaw, FactorModel } from '@/db/schema';
import { AppError } from '@/lib/errors';
import type { EstimatorKey } from '@/lib/stats/estimators/types';
import { ESTIMATOR_MODEL } from '@/lib/stats/fit-models';
import { CREDIBLE_INTERVAL, pickPosterior, POSTERIOR_ESTIMATOR, type PriorRecord } from './posterior-evidence';
import { pickTCopula, T_COPULA_ESTIMATOR, type NuInterval } from './t-copula-evidence';

/**
 * Picks the evidence of one segment and estimator out of a fit run's results (the JSON the engine
 * writes: segments[].estimates.<estimator> { rho, pd, intervals: { <method>: { level, lower, upper } } },
 * the methods binomialMle's profile, wald and bootstrap, vasicekMle's chiSquare, the moment
 * estimators' bootstrap and ar1Mle's profile), with the factor model the estimator assumes. A
 * missing segment, an undefined estimate or a missing interval is refused with a sentence: an
 * assumption is never drafted on evidence that is not there. The estimator `posteriorMedian` reads
 * the segment's `posterior` block instead (posterior-evidence.ts), with its credible interval and priors;
 * the estimator `tCopula` reads `estimates.tCopula` with nu and its interval (t-copula-evidence.ts).
 * Every other value is of the Gaussian copula.
 */
type Interval = { level: number; lower: number; upper: number };
type Estimate = { rho: number | null; pd: number | null; status?: string; reason?: string; intervals?: Record<string, Interval | null> };
type SegmentResult = { segment: string; periods?: string[]; estimates: Record<string, Estimate | undefined>; posterior?: unknown };

export type PickedEvidence = {
  factorModel: FactorModel;
  estimate: number;
  pd: number;
  intervalLevel: number;
  intervalLower: number;
  intervalUpper: number;
  windowFrom: string;
  windowTo: string;
  /** The priors of a posterior median; null for every other estimator. */
  prior: PriorRecord | null;
  /** The mixing law of the value, and for the t copula its nu with the interval of nu (null for a Gaussian value). */
  mixingLaw: AssumptionMixingLaw;
  nu: number | null;
  nuInterval: NuInterval | null;
};

const GAUSSIAN = { mixingLaw: 'gaussian', nu: null, nuInterval: null } as const;

/** The intervals an estimate has, for the sentence that refuses another. */
function computed(est: Estimate): string {
  const have = Object.entries(est.intervals ?? {})
    .filter(([, iv]) => iv && typeof iv.lower === 'number')
    .map(([k]) => k);
  return have.length ? ` (for this estimator: ${have.join(', ')})` : ' (this estimator has none in this fit)';
}

export function pickEvidence(
  results: unknown,
  segment: string,
  estimator: string,
  intervalMethod: string,
): PickedEvidence {
  const segs = (results as { segments?: SegmentResult[] } | null)?.segments;
  const seg = Array.isArray(segs) ? segs.find((s) => s?.segment === segment) : undefined;
  if (!seg) throw new AppError('invalid:segment', `The fit run has no results for the segment “${segment}”.`, { field: 'segment' });
  const periods = seg.periods ?? [];
  const window = { windowFrom: periods[0] ?? '', windowTo: periods[periods.length - 1] ?? '' };
  if (estimator === POSTERIOR_ESTIMATOR) {
    if (intervalMethod !== CREDIBLE_INTERVAL) {
      throw new AppError('invalid:interval', `A posterior median carries its credible interval: choose the interval ${CREDIBLE_INTERVAL}, not ${intervalMethod}.`, {
        field: 'intervalMethod',
      });
    }
    // The grid posterior is of the independent-years model (lib/stats/rho-posterior.ts).
    return { factorModel: 'independent', ...pickPosterior(seg), ...window, ...GAUSSIAN };
  }
  if (estimator === T_COPULA_ESTIMATOR) {
    // The t copula of the engine is of independent years (lib/stats/t-copula-likelihood.ts).
    return { factorModel: 'independent', ...pickTCopula(seg, intervalMethod), ...window, prior: null, mixingLaw: 't' };
  }
  const est = seg.estimates?.[estimator];
  if (!est || typeof est.rho !== 'number' || typeof est.pd !== 'number') {
    throw new AppError(
      'invalid:estimator',
      `The estimator ${estimator} gave no value for ${segment}${est?.reason ? `: ${est.reason}` : ''}. Choose another estimator.`,
      { field: 'estimator' },
    );
  }
  const iv = est.intervals?.[intervalMethod];
  if (!iv || typeof iv.lower !== 'number' || typeof iv.upper !== 'number') {
    throw new AppError(
      'invalid:interval',
      `The fit has no ${intervalMethod} interval for ${estimator} on ${segment}. Choose an interval the fit computed${computed(est)}.`,
      { field: 'intervalMethod' },
    );
  }
  return {
    factorModel: ESTIMATOR_MODEL[estimator as EstimatorKey] ?? 'independent',
    estimate: est.rho,
    pd: est.pd,
    intervalLevel: iv.level,
    intervalLower: iv.lower,
    intervalUpper: iv.upper,
    ...window,
    prior: null,
    ...GAUSSIAN,
  };
}
