import { describe, expect, it } from 'vitest';
import fx from '@/tests/fixtures/portfolio/prudent-fixtures.json';
import { probabilityAtMost, prudentPd } from '@/lib/stats/prudent-pd';

describe('prudentPd (most prudent PD, multi-period)', () => {
  it('matches SciPy: convolution of quad pmfs and brentq (tests/fixtures/portfolio/make_prudent.py)', () => {
    // computed with SciPy 1.17 by tests/fixtures/portfolio/make_prudent.py
    for (const c of fx.cases) {
      const r = prudentPd({ obligors: c.obligors, defaults: c.defaults }, c.rho, c.confidence);
      expect(r.converged).toBe(true);
      expect(Math.abs(r.upper - c.upper) / c.upper, `rho=${c.rho} S=${c.defaults.join('+')}`).toBeLessThan(1e-7);
    }
  });

  it('at rho = 0 is the one-sided Clopper-Pearson bound on the pooled counts', () => {
    // scipy.stats.beta.ppf(confidence, S + 1, N - S) (Clopper & Pearson 1934), computed with SciPy 1.17
    const c = fx.cases.find((x) => x.rho === 0)!;
    const r = prudentPd({ obligors: c.obligors, defaults: c.defaults }, 0, c.confidence);
    expect(Math.abs(r.upper - c.clopperPearson!) / c.clopperPearson!).toBeLessThan(1e-8);
  });

  it('without defaults and at rho = 0 is 1 - (1 - confidence)^(1/N)', () => {
    // closed form of the zero-default case (Pluto & Tasche 2005, section 2)
    const panel = { obligors: [300, 250, 400], defaults: [0, 0, 0] };
    const r = prudentPd(panel, 0, 0.9);
    expect(Math.abs(r.upper - (1 - 0.1 ** (1 / 950)))).toBeLessThan(1e-12);
  });

  it('grows with rho and with the confidence (a correlated history says less)', () => {
    // property (Pluto & Tasche 2005, table 3: bounds rise with the correlation)
    const panel = { obligors: [500, 520, 480, 510, 490], defaults: [0, 1, 0, 2, 0] };
    const a = prudentPd(panel, 0, 0.9).upper;
    const b = prudentPd(panel, 0.12, 0.9).upper;
    const c = prudentPd(panel, 0.12, 0.99).upper;
    expect(b).toBeGreaterThan(a);
    expect(c).toBeGreaterThan(b);
    // and the bound really is where P(sum <= S) equals 1 - confidence (definition)
    expect(Math.abs(probabilityAtMost(panel, b, 0.12, 3) - 0.1)).toBeLessThan(1e-8);
  });

  it('refuses a bad confidence or rho with a sentence', () => {
    const panel = { obligors: [100], defaults: [0] };
    expect(() => prudentPd(panel, 0.1, 1)).toThrow(/confidence/);
    expect(() => prudentPd(panel, 1, 0.9)).toThrow(/rho/);
    expect(prudentPd({ obligors: [5], defaults: [5] }, 0.1, 0.9).upper).toBe(1);
  });
});

describe('prudentPdBlock', () => {
  it('gives a segment with many defaults a status and a sentence instead of failing the fit', async () => {
    // regression: a fit of the demo loan tape (12,458 defaults in one segment) stopped here
    const { prudentPdBlock } = await import('@/lib/stats/low-default');
    const r = prudentPdBlock({ obligors: [100000, 100000], defaults: [5000, 4000] }, { rho: 0.1, confidence: 0.9 });
    expect(r).toMatchObject({ status: 'undefined', confidence: 0.9, reason: expect.stringMatching(/9000 defaults/) });
  });
});
