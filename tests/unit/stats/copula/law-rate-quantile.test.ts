import { describe, expect, it } from 'vitest';
import fx from '@/tests/fixtures/copula/copula-fixtures.json';
import rq from '@/tests/fixtures/copula/rate-quantiles.json';
import { compareMixingLaws, lawRateQuantile } from '@/lib/stats/copula-comparison';

const rel = (a: number, b: number) => Math.abs(a / b - 1);

describe('lawRateQuantile', () => {
  it('gives the Gaussian (Vasicek), beta and logit-normal default-rate quantiles', () => {
    // computed with SciPy 1.17 by tests/fixtures/copula/make_rate_quantiles.py (norm.ppf, beta.ppf, Phi2 by quad)
    for (const c of rq.gaussian) {
      c.q.forEach((q, i) => expect(rel(lawRateQuantile({ law: 'gaussian', logLik: 0, pd: c.p, rho: c.rho }, q), c.x[i])).toBeLessThan(1e-10));
    }
    for (const c of rq.beta) {
      c.q.forEach((q, i) => expect(rel(lawRateQuantile({ law: 'beta', logLik: 0, pd: c.p, equivalentRho: c.equivalentRho }, q), c.x[i])).toBeLessThan(1e-7));
    }
    for (const c of rq.logitNormal) {
      c.q.forEach((q, i) => expect(rel(lawRateQuantile({ law: 'logitNormal', logLik: 0, mu: c.mu, sigma: c.sigma }, q), c.x[i])).toBeLessThan(1e-12));
    }
  });

  it('gives the t copula quantiles, and the Gaussian ones at the Gaussian limit nu = infinity', () => {
    // computed with SciPy 1.17 by tests/fixtures/copula/make_copula.py
    for (const c of fx.tQuantiles) {
      expect(rel(lawRateQuantile({ law: 't', logLik: 0, pd: c.p, rho: c.rho, nu: c.nu }, 0.99), c.q99)).toBeLessThan(1e-8);
      expect(rel(lawRateQuantile({ law: 't', logLik: 0, pd: c.p, rho: c.rho, nu: c.nu }, 0.999), c.q999)).toBeLessThan(1e-8);
    }
    const g = rq.gaussian[0];
    expect(rel(lawRateQuantile({ law: 't', logLik: 0, pd: g.p, rho: g.rho, nu: Number.POSITIVE_INFINITY }, 0.999), g.x[3])).toBeLessThan(1e-8);
  });

  it('is increasing in q, is the rate itself without mixing, agrees with the comparison table and refuses q outside (0, 1)', () => {
    const laws = [
      { law: 'gaussian', logLik: -50, pd: 0.01, rho: 0.12 },
      { law: 't', logLik: -48, pd: 0.01, rho: 0.12, nu: 5 },
      { law: 'beta', logLik: -49, pd: 0.01, equivalentRho: 0.12 },
      { law: 'logitNormal', logLik: -49, mu: -4.5, sigma: 0.5 },
    ] as const;
    for (const law of laws) {
      const xs = [0.1, 0.5, 0.9, 0.99, 0.999, 0.9999].map((q) => lawRateQuantile(law, q));
      for (let i = 1; i < xs.length; i++) expect(xs[i]).toBeGreaterThan(xs[i - 1]);
    }
    const rows = compareMixingLaws(laws, 20);
    laws.forEach((law, i) => expect(lawRateQuantile(law, 0.999)).toBe(rows[i].quantile999));
    // no mixing: every obligor's PD is p in every year (definition)
    expect(lawRateQuantile({ law: 'gaussian', logLik: 0, pd: 0.02, rho: 0 }, 0.999)).toBe(0.02);
    expect(lawRateQuantile({ law: 'beta', logLik: 0, pd: 0.02, equivalentRho: 0 }, 0.999)).toBe(0.02);
    expect(() => lawRateQuantile(laws[0], 1)).toThrow(/q must be strictly between 0 and 1; got 1/);
  });
});
