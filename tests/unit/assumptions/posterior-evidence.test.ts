import { describe, expect, it } from 'vitest';
import { pickPosterior, priorText, valueSourceInSentence } from '@/lib/assumptions/posterior-evidence';
import { AppError } from '@/lib/errors';
import { posteriorBlock } from '@/lib/stats/low-default';

const panel = { obligors: [800, 820, 790, 810, 850, 830, 805, 815], defaults: [0, 2, 0, 1, 3, 0, 1, 0] };

describe('a posterior median as the evidence of an assumption', () => {
  it('takes the median of rho, its equal-tailed credible interval, the median of p and both priors from the fit\'s posterior block', () => {
    // the block is lib/stats' (checked against SciPy in tests/unit/stats/portfolio/rho-posterior.test.ts)
    const block = posteriorBlock(panel, { kind: 'beta', a: 2, b: 18 }, { assetClass: null, level: 0.9 });
    expect(block.status).toBe('ok');
    if (block.status !== 'ok') return;
    const picked = pickPosterior({ segment: 'Small book', posterior: JSON.parse(JSON.stringify(block)) });
    expect(picked).toEqual({
      estimate: block.median,
      pd: block.pd.median,
      intervalLevel: 0.9,
      intervalLower: block.lower,
      intervalUpper: block.upper,
      prior: { rho: 'beta:2,18', pd: 'beta:1,1' },
    });
    expect(picked.intervalLower).toBeLessThan(picked.estimate);
    expect(picked.estimate).toBeLessThan(picked.intervalUpper);
    expect(priorText(picked.prior)).toBe('rho beta:2,18, p beta:1,1');
  });

  it('refuses a segment without a posterior, or whose posterior failed, with a sentence naming the estimator field', () => {
    const refusal = (posterior: unknown) => {
      try {
        pickPosterior({ segment: 'Small book', posterior });
      } catch (err) {
        expect(err).toBeInstanceOf(AppError);
        return { message: (err as AppError).message, field: (err as AppError).details?.field };
      }
      throw new Error('not refused');
    };
    expect(refusal(undefined)).toEqual({ message: expect.stringMatching(/no posterior for Small book: run a fit with a prior/), field: 'estimator' });
    const failed = posteriorBlock(panel, { kind: 'beta', a: 0, b: 2 }, { assetClass: null });
    expect(failed.status).toBe('undefined');
    expect(refusal(failed).message).toMatch(/^The posterior of Small book was not computed: .+/);
    expect(refusal({ status: 'ok', median: 0.1, lower: 0.05, upper: 0.2, level: 0.95, prior: { rho: 'flat', pd: 'beta:1,1' } }).message).toMatch(/lacks/);
  });
});

describe('the name of a value source inside a sentence', () => {
  it('starts in lower case, except a name that starts with a person\'s name, and keeps the capitals inside', () => {
    // common practice of English: proper names (Student, Vasicek) and abbreviations keep their capitals
    expect(valueSourceInSentence('binomialMle')).toBe('binomial-mixture maximum likelihood');
    expect(valueSourceInSentence('vasicekMle')).toBe('Vasicek closed-form maximum likelihood');
    expect(valueSourceInSentence('tCopula')).toBe('Student-t copula maximum likelihood');
    expect(valueSourceInSentence('ar1Mle')).toBe('maximum likelihood with a persistent (AR(1)) factor');
  });
});
