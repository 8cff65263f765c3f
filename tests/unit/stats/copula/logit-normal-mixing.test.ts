import { describe, expect, it } from 'vitest';
import fx from '@/tests/fixtures/copula/copula-fixtures.json';
import { logitNormalFromEquivalent, logitNormalMle } from '@/lib/stats/estimators/logit-normal-mle';
import { equivalentRho } from '@/lib/stats/equivalent-rho';
import { binomialLogPmf } from '@/lib/stats/log-binomial';
import { LogitNormalLikelihood, logistic, logitNormalMoment } from '@/lib/stats/logit-normal-mixing';

describe('logit-normal likelihood', () => {
  it('matches scipy quad for cohorts up to 10^6, zero and all-default years included, and its moments E[pi], E[pi^2]', () => {
    // computed with SciPy 1.17 by tests/fixtures/copula/make_copula.py (quad split at the mode)
    for (const c of fx.logitNormal) {
      const v = new LogitNormalLikelihood({ obligors: [c.n], defaults: [c.d] }).logLik(c.mu, c.sigma);
      expect(Math.abs(v - c.logLik), `n=${c.n} d=${c.d}`).toBeLessThan(1e-9 * Math.max(1, Math.abs(c.logLik)));
      expect(Math.abs(logitNormalMoment(c.mu, c.sigma, 1) / c.mean - 1)).toBeLessThan(1e-10);
      expect(Math.abs(logitNormalMoment(c.mu, c.sigma, 2) / c.second - 1)).toBeLessThan(1e-10);
    }
  });

  it('is the binomial likelihood at sigma = 0', () => {
    // definition (no mixing)
    const v = new LogitNormalLikelihood({ obligors: [5000, 4000], defaults: [60, 31] }).logLik(-4.3, 0);
    const p = logistic(-4.3);
    expect(Math.abs(v - binomialLogPmf(60, 5000, p) - binomialLogPmf(31, 4000, p))).toBeLessThan(1e-10);
  });

  it('maps (p, equivalent rho) to (mu, sigma) and back', () => {
    // round trip through the definitions (E[pi] = p, Phi2(k, k; r) = E[pi^2])
    for (const [p, r] of [[0.01, 0.05], [0.03, 0.2], [0.002, 0.12]]) {
      const law = logitNormalFromEquivalent(p, r)!;
      expect(Math.abs(logitNormalMoment(law.mu, law.sigma, 1) - p)).toBeLessThan(1e-10 * p + 1e-15);
      expect(Math.abs(equivalentRho(p, logitNormalMoment(law.mu, law.sigma, 2)) - r)).toBeLessThan(1e-7);
    }
  });
});

describe('logitNormalMle', () => {
  it('finds SciPy\'s maximum of a small invented panel, with a profile interval around the equivalent rho', () => {
    // computed with SciPy 1.17 (Nelder-Mead on the quad likelihood) by make_copula.py
    const r = logitNormalMle(fx.logitNormalMle.panel);
    expect(r.status).toBe('ok');
    expect(Math.abs(r.logLik! - fx.logitNormalMle.logLik)).toBeLessThan(1e-7);
    expect(Math.abs(r.mu! - fx.logitNormalMle.mu)).toBeLessThan(1e-4);
    expect(Math.abs(r.sigma! - fx.logitNormalMle.sigma)).toBeLessThan(1e-4);
    const iv = r.intervals.profile!;
    expect(iv.lower).toBeLessThan(r.equivalentRho!);
    expect(iv.upper).toBeGreaterThan(r.equivalentRho!);
    expect(iv.lower).toBeGreaterThan(0);
  });

  it('gives a status and a sentence for no defaults, a single year and no spread, never NaN', () => {
    expect(logitNormalMle({ obligors: [800, 900], defaults: [0, 0] }).reason).toMatch(/no defaults/);
    expect(logitNormalMle({ obligors: [800], defaults: [8] }).reason).toMatch(/single year/);
    const flat = logitNormalMle({ obligors: [1000, 1000, 1000], defaults: [10, 10, 10] }, { intervals: false });
    expect(flat.sigma).toBe(0);
    expect(flat.equivalentRho).toBe(0);
    expect(flat.reason).toMatch(/binomial law/);
  });
});
