/**
 * The five correlation estimators of DESIGN.md, under DESIGN.md's keys.
 *
 * | key | definition (DESIGN.md, "Estimators") |
 * |---|---|
 * | `binomialMle` | binomial-mixture maximum likelihood (Gordy & Heitfield 2002) |
 * | `vasicekMle` | closed-form MLE of the Vasicek default-rate distribution |
 * | `momentVariance` | method of moments on the default-rate variance |
 * | `momentVarianceCorrected` | the same with the finite-cohort (binomial noise) correction |
 * | `jointDefault` | joint-default-probability moments (Gordy 2000; de Servigny & Renault 2002) |
 *
 * Beside them, for a persistent factor: `momentVarianceAutocorrected` (the variance moments
 * corrected for autocorrelated default rates, in the spirit of Frei & Wunsch 2018) and `ar1Mle`
 * (maximum likelihood with an AR(1) factor, ar1-mle.ts).
 *
 * Each takes a panel `{ obligors, defaults }` and returns `{ rho, pd, status, reason? }`
 * (types.ts; ar1Mle's `result` adds phi and its log-likelihood); invalid counts throw RangeError
 * naming the period.
 */
import { binomialMle } from './binomial-mle';
import { jointDefault } from './joint-default';
import { momentVariance } from './moment-variance';
import { momentVarianceCorrected } from './moment-variance-corrected';
import type { Panel } from '../mixture-likelihood';
import type { Estimate, EstimatorKey, IndependentEstimatorKey } from './types';
import { ar1Mle } from './ar1-mle';
import { momentVarianceAutocorrected } from './moment-variance-autocorrected';
import { vasicekMle } from './vasicek-mle';

export { binomialMle, binomialMleWithProfile, ProfileLikelihood, RHO_SEARCH_LIMIT } from './binomial-mle';
export type { BinomialMleOptions, BinomialMleResult, ProfilePoint } from './binomial-mle';
export { jointDefault } from './joint-default';
export { momentVariance, sampleVariance } from './moment-variance';
export { momentVarianceCorrected } from './moment-variance-corrected';
export { momentVarianceAutocorrected } from './moment-variance-autocorrected';
export { ar1Mle, Ar1Profile, AR1_MIN_PERIODS, AR1_PHI_LIMIT } from './ar1-mle';
export type { Ar1MleResult, Ar1ProfilePoint } from './ar1-mle';
export { momentTarget, MOMENT_ESTIMATOR_KEYS } from './moment-target';
export type { MomentEstimatorKey, MomentTarget } from './moment-target';
export { vasicekMle } from './vasicek-mle';
export { ESTIMATOR_KEYS, ESTIMATOR_LABELS, estimatorLabel, INDEPENDENT_ESTIMATOR_KEYS, PERSISTENT_ESTIMATOR_KEYS, undefinedEstimate } from './types';
export type { Estimate, EstimateStatus, EstimatorKey, IndependentEstimatorKey, PersistentEstimatorKey } from './types';

/** The five estimators of the independent-factor model by DESIGN.md key (binomialMle without its intervals). */
export const INDEPENDENT_ESTIMATORS: Readonly<Record<IndependentEstimatorKey, (panel: Panel) => Estimate>> = {
  binomialMle,
  vasicekMle,
  momentVariance,
  momentVarianceCorrected,
  jointDefault,
};

/** Every estimator by key, in display order (ar1Mle without its intervals). */
export const ESTIMATORS: Readonly<Record<EstimatorKey, (panel: Panel) => Estimate>> = {
  binomialMle,
  vasicekMle,
  momentVariance,
  momentVarianceCorrected,
  momentVarianceAutocorrected,
  jointDefault,
  ar1Mle: (panel) => ar1Mle(panel).result,
};
