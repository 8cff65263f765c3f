import { describe, expect, it } from 'vitest';
import engine from '@/tests/fixtures/engine/engine-fixtures.json';
import { ESTIMATOR_KEYS, ESTIMATOR_LABELS, ESTIMATORS } from '@/lib/stats/estimators';

describe('the estimator index', () => {
  it('holds the five estimators under DESIGN.md keys, in display order', () => {
    expect(Object.keys(ESTIMATORS)).toEqual([...ESTIMATOR_KEYS]);
    expect(ESTIMATOR_KEYS).toEqual(['binomialMle', 'vasicekMle', 'momentVariance', 'momentVarianceCorrected', 'jointDefault']); // DESIGN.md table
    expect(Object.keys(ESTIMATOR_LABELS)).toEqual([...ESTIMATOR_KEYS]);
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
