import { AppError } from '@/lib/errors';
import { estimatorLabel } from '@/lib/stats/estimators/types';

/**
 * The evidence of a posterior-median assumption: a segment's `posterior` block of a fit run (the
 * grid posterior of rho and p under a stated prior, lib/stats/low-default.ts) read as an estimate
 * (the posterior median of rho), its equal-tailed credible interval, the PD (the posterior median
 * of p: the PD the value is valid with) and the prior it was computed under, which the library
 * records beside the value ({ rho: "flat", pd: "beta:1,1" }, DESIGN.md "Posterior").
 */

/** The estimator key under which a posterior median is drafted, and its interval method. */
export const POSTERIOR_ESTIMATOR = 'posteriorMedian';
export const CREDIBLE_INTERVAL = 'credible';
export const POSTERIOR_LABEL = 'Posterior median (grid posterior under a stated prior)';

/** The two priors of a posterior, as the engine names them. */
export type PriorRecord = { rho: string; pd: string };

type PosteriorLike = {
  status?: string;
  reason?: string;
  median?: number;
  lower?: number;
  upper?: number;
  level?: number;
  prior?: { rho?: unknown; pd?: unknown };
  pd?: { median?: number };
};

export type PickedPosterior = {
  estimate: number;
  pd: number;
  intervalLevel: number;
  intervalLower: number;
  intervalUpper: number;
  prior: PriorRecord;
};

const finite = (x: unknown): x is number => typeof x === 'number' && Number.isFinite(x);

/**
 * The posterior of `segment` as evidence, or an AppError naming the field when the fit has none
 * (no prior was asked for), when it could not be computed (its sentence), or when a part is missing.
 */
export function pickPosterior(segmentResult: { segment: string; posterior?: unknown }): PickedPosterior {
  const p = segmentResult.posterior as PosteriorLike | undefined;
  const name = segmentResult.segment;
  if (!p) {
    throw new AppError(
      'invalid:estimator',
      `The fit has no posterior for ${name}: run a fit with a prior (New fit, "Prior for the low-default posterior") to draft its posterior median.`,
      { field: 'estimator' },
    );
  }
  if (p.status !== 'ok') {
    throw new AppError('invalid:estimator', `The posterior of ${name} was not computed${p.reason ? `: ${p.reason}` : ''}. Choose another estimator.`, {
      field: 'estimator',
    });
  }
  const rhoPrior = p.prior?.rho;
  const pdPrior = p.prior?.pd;
  if (!finite(p.median) || !finite(p.lower) || !finite(p.upper) || !finite(p.level) || !finite(p.pd?.median) || typeof rhoPrior !== 'string' || typeof pdPrior !== 'string') {
    throw new AppError('invalid:estimator', `The posterior of ${name} in this fit lacks its median, credible interval, PD or prior; run the fit again.`, {
      field: 'estimator',
    });
  }
  return {
    estimate: p.median,
    pd: p.pd.median,
    intervalLevel: p.level,
    intervalLower: p.lower,
    intervalUpper: p.upper,
    prior: { rho: rhoPrior, pd: pdPrior },
  };
}

/** The readable name of a draftable estimator key: the engine's estimators and the posterior median. */
export function valueSourceLabel(key: string): string {
  return key === POSTERIOR_ESTIMATOR ? POSTERIOR_LABEL : estimatorLabel(key);
}

/**
 * The readable name inside a sentence ("by binomial-mixture maximum likelihood"): the first letter
 * in lower case, except for a name that starts with a person's name (Student-t, Vasicek); the rest
 * as written (so "AR(1)" keeps its capitals).
 */
export function valueSourceInSentence(key: string): string {
  const label = valueSourceLabel(key);
  return /^(Student|Vasicek)\b/.test(label) ? label : label.charAt(0).toLowerCase() + label.slice(1);
}

/** The prior in one line, e.g. "rho flat, p beta:1,1". */
export function priorText(prior: PriorRecord): string {
  return `rho ${prior.rho}, p ${prior.pd}`;
}
