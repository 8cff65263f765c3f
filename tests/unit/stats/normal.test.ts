import { describe, expect, it } from 'vitest';
import {
  normalCdf,
  normalLogCdf,
  normalLogPdf,
  normalPdf,
  normalQuantile,
} from '@/lib/stats/normal';
import fx from '@/tests/fixtures/stats/normal.json';

/** |a - b| / |b|, or |a - b| when b = 0. */
function rel(a: number, b: number): number {
  if (a === b) return 0;
  return b === 0 ? Math.abs(a) : Math.abs(a - b) / Math.abs(b);
}

describe('fixture provenance', () => {
  it('was produced by SciPy 1.17', () => {
    expect(fx.versions.scipy).toMatch(/^1\.17\./);
  });
});

describe('normalCdf', () => {
  it('matches exact values (mpmath 1.3, 50 digits; tests/fixtures/stats/make_fixtures.py) to 1e-15 relative', () => {
    for (const r of fx.cdf) {
      // below x = -37.5 the result is subnormal: allow its absolute granularity
      const tol = 1.5e-15 * Math.abs(r.exact) + 1e-322;
      expect(Math.abs(normalCdf(r.x) - r.exact), `x = ${r.x}`).toBeLessThanOrEqual(tol);
    }
  });

  it('agrees with scipy.special.ndtr (computed with SciPy 1.17) to 2e-13 relative', () => {
    // SciPy's ndtr rounds -x/sqrt(2) before erfc, costing ~x^2 ulp in the far lower tail.
    for (const r of fx.cdf) {
      if (r.scipy < 1e-300) continue;
      expect(rel(normalCdf(r.x), r.scipy), `x = ${r.x}`).toBeLessThan(2e-13);
    }
  });

  it('reproduces Abramowitz & Stegun Table 26.1 (from memory)', () => {
    expect(normalCdf(1)).toBeCloseTo(0.841344746068543, 14);
    expect(normalCdf(2)).toBeCloseTo(0.977249868051821, 14);
    expect(normalCdf(3)).toBeCloseTo(0.99865010196837, 14);
  });

  it('handles infinities and refuses NaN', () => {
    expect(normalCdf(-Infinity)).toBe(0);
    expect(normalCdf(Infinity)).toBe(1);
    expect(normalCdf(0)).toBe(0.5); // exact by symmetry
    expect(() => normalCdf(Number.NaN)).toThrow(RangeError);
  });

  it('is symmetric: Phi(x) + Phi(-x) = 1 (property)', () => {
    for (let x = -8; x <= 8; x += 0.37) {
      expect(Math.abs(normalCdf(x) + normalCdf(-x) - 1)).toBeLessThan(3e-16);
    }
  });
});

describe('normalLogCdf', () => {
  it('matches exact values (mpmath) from -1e4 to 37 to 1e-15 relative', () => {
    for (const r of fx.logcdf) {
      expect(rel(normalLogCdf(r.x), r.exact), `x = ${r.x}`).toBeLessThan(1e-15);
    }
  });

  it('agrees with scipy.special.log_ndtr (computed with SciPy 1.17) to 2e-13 relative', () => {
    // as for ndtr, SciPy's upper tail (log Phi(12) = -Phi(-12)) carries ~x^2 ulp of argument rounding
    for (const r of fx.logcdf) {
      expect(rel(normalLogCdf(r.x), r.scipy), `x = ${r.x}`).toBeLessThan(2e-13);
    }
  });

  it('follows the asymptotic series far below -40 (Abramowitz & Stegun 26.2.12)', () => {
    for (const x of [-1e3, -1e5, -1e8]) {
      // log Phi(x) = -x^2/2 - log(-x) - log sqrt(2 pi) + log(1 - 1/x^2 + 3/x^4 - ...)
      const series = -(x * x) / 2 - Math.log(-x) - 0.5 * Math.log(2 * Math.PI) + Math.log1p(-1 / (x * x) + 3 / x ** 4);
      expect(rel(normalLogCdf(x), series)).toBeLessThan(1e-15);
    }
    expect(normalLogCdf(-1e200)).toBe(-Infinity); // -x^2/2 overflows: the honest value
  });

  it('keeps tiny negative values in the upper tail: log Phi(10) = -Phi(-10) (property)', () => {
    expect(rel(normalLogCdf(10), -normalCdf(-10))).toBeLessThan(1e-15);
  });

  it('handles infinities and refuses NaN', () => {
    expect(normalLogCdf(-Infinity)).toBe(-Infinity);
    expect(normalLogCdf(Infinity)).toBe(0);
    expect(() => normalLogCdf(Number.NaN)).toThrow(RangeError);
  });
});

describe('normalQuantile', () => {
  it('matches exact values (mpmath) from p = 5e-324 to 1 - 1e-15 to 1e-15 relative', () => {
    for (const r of fx.quantile) {
      expect(rel(normalQuantile(r.p), r.exact), `p = ${r.p}`).toBeLessThan(1e-15);
    }
  });

  it('agrees with scipy.special.ndtri (computed with SciPy 1.17) to 1e-15 relative', () => {
    for (const r of fx.quantile) {
      expect(rel(normalQuantile(r.p), r.scipy), `p = ${r.p}`).toBeLessThan(1e-15);
    }
  });

  it('gives the 5% normal deviate -1.645 (Abramowitz & Stegun Table 26.5 / common practice)', () => {
    expect(normalQuantile(0.05)).toBeCloseTo(-1.644854, 6);
    expect(normalQuantile(0.975)).toBeCloseTo(1.959964, 6);
    expect(normalQuantile(0.999)).toBeCloseTo(3.090232, 6);
  });

  it('inverts normalCdf over the whole range (property)', () => {
    for (let x = -37; x <= 0; x += 0.173) {
      expect(Math.abs(normalQuantile(normalCdf(x)) - x)).toBeLessThan(4e-15 * Math.max(1, Math.abs(x)));
    }
    for (let x = 0.05; x <= 8; x += 0.173) {
      // upper half through the symmetry Phi^-1(p) = -Phi^-1(1 - p)
      expect(Math.abs(-normalQuantile(normalCdf(-x)) - x)).toBeLessThan(4e-15 * Math.max(1, x));
    }
  });

  it('has the documented end points and refuses probabilities outside [0, 1]', () => {
    expect(normalQuantile(0)).toBe(-Infinity);
    expect(normalQuantile(1)).toBe(Infinity);
    expect(normalQuantile(0.5)).toBe(0);
    for (const bad of [-1e-300, 1.0000001, Number.NaN, -Infinity]) {
      expect(() => normalQuantile(bad)).toThrow(/normalQuantile: p must be a probability in \[0, 1\]/);
    }
  });
});

describe('normalPdf and normalLogPdf', () => {
  it('match exact values (mpmath) to 1e-15 relative', () => {
    for (const r of fx.pdf) {
      const tol = 1.5e-15 * r.exact + 1e-322;
      expect(Math.abs(normalPdf(r.x) - r.exact), `x = ${r.x}`).toBeLessThanOrEqual(tol);
      if (r.exact > 1e-300) expect(rel(Math.exp(normalLogPdf(r.x)), r.exact)).toBeLessThan(1e-13);
    }
  });

  it('agrees with scipy.stats.norm.pdf (computed with SciPy 1.17)', () => {
    for (const r of fx.pdf) {
      if (r.scipy < 1e-300) continue;
      expect(rel(normalPdf(r.x), r.scipy), `x = ${r.x}`).toBeLessThan(2e-13);
    }
  });

  it('is the derivative of normalCdf (property, central difference)', () => {
    for (const x of [-3, -1, 0, 0.7, 2.5]) {
      const h = 1e-5;
      expect(rel((normalCdf(x + h) - normalCdf(x - h)) / (2 * h), normalPdf(x))).toBeLessThan(1e-9);
    }
  });

  it('handles infinities and refuses NaN', () => {
    expect(normalPdf(Infinity)).toBe(0);
    expect(normalLogPdf(-Infinity)).toBe(-Infinity);
    expect(normalLogPdf(0)).toBeCloseTo(-0.9189385332046728, 15); // -log sqrt(2 pi), exact
    expect(() => normalPdf(Number.NaN)).toThrow(RangeError);
    expect(() => normalLogPdf(Number.NaN)).toThrow(RangeError);
  });
});
