import { describe, expect, it } from 'vitest';
import fx from '@/tests/fixtures/copula/copula-fixtures.json';
import { betaBinomialLogPmf, logRising } from '@/lib/stats/beta-binomial';
import { betaMixingMle, betaThetaFromEquivalentRho } from '@/lib/stats/estimators/beta-mixing-mle';
import { binomialLogPmf } from '@/lib/stats/log-binomial';
import { equivalentRho, gaussianSecondMoment } from '@/lib/stats/equivalent-rho';
import { createRng } from '@/lib/stats/random';

describe('beta-binomial likelihood', () => {
  it('matches scipy.stats.betabinom.logpmf and a 40-digit mpmath value, cohorts up to 10^6 and a + b up to 10^6', () => {
    // computed with SciPy 1.17 and mpmath by tests/fixtures/copula/make_copula.py (SciPy's own error reaches ~2e-9 at a + b ~ 1e6)
    for (const c of fx.betaBinomial) {
      const v = betaBinomialLogPmf(c.n, c.d, c.a / (c.a + c.b), 1 / (c.a + c.b));
      // log-gamma differences of values near 5e5 keep ~1e-10
      expect(Math.abs(v - c.mpmath), `n=${c.n} d=${c.d} a=${c.a}`).toBeLessThan(1e-10 * Math.max(1, Math.abs(c.mpmath)));
      expect(Math.abs(v - c.logPmf), `n=${c.n} d=${c.d} a=${c.a}`).toBeLessThan(5e-9 * Math.max(1, Math.abs(c.logPmf)));
    }
  });

  it('is the binomial law at theta = 0 and continuous there; the log rising factorial agrees on its three branches', () => {
    // definition (no mixing) and limit
    expect(betaBinomialLogPmf(50000, 480, 0.01, 0)).toBeCloseTo(binomialLogPmf(480, 50000, 0.01), 10);
    expect(Math.abs(betaBinomialLogPmf(50000, 480, 0.01, 1e-12) - binomialLogPmf(480, 50000, 0.01))).toBeLessThan(1e-5);
    // Gamma(x + m) / Gamma(x): the branches (sum, log-gamma, Stirling) meet: log-gamma at x = 9999 against
    // Stirling at x = 1e4 by the recurrence (x)_m = x (x + 1)_m / (x + m); the sum against log-gamma at m = 64
    expect(Math.abs(logRising(9999, 1000) - (logRising(1e4, 1000) + Math.log(9999) - Math.log(9999 + 1000)))).toBeLessThan(1e-10);
    let s = 0;
    for (let j = 0; j < 64; j++) s += Math.log(2.5 + j);
    expect(Math.abs(logRising(2.5, 64) - s)).toBeLessThan(1e-10);
  });

  it('refuses bad parameters and counts with a sentence', () => {
    expect(() => betaBinomialLogPmf(10, 11, 0.1, 0.1)).toThrow(/0 <= d <= n/);
    expect(() => betaBinomialLogPmf(10, 1, 1, 0.1)).toThrow(/strictly between 0 and 1/);
    expect(() => betaBinomialLogPmf(10, 1, 0.1, -1)).toThrow(/at or above 0/);
  });
});

describe('betaMixingMle', () => {
  it('finds SciPy\'s maximum of a small invented panel, with an interval around its equivalent rho', () => {
    // computed with SciPy 1.17 (Nelder-Mead on betabinom.logpmf) by make_copula.py
    const r = betaMixingMle(fx.betaMle.panel);
    expect(r.status).toBe('ok');
    expect(Math.abs(r.logLik! - fx.betaMle.logLik)).toBeLessThan(1e-7);
    expect(Math.abs(r.a! / fx.betaMle.a - 1)).toBeLessThan(1e-4);
    expect(Math.abs(r.b! / fx.betaMle.b - 1)).toBeLessThan(1e-4);
    const p = fx.betaMle.a / (fx.betaMle.a + fx.betaMle.b);
    expect(Math.abs(r.pd! - p)).toBeLessThan(1e-6);
    const iv = r.intervals.profile!;
    expect(iv.lower).toBeLessThan(r.equivalentRho!);
    expect(iv.upper).toBeGreaterThan(r.equivalentRho!);
  });

  it('recovers the rho of the Gaussian law a beta law was matched to (equivalent rho)', () => {
    // definition: the beta law with the Gaussian law's p and E[pi^2] has that equivalent rho
    for (const [p, rho] of [[0.01, 0.12], [0.002, 0.2], [0.05, 0.03]]) {
      const theta = betaThetaFromEquivalentRho(p, rho);
      expect(Math.abs(equivalentRho(p, (p * (p + theta)) / (1 + theta)) - rho), `p=${p}`).toBeLessThan(1e-9);
      expect(Math.abs((p * (p + theta)) / (1 + theta) - gaussianSecondMoment(p, rho))).toBeLessThan(1e-15);
    }
    // and on data: a long panel drawn from that beta law estimates an equivalent rho near 0.12
    const rng = createRng(20261204);
    const p = 0.02;
    const theta = betaThetaFromEquivalentRho(p, 0.12);
    const a = p / theta;
    const b = (1 - p) / theta;
    const gamma = (shape: number) => {
      // Marsaglia-Tsang (independent of the code under test's simulation)
      const d = shape - 1 / 3;
      const c = 1 / Math.sqrt(9 * d);
      for (;;) {
        const x = rng.normal();
        const v = (1 + c * x) ** 3;
        if (v > 0 && Math.log(rng.uniform()) < 0.5 * x * x + d - d * v + d * Math.log(v)) return d * v;
      }
    };
    const obligors = Array.from({ length: 200 }, () => 5000);
    const defaults = obligors.map((n) => {
      const ga = gamma(a + 1) * rng.uniform() ** (1 / a);
      const pi = ga / (ga + gamma(b));
      return rng.binomial(n, pi);
    });
    const fit = betaMixingMle({ obligors, defaults });
    const iv = fit.intervals.profile!;
    expect(iv.lower).toBeLessThan(0.12);
    expect(iv.upper).toBeGreaterThan(0.12);
    expect(Math.abs(fit.equivalentRho! - 0.12)).toBeLessThan(0.04);
  });

  it('gives a status and a sentence for no defaults, a single year and no overdispersion, never NaN', () => {
    const none = betaMixingMle({ obligors: [1000, 1000], defaults: [0, 0] });
    expect(none.status).toBe('undefined');
    expect(none.reason).toMatch(/no defaults/);
    const single = betaMixingMle({ obligors: [1000], defaults: [12] });
    expect(single.status).toBe('undefined');
    expect(single.reason).toMatch(/single year/);
    const flat = betaMixingMle({ obligors: [1000, 1000, 1000], defaults: [10, 10, 10] });
    expect(flat.status).toBe('ok');
    expect(flat.a).toBeNull();
    expect(flat.equivalentRho).toBe(0);
    expect(flat.reason).toMatch(/binomial law/);
    const edge = betaMixingMle({ obligors: [100, 100, 100, 100], defaults: [100, 0, 0, 100] });
    expect(['clipped', 'ok']).toContain(edge.status);
    expect(Number.isFinite(edge.logLik!)).toBe(true);
  });
});
