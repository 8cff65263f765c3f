import { describe, expect, it } from 'vitest';
import { factorModels } from '@/db/schema';
import { consumerVersionSchema, exportColumns } from '@/lib/assumptions/consumer';
import { estimatorKeys, intervalMethods } from '@/lib/assumptions/content';
import { FIT_MODELS } from '@/lib/stats/fit-models';

describe('the factor model of an assumption', () => {
  it('is one list in the database, the engine and the consumer contract', () => {
    // db/schema.ts may not import lib/stats, so the column's list is written twice: they must agree
    expect([...factorModels]).toEqual([...FIT_MODELS]);
    const factor = consumerVersionSchema.shape.model.shape.factor;
    expect(factor.options).toEqual([...FIT_MODELS]);
    expect(exportColumns).toEqual(expect.arrayContaining(['copula', 'factor_model']));
  });

  it('lets every estimator with an interval be drafted, with each interval method the engine writes', () => {
    expect([...estimatorKeys]).toEqual(
      expect.arrayContaining(['binomialMle', 'vasicekMle', 'momentVariance', 'momentVarianceCorrected', 'jointDefault', 'momentVarianceAutocorrected', 'ar1Mle']),
    );
    // and a low-default segment's posterior median with its equal-tailed credible interval
    expect([...estimatorKeys]).toContain('posteriorMedian');
    expect([...intervalMethods].sort()).toEqual(['bootstrap', 'chiSquare', 'credible', 'profile', 'wald']);
  });
});
