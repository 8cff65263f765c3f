import { describe, expect, it } from 'vitest';
import { simulatePanel } from '@/lib/stats/simulate';
import { createRng, deriveSeed } from '@/lib/stats/random';
import { vasicekVariance } from '@/lib/stats/vasicek';

describe('simulatePanel', () => {
  it('is reproducible from its seed and returns one factor and one count per period', () => {
    const opts = { pd: 0.01, rho: 0.12, obligors: [1000, 1050, 0, 200_000, 5] };
    const a = simulatePanel(opts, createRng(42));
    const b = simulatePanel(opts, createRng(42));
    expect(a).toEqual(b);
    expect(a.obligors).toEqual(opts.obligors);
    expect(a.obligors).not.toBe(opts.obligors);
    expect(a.factor).toHaveLength(5);
    a.defaults.forEach((d, t) => {
      expect(Number.isInteger(d) && d >= 0 && d <= opts.obligors[t]).toBe(true);
    });
    expect(a.defaults[2]).toBe(0);
    expect(simulatePanel({ pd: 0.01, rho: 0.12, obligors: [] }, createRng(1))).toEqual({ obligors: [], defaults: [], factor: [] });
  });

  it("default rates have the Vasicek mean and variance plus binomial noise: Var(d/n) = V + (p - p^2 - V)/n (law of total variance), within 5 SE", () => {
    // many periods of one panel, cohorts of 1000: the binomial term (p - p^2 - V)/n is ~8% of V here
    for (const [p, rho] of [[0.01, 0.12], [0.03, 0.05], [0.002, 0.24]]) {
      const n = 1000;
      const T = 40_000;
      const panel = simulatePanel({ pd: p, rho, obligors: new Array(T).fill(n) }, createRng(deriveSeed(3, Math.round(rho * 1000))));
      const dr = panel.defaults.map((d) => d / n);
      const mean = dr.reduce((s, x) => s + x, 0) / T;
      const m2 = dr.reduce((s, x) => s + (x - mean) ** 2, 0) / (T - 1);
      const m4 = dr.reduce((s, x) => s + (x - mean) ** 4, 0) / T;
      const V = vasicekVariance(p, rho);
      const expected = V + (p - p * p - V) / n;
      // standard errors from the sample itself: sd/sqrt(T) for the mean, sqrt((m4 - m2^2)/T) for the variance
      expect(Math.abs(mean - p), `p=${p} rho=${rho} mean`).toBeLessThan(5 * Math.sqrt(m2 / T));
      expect(Math.abs(m2 - expected), `p=${p} rho=${rho} variance`).toBeLessThan(5 * Math.sqrt((m4 - m2 * m2) / T));
    }
  });

  it('variance of simulated default rates across replications matches vasicekVariance for large cohorts (5 SE over replications)', () => {
    // R replications of a T = 20 panel with cohorts of 10 million; binomial noise ~1e-9 is negligible against V
    const p = 0.01;
    const rho = 0.12;
    const R = 1000;
    const vars: number[] = [];
    for (let r = 0; r < R; r++) {
      const panel = simulatePanel({ pd: p, rho, obligors: new Array(20).fill(10_000_000) }, createRng(deriveSeed(99, r)));
      const dr = panel.defaults.map((d) => d / 10_000_000);
      const m = dr.reduce((s, x) => s + x, 0) / 20;
      vars.push(dr.reduce((s, x) => s + (x - m) ** 2, 0) / 19);
    }
    const meanVar = vars.reduce((s, x) => s + x, 0) / R;
    const sdVar = Math.sqrt(vars.reduce((s, x) => s + (x - meanVar) ** 2, 0) / (R - 1));
    const expected = vasicekVariance(p, rho) + (p - p * p - vasicekVariance(p, rho)) / 10_000_000;
    expect(Math.abs(meanVar - expected)).toBeLessThan(5 * sdVar / Math.sqrt(R));
  });

  it('rho = 0 gives independent binomial counts; rho = 1 gives all-or-nothing periods', () => {
    const indep = simulatePanel({ pd: 0.2, rho: 0, obligors: new Array(2000).fill(50) }, createRng(4));
    const mean = indep.defaults.reduce((s, d) => s + d, 0) / 2000;
    expect(Math.abs(mean - 10)).toBeLessThan(5 * Math.sqrt(8 / 2000)); // Binomial(50, 0.2): mean 10, variance 8
    const full = simulatePanel({ pd: 0.3, rho: 1, obligors: new Array(500).fill(20) }, createRng(4));
    expect(full.defaults.every((d) => d === 0 || d === 20)).toBe(true);
  });

  it('refuses bad parameters and names the bad cohort', () => {
    const rng = createRng(1);
    expect(() => simulatePanel({ pd: 1.5, rho: 0.1, obligors: [10] }, rng)).toThrow(/pd must be in \[0, 1\]/);
    expect(() => simulatePanel({ pd: 0.1, rho: -0.1, obligors: [10] }, rng)).toThrow(/rho must be in \[0, 1\]/);
    expect(() => simulatePanel({ pd: 0.1, rho: 0.1, obligors: [10, -3] }, rng)).toThrow(/obligors\[1\] must be a non-negative integer/);
    expect(() => simulatePanel({ pd: 0.1, rho: 0.1, obligors: [10, 2.5] }, rng)).toThrow(RangeError);
  });
});

describe('simulatePanel with an AR(1) factor', () => {
  it('with phi = 0 draws exactly the independent model (same stream, same panel)', () => {
    const opts = { pd: 0.01, rho: 0.12, obligors: [1000, 2000, 500, 100_000] };
    expect(simulatePanel({ ...opts, phi: 0 }, createRng(5))).toEqual(simulatePanel(opts, createRng(5)));
  });

  it('has standard normal margins and lag-h autocorrelation phi^h (within 5 SE)', () => {
    // AR(1) x_t = phi x_(t-1) + sqrt(1 - phi^2) e_t from the stationary law (Box & Jenkins 1976, 3.2.4):
    // Var x_t = 1 and Corr(x_t, x_(t+h)) = phi^h. 4000 replications of T = 6.
    for (const phi of [0.6, -0.5, 0.95]) {
      const R = 4000;
      const sums = { x1: 0, x6: 0, x1x1: 0, x6x6: 0, x1x2: 0, x1x3: 0 };
      for (let r = 0; r < R; r++) {
        const f = simulatePanel({ pd: 0.01, rho: 0.1, obligors: new Array(6).fill(10), phi }, createRng(deriveSeed(17, r))).factor;
        sums.x1 += f[0];
        sums.x6 += f[5];
        sums.x1x1 += f[0] * f[0];
        sums.x6x6 += f[5] * f[5];
        sums.x1x2 += f[0] * f[1];
        sums.x1x3 += f[0] * f[2];
      }
      const se = 1 / Math.sqrt(R);
      expect(Math.abs(sums.x1 / R)).toBeLessThan(5 * se);
      expect(Math.abs(sums.x6 / R)).toBeLessThan(5 * se);
      expect(Math.abs(sums.x1x1 / R - 1)).toBeLessThan(5 * Math.SQRT2 * se); // Var(x^2) = 2
      expect(Math.abs(sums.x6x6 / R - 1)).toBeLessThan(5 * Math.SQRT2 * se);
      // Var(x1 x2) = 1 + phi^2 for a standard bivariate normal pair
      expect(Math.abs(sums.x1x2 / R - phi), `phi=${phi}`).toBeLessThan(5 * Math.sqrt(1 + phi ** 2) * se);
      expect(Math.abs(sums.x1x3 / R - phi ** 2), `phi=${phi}`).toBeLessThan(5 * Math.sqrt(1 + phi ** 4) * se);
    }
  });

  it('refuses phi at or beyond +-1', () => {
    expect(() => simulatePanel({ pd: 0.01, rho: 0.1, obligors: [10], phi: 1 }, createRng(1))).toThrow(/phi/);
    expect(() => simulatePanel({ pd: 0.01, rho: 0.1, obligors: [10], phi: Number.NaN }, createRng(1))).toThrow(/phi/);
  });
});
