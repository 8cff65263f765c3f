import { describe, expect, it } from 'vitest';
import fixtures from '@/tests/fixtures/time/variance-bias-fixtures.json';
import { sampleVarianceBiasFactor } from '@/lib/stats/variance-bias';

describe('sampleVarianceBiasFactor: E[s^2] / sigma^2 of a stationary AR(1) series', () => {
  it('matches the trace of the centring matrix times the AR(1) correlation matrix (NumPy, make_variance_bias.py)', () => {
    expect(fixtures.cases.length).toBeGreaterThanOrEqual(30);
    for (const c of fixtures.cases) {
      // computed with NumPy 2.4 as tr(M Sigma) / (T - 1) by tests/fixtures/time/make_variance_bias.py
      expect(Math.abs(sampleVarianceBiasFactor(c.T, c.phi) - c.exact), `T = ${c.T}, phi = ${c.phi}`).toBeLessThan(1e-12);
    }
  });

  it('agrees with a NumPy Monte Carlo of the mean sample variance within 4 Monte Carlo standard errors', () => {
    for (const c of fixtures.cases) {
      // Monte Carlo of 400,000 series per case by tests/fixtures/time/make_variance_bias.py (NumPy 2.4, seeded)
      const z = Math.abs(sampleVarianceBiasFactor(c.T, c.phi) - c.monteCarlo) / c.mcse;
      expect(z, `T = ${c.T}, phi = ${c.phi}: ${z.toFixed(2)} standard errors`).toBeLessThan(4);
    }
  });

  it('is 1 without autocorrelation, below 1 for a persistent series, above 1 for an alternating one, and tends to 1 as T grows', () => {
    // the sample variance is unbiased for independent draws (common practice)
    expect(sampleVarianceBiasFactor(20, 0)).toBe(1);
    for (const T of [3, 10, 25]) {
      expect(sampleVarianceBiasFactor(T, 0.5)).toBeLessThan(1);
      expect(sampleVarianceBiasFactor(T, -0.5)).toBeGreaterThan(1);
      expect(sampleVarianceBiasFactor(T, 0.99)).toBeGreaterThan(0);
    }
    // Anderson (1971) 8.2: the bias is of order 1/T, so long series lose it
    expect(Math.abs(sampleVarianceBiasFactor(5000, 0.6) - 1)).toBeLessThan(1e-3);
    // T = 2: E[s^2] = sigma^2 (1 - r), the mean of (x1 - x2)^2 / 2 (from memory)
    expect(sampleVarianceBiasFactor(2, 0.3)).toBeCloseTo(0.7, 15);
  });

  it('refuses a length or an autocorrelation outside its domain with a sentence', () => {
    expect(() => sampleVarianceBiasFactor(1, 0.5)).toThrow(/T must be a whole number/);
    expect(() => sampleVarianceBiasFactor(2.5, 0.5)).toThrow(/T must be a whole number/);
    expect(() => sampleVarianceBiasFactor(10, 1)).toThrow(/strictly between -1 and 1/);
    expect(() => sampleVarianceBiasFactor(10, Number.NaN)).toThrow(/strictly between -1 and 1/);
  });
});
