import { describe, expect, it } from 'vitest';
import engine from '@/tests/fixtures/engine/engine-fixtures.json';
import {
  ar1Mle,
  ESTIMATOR_KEYS,
  ESTIMATOR_LABELS,
  ESTIMATORS,
  INDEPENDENT_ESTIMATOR_KEYS,
  INDEPENDENT_ESTIMATORS,
  momentVarianceAutocorrected,
  PERSISTENT_ESTIMATOR_KEYS,
} from '@/lib/stats/estimators';
import { ESTIMATOR_MODEL } from '@/lib/stats/fit-models';

describe('the estimator index', () => {
  it('holds the five estimators of DESIGN.md under their keys, and the persistent-factor ones beside them, in display order', () => {
    expect(INDEPENDENT_ESTIMATOR_KEYS).toEqual(['binomialMle', 'vasicekMle', 'momentVariance', 'momentVarianceCorrected', 'jointDefault']); // DESIGN.md table
    expect(Object.keys(INDEPENDENT_ESTIMATORS)).toEqual([...INDEPENDENT_ESTIMATOR_KEYS]);
    expect(PERSISTENT_ESTIMATOR_KEYS).toEqual(['momentVarianceAutocorrected', 'ar1Mle']);
    // every key once, the corrected moments beside the plain ones
    expect([...ESTIMATOR_KEYS].sort()).toEqual([...INDEPENDENT_ESTIMATOR_KEYS, ...PERSISTENT_ESTIMATOR_KEYS].sort());
    expect(ESTIMATOR_KEYS.indexOf('momentVarianceAutocorrected')).toBe(ESTIMATOR_KEYS.indexOf('momentVarianceCorrected') + 1);
    expect(Object.keys(ESTIMATORS)).toEqual([...ESTIMATOR_KEYS]);
    expect(Object.keys(ESTIMATOR_LABELS)).toEqual([...ESTIMATOR_KEYS]);
    // the model each one assumes (lib/stats/fit-models.ts)
    for (const k of INDEPENDENT_ESTIMATOR_KEYS) expect(ESTIMATOR_MODEL[k]).toBe('independent');
    for (const k of PERSISTENT_ESTIMATOR_KEYS) expect(ESTIMATOR_MODEL[k]).toBe('ar1');
  });

  it('runs the persistent-factor estimators under their keys', () => {
    const E = engine.panels.E;
    expect(ESTIMATORS.momentVarianceAutocorrected(E)).toEqual(momentVarianceAutocorrected(E));
    expect(ESTIMATORS.ar1Mle(E).rho).toBe(ar1Mle(E).result.rho);
  });

  it('each key runs its own definition (panel A against SciPy)', () => {
    const A = engine.panels.A;
    const out = Object.fromEntries(ESTIMATOR_KEYS.map((k) => [k, ESTIMATORS[k](A).rho]));
    // computed with SciPy 1.17 (tests/fixtures/engine/make_fixtures.py)
    expect(Math.abs(out.binomialMle! - A.binomialMle.rho)).toBeLessThan(1e-5);
    expect(Math.abs(out.vasicekMle! - A.vasicekMle.rho)).toBeLessThan(1e-12);
    expect(Math.abs(out.momentVariance! - A.momentVariance.rho)).toBeLessThan(1e-9);
    expect(Math.abs(out.momentVarianceCorrected! - A.momentVarianceCorrected.rho)).toBeLessThan(1e-9);
    expect(Math.abs(out.jointDefault! - A.jointDefault.rho)).toBeLessThan(1e-9);
  });
});
