import { describe, expect, it } from 'vitest';
import {
  conditionalLogPd,
  conditionalPd,
  defaultCorrelation,
  impliedFactor,
  jointDefaultProbability,
  vasicekCdf,
  vasicekLogPdf,
  vasicekMean,
  vasicekPdf,
  vasicekQuantile,
  vasicekVariance,
} from '@/lib/stats/vasicek';
import { normalCdf, normalQuantile } from '@/lib/stats/normal';
import fx from '@/tests/fixtures/stats/vasicek.json';

function rel(a: number, b: number): number {
  if (a === b) return 0;
  return b === 0 ? Math.abs(a) : Math.abs(a - b) / Math.abs(b);
}

describe('named values of the engine specification (computed with SciPy 1.17)', () => {
  it('p = 1%, rho = 0.12: variance 1.1709607969e-4, default correlation 0.01182789, 99.9% quantile 0.0903258313', () => {
    expect(Math.abs(vasicekVariance(0.01, 0.12) - 1.1709607969e-4)).toBeLessThan(1e-14);
    expect(Math.abs(defaultCorrelation(0.01, 0.01, 0.12) - 0.01182789)).toBeLessThan(1e-8);
    expect(Math.abs(vasicekQuantile(0.999, 0.01, 0.12) - 0.0903258313)).toBeLessThan(1e-10);
  });

  it('joint PD of two 5% obligors: 0.0025 independent, 0.0071346 at 0.3, ~0.0319 at 0.9, ~0.0418 at 0.98 (common practice)', () => {
    expect(jointDefaultProbability(0.05, 0.05, 0)).toBeCloseTo(0.0025, 16);
    expect(jointDefaultProbability(0.05, 0.05, 0.3)).toBeCloseTo(0.0071346, 7);
    expect(jointDefaultProbability(0.05, 0.05, 0.9)).toBeCloseTo(0.0319, 4);
    expect(jointDefaultProbability(0.05, 0.05, 0.98)).toBeCloseTo(0.0418, 4);
  });
});

describe('against the fixture grid (tests/fixtures/stats/make_fixtures.py)', () => {
  it('variance and default correlation match exact values (mpmath 1.3) to 1e-14 relative, p from 1e-5, rho from 1e-4', () => {
    for (const r of fx.grid) {
      expect(rel(vasicekVariance(r.p, r.rho), r.variance), `p=${r.p} rho=${r.rho}`).toBeLessThan(1e-14);
      expect(rel(defaultCorrelation(r.p, r.p, r.rho), r.defaultCorrelation)).toBeLessThan(1e-14);
    }
  });

  it('quantile, CDF, density and implied factor match SciPy 1.17 primitives (ndtr, ndtri)', () => {
    for (const r of fx.grid) {
      for (const [q, v] of Object.entries(r.quantile)) {
        // 1e-12: a quantile of 1e-16 at rho = 0.9 carries ~z^2 ulp of argument rounding in either code
        expect(rel(vasicekQuantile(Number(q), r.p, r.rho), v), `q=${q} p=${r.p} rho=${r.rho}`).toBeLessThan(1e-12);
      }
      for (const [x, v] of r.cdf) {
        if (v < 1e-300) {
          expect(vasicekCdf(x, r.p, r.rho)).toBeLessThan(1e-290);
        } else {
          // conditioning: the CDF's argument is of size (y/sqrt(rho)), amplifying input rounding
          expect(rel(vasicekCdf(x, r.p, r.rho), v), `x=${x} p=${r.p} rho=${r.rho}`).toBeLessThan(2e-11);
        }
      }
      for (const [x, v] of r.pdf) {
        if (v < 1e-300) continue;
        expect(rel(vasicekPdf(x, r.p, r.rho), v), `x=${x} p=${r.p} rho=${r.rho}`).toBeLessThan(2e-10);
      }
      for (const [x, v] of r.impliedFactor) {
        expect(Math.abs(impliedFactor(x, r.p, r.rho) - v)).toBeLessThan(1e-12 * Math.max(1, Math.abs(v)));
      }
    }
  });

  it('joint default probability and default correlation for different PDs match mpmath and SciPy 1.17', () => {
    for (const r of fx.joint) {
      expect(rel(jointDefaultProbability(r.p1, r.p2, r.rho), r.exact), `${r.p1} ${r.p2} ${r.rho}`).toBeLessThan(1e-14);
      expect(Math.abs(jointDefaultProbability(r.p1, r.p2, r.rho) - r.scipy)).toBeLessThan(1e-15);
      expect(Math.abs(defaultCorrelation(r.p1, r.p2, r.rho) - r.defaultCorrelation)).toBeLessThan(1e-14 * Math.max(r.defaultCorrelation, 1e-3));
    }
  });

  it('conditional PD and its logs match SciPy 1.17 ndtr / log_ndtr', () => {
    for (const r of fx.conditional) {
      if (r.pd > 1e-300) expect(rel(conditionalPd(r.p, r.rho, r.x), r.pd)).toBeLessThan(1e-13);
      const l = conditionalLogPd(r.p, r.rho, r.x);
      expect(rel(l.logPd, r.logPd)).toBeLessThan(1e-13);
      expect(rel(l.log1mPd, r.log1mPd)).toBeLessThan(1e-12);
    }
  });
});

describe('properties', () => {
  it('quantile(cdf(x)) = x and cdf(quantile(q)) = q', () => {
    for (const [p, rho] of [[0.001, 0.05], [0.01, 0.12], [0.05, 0.3], [0.2, 0.7]]) {
      for (const q of [1e-4, 0.01, 0.3, 0.5, 0.9, 0.999]) {
        expect(rel(vasicekCdf(vasicekQuantile(q, p, rho), p, rho), q)).toBeLessThan(1e-12);
      }
      for (const x of [p / 20, p / 3, p, 2 * p, Math.min(0.9, 6 * p)]) {
        expect(rel(vasicekQuantile(vasicekCdf(x, p, rho), p, rho), x)).toBeLessThan(1e-9);
      }
    }
  });

  it('the density integrates to 1 and has mean p and the stated variance (numerical integration in y = Phi^-1(x))', () => {
    for (const [p, rho] of [[0.01, 0.12], [0.05, 0.3], [0.003, 0.04]]) {
      // substitute x = Phi(y): dx = phi(y) dy; trapezoid on a fine grid over y in [-12, 6]
      let m0 = 0;
      let m1 = 0;
      let m2 = 0;
      const h = 1e-3;
      for (let y = -12; y <= 6; y += h) {
        const x = normalCdf(y); // tested against mpmath in normal.test.ts
        if (x <= 0 || x >= 1) continue;
        const w = Math.exp(vasicekLogPdf(x, p, rho) - (y * y) / 2) / Math.sqrt(2 * Math.PI) * h;
        m0 += w;
        m1 += w * x;
        m2 += w * x * x;
      }
      expect(Math.abs(m0 - 1)).toBeLessThan(1e-6);
      expect(rel(m1, vasicekMean(p, rho))).toBeLessThan(1e-5);
      expect(rel(m2 - m1 * m1, vasicekVariance(p, rho))).toBeLessThan(1e-4);
    }
  });

  it('variance grows from 0 at rho = 0 to p(1 - p) at rho = 1', () => {
    const p = 0.02;
    let prev = -1;
    for (const rho of [0, 0.01, 0.1, 0.3, 0.6, 0.9, 0.99, 1]) {
      const v = vasicekVariance(p, rho);
      expect(v).toBeGreaterThan(prev);
      prev = v;
    }
    expect(vasicekVariance(p, 0)).toBe(0);
    expect(rel(vasicekVariance(p, 1), p * (1 - p))).toBeLessThan(1e-14);
  });

  it('conditionalPd averages to p over the factor (E[P(X)] = p, Gauss-Hermite-free check on a grid)', () => {
    const p = 0.01;
    const rho = 0.2;
    let s = 0;
    const h = 1e-3;
    for (let x = -10; x <= 10; x += h) s += conditionalPd(p, rho, x) * Math.exp(-(x * x) / 2) / Math.sqrt(2 * Math.PI) * h;
    expect(rel(s, p)).toBeLessThan(1e-8);
  });

  it('impliedFactor inverts conditionalPd', () => {
    for (const x of [-3, -1, 0, 0.5, 2.5]) {
      const dr = conditionalPd(0.02, 0.15, x);
      expect(Math.abs(impliedFactor(dr, 0.02, 0.15) - x)).toBeLessThan(1e-12);
    }
  });
});

describe('edges and errors (conventions documented in lib/stats/vasicek.ts)', () => {
  it('rho = 0: conditional PD is p, distribution degenerate at p', () => {
    expect(conditionalPd(0.03, 0, 2.7)).toBe(0.03);
    expect(vasicekCdf(0.029, 0.03, 0)).toBe(0);
    expect(vasicekCdf(0.03, 0.03, 0)).toBe(1);
    expect(vasicekQuantile(0.999, 0.03, 0)).toBe(0.03);
    expect(vasicekVariance(0.03, 0)).toBe(0);
    expect(defaultCorrelation(0.03, 0.1, 0)).toBe(0);
  });

  it('rho = 1: indicator conditional PD, two-point distribution', () => {
    const k = normalQuantile(0.03);
    expect(conditionalPd(0.03, 1, k - 0.1)).toBe(1);
    expect(conditionalPd(0.03, 1, k + 0.1)).toBe(0);
    expect(conditionalPd(0.03, 1, k)).toBe(0.5);
    expect(vasicekCdf(0.5, 0.03, 1)).toBeCloseTo(0.97, 15);
    expect(vasicekQuantile(0.96, 0.03, 1)).toBe(0);
    expect(vasicekQuantile(0.98, 0.03, 1)).toBe(1);
    expect(jointDefaultProbability(0.03, 0.05, 1)).toBe(0.03);
    expect(defaultCorrelation(0.03, 0.03, 1)).toBeCloseTo(1, 14);
  });

  it('p = 0 and p = 1 are degenerate', () => {
    expect(conditionalPd(0, 0.3, -5)).toBe(0);
    expect(conditionalPd(1, 0.3, 5)).toBe(1);
    expect(vasicekCdf(0, 0, 0.2)).toBe(1);
    expect(vasicekCdf(0.5, 1, 0.2)).toBe(0);
    expect(vasicekVariance(0, 0.2)).toBe(0);
    expect(jointDefaultProbability(0, 0.2, 0.5)).toBe(0);
    expect(conditionalLogPd(0, 0.2, 1).logPd).toBe(-Infinity);
  });

  it('refuses what has no value, naming the problem', () => {
    expect(() => vasicekPdf(0.01, 0.01, 0)).toThrow(/no density/);
    expect(() => defaultCorrelation(0, 0.01, 0.2)).toThrow(/correlation is undefined/);
    expect(() => impliedFactor(0, 0.01, 0.2)).toThrow(/default rate of 0/);
    expect(() => impliedFactor(0.01, 0.01, 0)).toThrow(/rho = 0/);
    expect(() => conditionalPd(1.2, 0.2, 0)).toThrow(/p \(a probability of default\) must be in \[0, 1\]/);
    expect(() => vasicekQuantile(0.5, 0.01, -0.1)).toThrow(/rho \(the asset correlation\) must be in \[0, 1\]/);
    expect(() => vasicekCdf(1.5, 0.01, 0.1)).toThrow(/default rate x must be in \[0, 1\]/);
    expect(() => conditionalPd(0.01, 0.2, Number.NaN)).toThrow(RangeError);
  });
});
