/**
 * The factor models a segment fit can run, and which model each estimator belongs to (what the
 * library records beside a drafted value).
 *
 * - `independent`: the Vasicek one-factor (Gaussian copula) model with a factor drawn afresh each
 *   year (DESIGN.md, "The model"): binomialMle, vasicekMle and the three moment estimators, and the
 *   stability of rho across the window (jackknife, break test, rolling window);
 * - `ar1`: the same model with a persistent factor, Z_t = phi Z_(t-1) + sqrt(1 - phi^2) e_t
 *   (McNeil & Wendin 2007): ar1Mle, and the variance moments corrected for autocorrelated default
 *   rates (momentVarianceAutocorrected, which takes the default rates to follow an AR(1)).
 *
 * binomialMle is fitted whatever the choice: it is the AR(1) model's nested null (its likelihood
 * at phi = 0, the LR test of phi = 0) and the diagnostics check it.
 */

import type { EstimatorKey } from './estimators/types';

/** The factor models, in display order. */
export const FIT_MODELS = ['independent', 'ar1'] as const;
export type FitModel = (typeof FIT_MODELS)[number];

/** Plain names of the models, as they read inside a sentence. */
export const FIT_MODEL_LABELS: Readonly<Record<FitModel, string>> = {
  independent: 'independent years',
  ar1: 'a persistent factor (AR(1))',
};

/** The factor model each estimator assumes. */
export const ESTIMATOR_MODEL: Readonly<Record<EstimatorKey, FitModel>> = {
  binomialMle: 'independent',
  vasicekMle: 'independent',
  momentVariance: 'independent',
  momentVarianceCorrected: 'independent',
  jointDefault: 'independent',
  momentVarianceAutocorrected: 'ar1',
  ar1Mle: 'ar1',
};

/**
 * Checks a list of models: at least one, each known, none twice. Throws RangeError with a sentence.
 *
 * @example assertModels(['independent', 'ar1'], 'fitPanel')
 */
export function assertModels(models: readonly string[], fn: string): asserts models is readonly FitModel[] {
  if (!Array.isArray(models) || models.length === 0) {
    throw new RangeError(`${fn}: choose at least one model (${FIT_MODELS.join(', ')}).`);
  }
  const seen = new Set<string>();
  for (const m of models) {
    if (!(FIT_MODELS as readonly string[]).includes(m)) throw new RangeError(`${fn}: unknown model "${m}"; the models are ${FIT_MODELS.join(', ')}.`);
    if (seen.has(m)) throw new RangeError(`${fn}: the model "${m}" is named twice.`);
    seen.add(m);
  }
}
