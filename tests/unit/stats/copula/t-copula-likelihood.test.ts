import { describe, expect, it } from 'vitest';
import fx from '@/tests/fixtures/copula/copula-fixtures.json';
import { mixtureLogLikelihood, MixtureLikelihood } from '@/lib/stats/mixture-likelihood';
import { normalQuantile } from '@/lib/stats/normal';
import { TCopulaLikelihood, tCopulaLogLikelihood, tQuantile } from '@/lib/stats/t-copula-likelihood';
import { ThresholdLikelihood } from '@/lib/stats/threshold-likelihood';
import { logBinomialCoefficient } from '@/lib/stats/log-binomial';

const one = (n: number, d: number) => ({ obligors: [n], defaults: [d] });

describe('t-copula likelihood (nested log-concave integral)', () => {
  it('matches dblquad for small cohorts and nested QUADPACK for cohorts up to 10^6', () => {
    // computed with SciPy 1.17 by tests/fixtures/copula/make_copula.py (dblquad; nested quad split at the modes; quad at rho = 0)
    expect(fx.tPeriods.length).toBeGreaterThanOrEqual(15);
    for (const c of fx.tPeriods) {
      for (const tabulate of [false, true]) {
        const L = new TCopulaLikelihood(one(c.n, c.d), { tabulate });
        const v = L.logLik(tQuantile(c.p, c.nu), c.rho, c.nu);
        expect(Math.abs(v - c.logLik), `${c.method} n=${c.n} d=${c.d} rho=${c.rho} nu=${c.nu} tabulate=${tabulate}`).toBeLessThan(1e-7 * Math.max(1, Math.abs(c.logLik)));
      }
    }
    // the nested rule itself agrees with dblquad on the case both computed (the fixture's own check)
    expect(Math.abs(fx.nestedCheck.nested - fx.nestedCheck.dblquad)).toBeLessThan(1e-8);
  });

  it('equals the Gaussian binomial-mixture likelihood as 1/nu -> 0, the gap shrinking in proportion to 1/nu', () => {
    // reduction: V / nu -> 1 as nu -> infinity (law of large numbers); the Gaussian value by MixtureLikelihood at the same threshold k.
    // The gap is a true O(1/nu) effect (Var sqrt(V / nu) ~ 1 / (2 nu)): about 1.4e-6 at 1/nu = 1e-6 on this panel, and 10 times smaller at 1e-7.
    const small = { obligors: [100, 120, 90], defaults: [1, 4, 0] };
    const k = normalQuantile(0.012);
    const g = new MixtureLikelihood(small).logLik(k, 0.1);
    const L = new TCopulaLikelihood(small);
    const gap6 = L.logLik(k, 0.1, 1e6) - g;
    const gap7 = L.logLik(k, 0.1, 1e7) - g;
    expect(Math.abs(gap6)).toBeLessThan(2e-6);
    expect(Math.abs(gap7)).toBeLessThan(2e-7);
    expect(Math.abs(gap7 / gap6 - 0.1)).toBeLessThan(0.03);
    // with p fixed instead (k_nu = t_nu^-1(p) moves too), the same order
    expect(Math.abs(tCopulaLogLikelihood(small, 0.012, 0.1, 1e6) - mixtureLogLikelihood(small, 0.012, 0.1))).toBeLessThan(1e-5);
    // nu = Infinity is the Gaussian evaluator exactly
    expect(L.logLik(k, 0.1, Number.POSITIVE_INFINITY)).toBe(g);
  });

  it('gives k_nu-derivatives that agree with central differences', () => {
    // calculus
    const panel = { obligors: [50000, 48000, 52000, 51000], defaults: [400, 900, 0, 610] };
    const L = new TCopulaLikelihood(panel, { tabulate: false });
    for (const [rho, nu] of [[0.1, 5], [0.3, 3], [0, 8]]) {
      const k = tQuantile(0.01, nu);
      const h = 1e-4;
      const r = L.logLikWithDerivatives(k, rho, nu);
      const up = L.logLik(k + h, rho, nu);
      const down = L.logLik(k - h, rho, nu);
      expect(Math.abs(r.dk - (up - down) / (2 * h)), `rho=${rho}`).toBeLessThan(1e-5 * Math.max(1, Math.abs(r.dk)));
      expect(Math.abs(r.dkk - (up - 2 * r.value + down) / (h * h)), `rho=${rho}`).toBeLessThan(1e-3 * Math.max(1, Math.abs(r.dkk)));
    }
  });

  it('reads the inner likelihood from its table within 1e-9 of integrating it each time', () => {
    // the table against the exact integral (the module's own two paths, each checked against SciPy above)
    const panel = { obligors: Array.from({ length: 8 }, () => 50000), defaults: [400, 520, 610, 0, 900, 450, 30, 1200] };
    const exact = new TCopulaLikelihood(panel, { tabulate: false });
    const table = new TCopulaLikelihood(panel);
    for (const [rho, nu] of [[0.1, 5], [0.3, 3], [0.02, 20], [0.6, 2.5], [0.001, 4]]) {
      for (const p of [0.003, 0.01, 0.03]) {
        const k = tQuantile(p, nu);
        expect(Math.abs(table.logLik(k, rho, nu) - exact.logLik(k, rho, nu)), `rho=${rho} nu=${nu} p=${p}`).toBeLessThan(1e-9);
      }
    }
    const inner = new ThresholdLikelihood();
    inner.set(1000, 0, logBinomialCoefficient(1000, 0), 0.5);
    for (const c of [-4, -2.5, -1.3, -0.2]) {
      inner.exact(c);
      const v = inner.value;
      inner.tabulated(c);
      expect(Math.abs(inner.value - v)).toBeLessThan(1e-9);
    }
  });

  it('refuses parameters outside their range with a sentence', () => {
    const L = new TCopulaLikelihood(one(100, 2));
    expect(() => L.logLik(-2, 1, 5)).toThrow(/rho must be in \[0, 1\)/);
    expect(() => L.logLik(-2, 0.1, 1)).toThrow(/nu must be above 1/);
    expect(() => L.logLik(Number.NaN, 0.1, 5)).toThrow(/must be finite/);
    expect(() => tCopulaLogLikelihood(one(100, 2), 0, 0.1, 5)).toThrow(/strictly between 0 and 1/);
  });
});
