import { describe, expect, it } from 'vitest';
import fx from '@/tests/fixtures/copula/law-pit-fixtures.json';
import pitFx from '@/tests/fixtures/engine/pit-fixtures.json';
import { betaRateLaw, gaussianRateLaw, logitNormalRateLaw, pointMassLaw, tRateLaw, type DefaultRateLaw } from '@/lib/stats/default-rate-law';
import { kolmogorovCdf, ksUniformityTest } from '@/lib/stats/kolmogorov-smirnov';
import { lawCountCdf, lawPanelPit, PIT_TAIL_LEVEL } from '@/lib/stats/law-count-pit';
import { binomialLogPmf } from '@/lib/stats/log-binomial';
import { logistic, logitNormalMoment } from '@/lib/stats/logit-normal-mixing';
import { createRng } from '@/lib/stats/random';

/** Absolute tolerance on a probability (the integrals are to 1e-8 relative; SciPy's betabinom loses ~1e-9 when a + b is near 10^5). */
const TOL = 1e-9;

describe('lawCountCdf against SciPy 1.17 (make_law_pit.py: the binomial cdf integrated over the factors)', () => {
  it('t copula: dblquad for cohorts up to 200, a fine product rule up to 10^7 obligors, quad over V at rho = 0', () => {
    // computed with SciPy 1.17: scipy.integrate.dblquad / composite Gauss-Legendre in (log v, x) / quad
    expect(fx.scipy.startsWith('1.17')).toBe(true);
    for (const c of fx.t) {
      const v = lawCountCdf(tRateLaw(c.p, c.rho, c.nu), c.n, c.j);
      expect(Math.abs(v - c.cdf), `${c.method} n=${c.n} j=${c.j}`).toBeLessThan(TOL);
    }
    // the product rule agrees with dblquad where both run (make_law_pit.py, productCheck)
    expect(Math.abs(fx.productCheck.product - fx.productCheck.dblquad)).toBeLessThan(1e-12);
  });

  it('Gaussian copula: quad over the factor', () => {
    // computed with SciPy 1.17 (quad of binom.cdf split at the cliff)
    for (const c of fx.gaussian) expect(Math.abs(lawCountCdf(gaussianRateLaw(c.p, c.rho), c.n, c.j) - c.cdf), `n=${c.n}`).toBeLessThan(TOL);
  });

  it('beta mixing: scipy.stats.betabinom.cdf', () => {
    // computed with SciPy 1.17: betabinom.cdf(j, n, p / theta, (1 - p) / theta)
    for (const c of fx.beta) {
      const v = lawCountCdf(betaRateLaw(c.p, c.theta), c.n, c.j);
      expect(Math.abs(v - c.cdf), `n=${c.n} j=${c.j}`).toBeLessThan(TOL);
      if (c.cdf < 1e-6) expect(Math.abs(v / c.cdf - 1)).toBeLessThan(1e-7); // a far-tail value keeps its digits
    }
  });

  it('logit-normal mixing: quad of binom.cdf over the factor, up to 10^6 obligors', () => {
    // computed with SciPy 1.17 (quad split at the cliff)
    for (const c of fx.logitNormal) expect(Math.abs(lawCountCdf(logitNormalRateLaw(c.mu, c.sigma), c.n, c.j) - c.cdf), `n=${c.n}`).toBeLessThan(TOL);
  });

  it('gives the Gaussian mid-PIT of the engine-defects fixture (make_pit.py), the convention of the diagnostics', () => {
    // computed with SciPy 1.17 by tests/fixtures/engine/make_pit.py
    for (const c of pitFx.periods) {
      const law = gaussianRateLaw(c.p, c.rho);
      const mid = 0.5 * (lawCountCdf(law, c.n, c.d - 1) + lawCountCdf(law, c.n, c.d));
      expect(Math.abs(mid - c.midPit), `n=${c.n} d=${c.d}`).toBeLessThan(TOL);
    }
  });
});

describe('properties of the count distribution', () => {
  const laws: [string, DefaultRateLaw, number][] = [
    ['gaussian', gaussianRateLaw(0.02, 0.12), 0.02],
    ['t', tRateLaw(0.02, 0.12, 5), 0.02],
    ['t at rho = 0', tRateLaw(0.02, 0, 5), 0.02],
    ['beta', betaRateLaw(0.02, 0.01), 0.02],
    ['logit-normal', logitNormalRateLaw(-4, 0.6), logitNormalMoment(-4, 0.6, 1)],
  ];

  it('has mean n E[pi]: sum over j < n of P(D > j) (common identity), each law', () => {
    // E[D] = sum_{j=0}^{n-1} P(D > j) for a count on 0..n; E[D] = n E[pi] (law of total expectation)
    const n = 40;
    for (const [name, law, mean] of laws) {
      let s = 0;
      let prev = 0;
      for (let j = 0; j < n; j++) {
        const F = lawCountCdf(law, n, j);
        expect(F, name).toBeGreaterThanOrEqual(prev - 1e-12);
        prev = F;
        s += 1 - F;
      }
      expect(Math.abs(s - n * mean), name).toBeLessThan(1e-7);
    }
  });

  it('approaches the Gaussian law as 1/nu -> 0', () => {
    // the t copula tends to the Gaussian one as nu -> infinity (McNeil, Frey & Embrechts 2015, section 6.2)
    const g = lawCountCdf(gaussianRateLaw(0.01, 0.1), 1000, 12);
    const gaps = [1e-2, 1e-4, 1e-6].map((w) => Math.abs(lawCountCdf(tRateLaw(0.01, 0.1, 1 / w), 1000, 12) - g));
    expect(gaps[1]).toBeLessThan(gaps[0]);
    expect(gaps[2]).toBeLessThan(gaps[1]);
    expect(gaps[2]).toBeLessThan(1e-5);
    const panel = { obligors: [800, 900, 1000, 1100, 1200], defaults: [0, 14, 6, 30, 9] };
    const pt = lawPanelPit(tRateLaw(0.01, 0.1, 1e6), panel, 7);
    const pg = lawPanelPit(gaussianRateLaw(0.01, 0.1), panel, 7);
    pt.values.forEach((u, t) => expect(Math.abs(u - pg.values[t])).toBeLessThan(1e-5));
    expect(Math.abs(pt.uniformity.statistic - pg.uniformity.statistic)).toBeLessThan(1e-5);
  });

  it('is the binomial cdf for a law without mixing (rho = 0, theta = 0, sigma = 0)', () => {
    // definition: no mixing leaves Binomial(n, p)
    let binom = 0;
    for (let j = 0; j <= 3; j++) binom += Math.exp(binomialLogPmf(j, 300, 0.01));
    for (const law of [gaussianRateLaw(0.01, 0), betaRateLaw(0.01, 0), pointMassLaw(0.01, 'logit')]) {
      expect(Math.abs(lawCountCdf(law, 300, 3) - binom)).toBeLessThan(1e-12);
    }
    expect(Math.abs(lawCountCdf(logitNormalRateLaw(Math.log(0.01 / 0.99), 0), 300, 3) - binom)).toBeLessThan(1e-12);
    expect(logistic(Math.log(0.01 / 0.99))).toBeCloseTo(0.01, 15);
  });
});

describe('lawPanelPit', () => {
  const allLaws: [string, DefaultRateLaw][] = [
    ['gaussian', gaussianRateLaw(0.004, 0.15)],
    ['gaussian rho = 0', gaussianRateLaw(0.004, 0)],
    ['t', tRateLaw(0.004, 0.15, 4)],
    ['t rho = 0', tRateLaw(0.004, 0, 4)],
    ['t p > 1/2 at rho = 0', tRateLaw(0.8, 0, 4)],
    ['beta', betaRateLaw(0.004, 0.003)],
    ['beta theta = 0', betaRateLaw(0.004, 0)],
    ['logit-normal', logitNormalRateLaw(-5.5, 0.7)],
    ['logit-normal sigma = 0', logitNormalRateLaw(-5.5, 0)],
  ];

  it('never gives NaN on years without defaults or where every obligor defaulted', () => {
    // d = 0: P(D < 0) = 0; d = n: P(D <= n) = 1 (definition)
    const panel = { obligors: [30, 500, 12, 2000, 7], defaults: [0, 0, 12, 0, 7] };
    for (const [name, law] of allLaws) {
      const r = lawPanelPit(law, panel, 1);
      for (const u of [...r.values, ...r.below, ...r.atOrBelow, r.uniformity.statistic, r.uniformity.pValue]) expect(Number.isFinite(u), name).toBe(true);
      expect(r.below[0], name).toBe(0);
      expect(r.atOrBelow[2], name).toBe(1);
      r.values.forEach((u, t) => {
        expect(u, name).toBeGreaterThanOrEqual(r.below[t]);
        expect(u, name).toBeLessThanOrEqual(r.atOrBelow[t]);
      });
    }
  });

  it('is reproducible from its seed, flags the years in the outer tails and reports the mid-PIT', () => {
    // the tails: P(D >= d) < level / 2 or P(D <= d) < level / 2 (the definition in law-count-pit.ts)
    const law = gaussianRateLaw(0.01, 0.05);
    const panel = { obligors: [5000, 5000, 5000, 5000, 5000, 5000], defaults: [50, 45, 0, 55, 400, 48] };
    const a = lawPanelPit(law, panel, 3);
    expect(lawPanelPit(law, panel, 3)).toEqual(a);
    expect(lawPanelPit(law, panel, 4).uniformity.statistic).not.toBe(a.uniformity.statistic);
    expect(a.method).toBe('mid');
    expect(a.tails).toEqual({ level: PIT_TAIL_LEVEL, upper: [4], lower: [2] });
    a.values.forEach((u, t) => expect(u).toBeCloseTo(0.5 * (a.below[t] + a.atOrBelow[t]), 15));
  });

  it('throws a RangeError naming the period of a bad count', () => {
    expect(() => lawPanelPit(gaussianRateLaw(0.01, 0.1), { obligors: [100, 50], defaults: [3, 60] }, 1)).toThrow(/period 2/);
  });
});

describe('Kolmogorov-Smirnov test of uniformity', () => {
  it('has the exact finite-sample law of scipy.stats.kstwo and the statistic and p-value of scipy.stats.kstest', () => {
    // computed with SciPy 1.17: kstwo.sf(d, n) (Simard & L'Ecuyer 2011), kstest(method='exact')
    for (const c of fx.kolmogorov) expect(Math.abs(1 - kolmogorovCdf(c.n, c.d) - c.sf), `n=${c.n} d=${c.d}`).toBeLessThan(1e-12);
    const r = ksUniformityTest(fx.ksSample.values);
    expect(r.statistic).toBeCloseTo(fx.ksSample.statistic, 14);
    expect(Math.abs(r.pValue - fx.ksSample.pValue)).toBeLessThan(1e-12);
  });

  it('holds its size on uniform samples (seeded Monte Carlo)', () => {
    // under uniformity P(p <= 0.05) = 0.05; 2000 samples of 20: sd 0.0049, tolerance 3.5 sd
    const rng = createRng(12345);
    const u = () => rng.uniform();
    let rejections = 0;
    for (let i = 0; i < 2000; i++) if (ksUniformityTest(Array.from({ length: 20 }, u)).pValue <= 0.05) rejections++;
    expect(Math.abs(rejections / 2000 - 0.05)).toBeLessThan(0.017);
  });

  it('refuses an empty sample or a value outside [0, 1]', () => {
    expect(() => ksUniformityTest([])).toThrow(RangeError);
    expect(() => ksUniformityTest([0.2, 1.2])).toThrow(/value 2/);
  });
});
