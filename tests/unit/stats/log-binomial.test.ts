import { describe, expect, it } from 'vitest';
import {
  binomialDeviance,
  binomialLogPmf,
  binomialLogPmfFromLogs,
  logBinomialCoefficient,
  stirlingError,
} from '@/lib/stats/log-binomial';
import fx from '@/tests/fixtures/stats/binomial.json';

describe('logBinomialCoefficient', () => {
  it('matches exact log C(n, k) (mpmath 1.3, tests/fixtures/stats/make_fixtures.py) to 4e-16 relative, n up to 2^40', () => {
    for (const r of fx.logCoefficient) {
      const tol = 4e-16 * Math.abs(r.exact) + 1e-15;
      expect(Math.abs(logBinomialCoefficient(r.n, r.k) - r.exact), `n = ${r.n}, k = ${r.k}`).toBeLessThanOrEqual(tol);
    }
  });

  it('agrees with gammaln differences (computed with SciPy 1.17 scipy.special.gammaln) within their rounding', () => {
    for (const r of fx.logCoefficient) {
      // lgamma(n+1) - lgamma(k+1) - lgamma(n-k+1) carries ~n log n ulp of cancellation error
      const tol = 4e-16 * (r.n + 1) * Math.log(r.n + 2) + 1e-14;
      expect(Math.abs(logBinomialCoefficient(r.n, r.k) - r.scipyGammaln)).toBeLessThanOrEqual(tol);
    }
  });

  it('gives exact small values (exact arithmetic)', () => {
    expect(logBinomialCoefficient(10, 3)).toBeCloseTo(Math.log(120), 14);
    expect(logBinomialCoefficient(52, 5)).toBeCloseTo(Math.log(2598960), 13);
    expect(logBinomialCoefficient(7, 0)).toBe(0);
    expect(logBinomialCoefficient(7, 7)).toBe(0);
    expect(logBinomialCoefficient(0, 0)).toBe(0);
  });

  it('is symmetric, C(n, k) = C(n, n - k), and satisfies Pascal\'s rule (property)', () => {
    for (const [n, k] of [[30, 7], [1000, 13], [123456, 4567]]) {
      expect(logBinomialCoefficient(n, k)).toBeCloseTo(logBinomialCoefficient(n, n - k), 10);
      // C(n, k) = C(n-1, k-1) + C(n-1, k)
      const a = logBinomialCoefficient(n - 1, k - 1);
      const b = logBinomialCoefficient(n - 1, k);
      const lse = Math.max(a, b) + Math.log1p(Math.exp(-Math.abs(a - b)));
      expect(Math.abs(logBinomialCoefficient(n, k) - lse)).toBeLessThan(1e-12 * Math.abs(lse));
    }
  });

  it('refuses non-integer or out-of-range counts with a clear message', () => {
    expect(() => logBinomialCoefficient(10, 11)).toThrow(/k must be an integer between 0 and n = 10/);
    expect(() => logBinomialCoefficient(10.5, 1)).toThrow(/n must be a non-negative integer/);
    expect(() => logBinomialCoefficient(10, -1)).toThrow(RangeError);
    expect(() => logBinomialCoefficient(Number.NaN, 1)).toThrow(RangeError);
  });
});

describe('binomialLogPmf', () => {
  it('matches the exact log-pmf (mpmath 1.3) to 2e-15 absolute plus 4e-16 relative, n up to 1e8 and p down to 1e-12', () => {
    for (const r of fx.logpmf) {
      const tol = 2e-15 + 4e-16 * Math.abs(r.exact);
      expect(Math.abs(binomialLogPmf(r.k, r.n, r.p) - r.exact), `k=${r.k} n=${r.n} p=${r.p}`).toBeLessThanOrEqual(tol);
    }
  });

  it('agrees with scipy.stats.binom.logpmf (computed with SciPy 1.17) to its own accuracy', () => {
    // SciPy's logpmf is off by up to ~3.5e-15 n (2e-8 at n = 1e7, 3.5e-7 at n = 1e8; checked
    // against mpmath in the fixture script); the tolerance is 5e-15 n, so this check still
    // catches any error of substance.
    for (const r of fx.logpmf) {
      const tol = 5e-15 * r.n + 1e-13 + 1e-15 * Math.abs(r.scipy);
      expect(Math.abs(binomialLogPmf(r.k, r.n, r.p) - r.scipy), `k=${r.k} n=${r.n} p=${r.p}`).toBeLessThanOrEqual(tol);
    }
  });

  it('is exact at the edges p = 0, p = 1, k = 0, k = n (exact arithmetic)', () => {
    expect(binomialLogPmf(0, 10, 0)).toBe(0);
    expect(binomialLogPmf(1, 10, 0)).toBe(-Infinity);
    expect(binomialLogPmf(10, 10, 1)).toBe(0);
    expect(binomialLogPmf(9, 10, 1)).toBe(-Infinity);
    expect(binomialLogPmf(0, 0, 0.3)).toBe(0);
    expect(binomialLogPmf(0, 1e7, 1e-12)).toBe(1e7 * Math.log1p(-1e-12));
    expect(binomialLogPmf(5, 5, 0.5)).toBe(5 * Math.log(0.5));
  });

  it('sums to one over k (property)', () => {
    for (const [n, p] of [[20, 0.3], [500, 0.002561], [3000, 0.5]]) {
      let s = 0;
      for (let k = 0; k <= n; k++) s += Math.exp(binomialLogPmf(k, n, p));
      expect(Math.abs(s - 1)).toBeLessThan(1e-13);
    }
  });

  it('refuses bad counts and probabilities', () => {
    expect(() => binomialLogPmf(3, 2, 0.5)).toThrow(/k must be an integer between 0 and n = 2/);
    expect(() => binomialLogPmf(1, 2, 1.5)).toThrow(/p must be a probability/);
    expect(() => binomialLogPmf(1, 2, Number.NaN)).toThrow(RangeError);
  });
});

describe('binomialLogPmfFromLogs', () => {
  it('matches the exact log-pmf (mpmath 1.3) given log p and log1p(-p)', () => {
    for (const r of fx.logpmf) {
      // exp(log p) reintroduces (|log p| + 1) ulp of relative error in np, which moves the
      // deviance term by |np - k| times that (its derivative in np is 1 - k/np): allow it
      const tol =
        2e-15 + 4e-16 * Math.abs(r.exact) + 2.2e-16 * (Math.abs(Math.log(r.p)) + 1) * Math.abs(r.n * r.p - r.k);
      const v = binomialLogPmfFromLogs(r.k, r.n, Math.log(r.p), Math.log1p(-r.p));
      expect(Math.abs(v - r.exact), `k=${r.k} n=${r.n} p=${r.p}`).toBeLessThanOrEqual(tol);
    }
  });

  it('works where p underflows: equals log C(n, k) + k log p + (n - k) log(1 - p) (definition)', () => {
    const logP = -800; // p = e^-800 is not a double
    const v = binomialLogPmfFromLogs(2, 1000, logP, -Math.exp(logP));
    expect(v).toBeCloseTo(logBinomialCoefficient(1000, 2) + 2 * logP, 10);
    expect(binomialLogPmfFromLogs(0, 1000, logP, 0)).toBe(0);
  });

  it('handles p = 0 and p = 1 given as infinite logs, and refuses positive logs', () => {
    expect(binomialLogPmfFromLogs(0, 10, -Infinity, 0)).toBe(0);
    expect(binomialLogPmfFromLogs(3, 10, -Infinity, 0)).toBe(-Infinity);
    expect(binomialLogPmfFromLogs(10, 10, 0, -Infinity)).toBe(0);
    expect(() => binomialLogPmfFromLogs(1, 10, 0.1, -1)).toThrow(/must be logarithms of probabilities/);
    expect(() => binomialLogPmfFromLogs(1, 10, Number.NaN, -1)).toThrow(RangeError);
  });
});

describe('helpers', () => {
  it('stirlingError follows its definition (Loader 2000; Abramowitz & Stegun 6.1.41)', () => {
    // log(n!) = (n + 1/2) log n - n + log sqrt(2 pi) + stirlerr(n); n! exact for n <= 20
    let fact = 1;
    for (let n = 1; n <= 20; n++) {
      fact *= n;
      const direct = Math.log(fact) - (n + 0.5) * Math.log(n) + n - 0.5 * Math.log(2 * Math.PI);
      expect(Math.abs(stirlingError(n) - direct)).toBeLessThan(2e-14);
    }
    expect(() => stirlingError(0)).toThrow(RangeError);
  });

  it('binomialDeviance equals x log(x/m) + m - x (definition) and is never negative', () => {
    for (const [x, m] of [[5, 7], [1000, 1001], [3, 0.5], [0, 2]]) {
      const direct = x === 0 ? m : x * Math.log(x / m) + m - x;
      expect(Math.abs(binomialDeviance(x, m) - direct)).toBeLessThan(1e-12 * Math.max(1, direct));
      expect(binomialDeviance(x, m)).toBeGreaterThanOrEqual(0);
    }
    // near x = m the series keeps relative accuracy: bd0 ~ (x - m)^2 / (2m)
    expect(binomialDeviance(1e6 + 1, 1e6) / (1 / 2e6)).toBeCloseTo(1, 5);
  });
});
