import { describe, expect, it } from 'vitest';
import { bivariateNormalCdf, bivariateNormalExcess } from '@/lib/stats/bivariate-normal';
import { normalCdf, normalQuantile } from '@/lib/stats/normal';
import fx from '@/tests/fixtures/stats/bivariate-normal.json';

function rel(a: number, b: number): number {
  if (a === b) return 0;
  return b === 0 ? Math.abs(a) : Math.abs(a - b) / Math.abs(b);
}

describe('bivariateNormalCdf', () => {
  it('matches scipy.stats.multivariate_normal.cdf (computed with SciPy 1.17) to 5e-16 absolute over rho in [-1, 1]', () => {
    expect(fx.versions.scipy).toMatch(/^1\.17\./);
    for (const r of fx.cdf) {
      expect(Math.abs(bivariateNormalCdf(r.h, r.k, r.rho) - r.scipy), `h=${r.h} k=${r.k} rho=${r.rho}`).toBeLessThan(5e-16);
    }
  });

  it('matches exact values Phi(h)Phi(k) + excess (mpmath 1.3 quadrature of Plackett\'s identity) to 1e-15 absolute', () => {
    for (const r of fx.excess) {
      const exact = normalCdf(r.h) * normalCdf(r.k) + r.exact;
      expect(Math.abs(bivariateNormalCdf(r.h, r.k, r.rho) - exact), `h=${r.h} k=${r.k} rho=${r.rho}`).toBeLessThan(1e-15);
    }
  });

  it('reproduces the values named in the engine specification (computed with SciPy 1.17)', () => {
    expect(Math.abs(bivariateNormalCdf(1, 1, 0.5) - 0.7452035868467498)).toBeLessThan(1e-15);
    expect(Math.abs(bivariateNormalCdf(-2.5, -1, 0.3) - 0.0027099337788836)).toBeLessThan(1e-16);
  });

  it("follows Sheppard's formula Phi2(0, 0; rho) = 1/4 + arcsin(rho)/(2 pi) (Sheppard 1899)", () => {
    for (let rho = -1; rho <= 1.0000001; rho += 0.025) {
      const r = Math.max(-1, Math.min(1, rho));
      expect(Math.abs(bivariateNormalCdf(0, 0, r) - (0.25 + Math.asin(r) / (2 * Math.PI))), `rho=${r}`).toBeLessThan(4e-16);
    }
  });

  it('joint PD of two 5% obligors: 0.25% independent, 0.71346% at 0.3, ~3.19% at 0.9, ~4.18% at 0.98 (common practice)', () => {
    const k = normalQuantile(0.05);
    expect(bivariateNormalCdf(k, k, 0)).toBeCloseTo(0.0025, 15);
    expect(bivariateNormalCdf(k, k, 0.3)).toBeCloseTo(0.0071346, 7); // 0.0071346 computed with SciPy 1.17
    expect(bivariateNormalCdf(k, k, 0.9)).toBeCloseTo(0.0319, 4);
    expect(bivariateNormalCdf(k, k, 0.98)).toBeCloseTo(0.0418, 4);
  });

  it('is symmetric in (h, k) and equals Phi(h)Phi(k) at rho = 0 (property)', () => {
    const hs = [-6, -3.2, -1.1, 0, 0.4, 2.2];
    for (const h of hs) {
      for (const k of hs) {
        for (const rho of [-0.97, -0.6, -0.2, 0.1, 0.5, 0.8, 0.93, 0.995]) {
          expect(Math.abs(bivariateNormalCdf(h, k, rho) - bivariateNormalCdf(k, h, rho))).toBeLessThan(3e-16);
        }
        expect(rel(bivariateNormalCdf(h, k, 0), normalCdf(h) * normalCdf(k))).toBeLessThan(1e-15);
      }
    }
  });

  it('stays accurate on both sides of the method switches at |rho| = 0.3, 0.75, 0.925 (property, against the excess)', () => {
    for (const [h, k] of [[-1.5, -0.5], [0.3, -2], [1, 1]]) {
      for (const s of [0.3, 0.75, 0.925, -0.3, -0.75, -0.925]) {
        for (const rho of [s - 1e-9, s, s + 1e-9]) {
          const viaExcess = normalCdf(h) * normalCdf(k) + bivariateNormalExcess(h, k, rho);
          expect(Math.abs(bivariateNormalCdf(h, k, rho) - viaExcess), `h=${h} k=${k} rho=${rho}`).toBeLessThan(1e-15);
        }
      }
    }
  });

  it('has the documented limits at rho = +-1 and infinite arguments', () => {
    expect(bivariateNormalCdf(-2, -1, 1)).toBeCloseTo(normalCdf(-2), 16);
    expect(bivariateNormalCdf(1, 0.5, -1)).toBeCloseTo(normalCdf(1) + normalCdf(0.5) - 1, 15);
    expect(bivariateNormalCdf(-1, -1, -1)).toBe(0);
    expect(bivariateNormalCdf(-Infinity, 2, 0.5)).toBe(0);
    expect(bivariateNormalCdf(Infinity, 0.7, 0.5)).toBe(normalCdf(0.7));
    expect(bivariateNormalCdf(Infinity, Infinity, -0.3)).toBe(1);
  });

  it('refuses correlations outside [-1, 1] and NaN', () => {
    expect(() => bivariateNormalCdf(0, 0, 1.0000001)).toThrow(/rho must be a correlation in \[-1, 1\]/);
    expect(() => bivariateNormalCdf(0, 0, Number.NaN)).toThrow(RangeError);
    expect(() => bivariateNormalCdf(Number.NaN, 0, 0.2)).toThrow(RangeError);
  });
});

describe('bivariateNormalExcess', () => {
  it('matches exact excess values (mpmath 1.3, 50 digits) to 2e-15 relative for |h|, |k| <= 4.3, and to the conditioning beyond', () => {
    for (const r of fx.excess) {
      const cond = Math.max(1, (r.h * r.h + r.k * r.k) / 2);
      expect(rel(bivariateNormalExcess(r.h, r.k, r.rho), r.exact), `h=${r.h} k=${r.k} rho=${r.rho}`).toBeLessThan(2e-15 * cond);
    }
  });

  it('keeps its digits at PD 1e-5 and rho 1e-4, where the subtraction Phi2 - Phi^2 has none (mpmath)', () => {
    const k = normalQuantile(1e-5);
    const row = fx.excess.find((r) => r.rho === 1e-4 && Math.abs(r.h - k) < 1e-15);
    expect(row).toBeDefined();
    expect(rel(bivariateNormalExcess(k, k, 1e-4), row!.exact)).toBeLessThan(1e-14);
  });

  it("follows Sheppard's formula: excess(0, 0; rho) = arcsin(rho)/(2 pi) (Sheppard 1899)", () => {
    for (const rho of [-1, -0.999, -0.5, -1e-8, 1e-8, 0.12, 0.5, 0.93, 1]) {
      expect(rel(bivariateNormalExcess(0, 0, rho), Math.asin(rho) / (2 * Math.PI)), `rho=${rho}`).toBeLessThan(2e-15);
    }
  });

  it('tends to p(1 - p) as rho -> 1 (property) and has the sign of rho', () => {
    for (const p of [1e-4, 0.01, 0.05, 0.3]) {
      const k = normalQuantile(p);
      const limit = p * (1 - p);
      expect(rel(bivariateNormalExcess(k, k, 1), limit)).toBeLessThan(1e-14);
      expect(limit - bivariateNormalExcess(k, k, 1 - 1e-10)).toBeGreaterThan(0);
      expect(limit - bivariateNormalExcess(k, k, 1 - 1e-10)).toBeLessThan(1e-4 * limit);
      expect(bivariateNormalExcess(k, k, -0.2)).toBeLessThan(0);
    }
  });

  it('equals Phi2 - Phi Phi where the subtraction is harmless (property, against bivariateNormalCdf)', () => {
    for (const [h, k, rho] of [[0.5, -0.3, 0.4], [-1, 1.2, 0.8], [0.2, 0.1, -0.6], [-0.5, -1.5, 0.96]]) {
      const diff = bivariateNormalCdf(h, k, rho) - normalCdf(h) * normalCdf(k);
      expect(Math.abs(bivariateNormalExcess(h, k, rho) - diff)).toBeLessThan(2e-15);
    }
  });

  it('is 0 at rho = 0 or infinite arguments, and refuses bad correlations', () => {
    expect(bivariateNormalExcess(-1, 2, 0)).toBe(0);
    expect(bivariateNormalExcess(-Infinity, 2, 0.5)).toBe(0);
    expect(() => bivariateNormalExcess(0, 0, -1.5)).toThrow(RangeError);
  });

  it('is fast enough for root finding: 10,000 calls at small PD well under a second (measured)', () => {
    const k = normalQuantile(0.003);
    const t0 = performance.now();
    let s = 0;
    for (let i = 0; i < 10_000; i++) s += bivariateNormalExcess(k, k, 0.01 + i * 9e-5);
    expect(s).toBeGreaterThan(0);
    expect(performance.now() - t0).toBeLessThan(1000);
  });
});
