import { describe, expect, it } from 'vitest';
import fx from '@/tests/fixtures/copula/pair-t-fixtures.json';
import { bivariateTContour, bivariateTDensity } from '@/lib/stats/bivariate-t-density';

const nuOf = (nu: number | null) => nu ?? Number.POSITIVE_INFINITY;

describe('bivariateTDensity', () => {
  it('matches scipy.stats.multivariate_t.pdf and multivariate_normal.pdf', () => {
    // computed with SciPy 1.17 by tests/fixtures/copula/make_pair_t.py
    expect(fx.scipy).toMatch(/^1\.17/);
    for (const c of fx.density) {
      const v = bivariateTDensity(c.x, c.y, c.rho, nuOf(c.nu));
      expect(Math.abs(v / c.pdf - 1), `(${c.x}, ${c.y}) rho=${c.rho} nu=${c.nu}`).toBeLessThan(1e-12);
    }
  });

  it('is symmetric, peaks at the origin at 1 / (2 pi sqrt(1 - rho^2)) and nears the normal as nu grows', () => {
    // the density's formula (Kotz & Nadarajah 2004, eq. 1.1): Q = 0 at the origin; symmetry in (x, y) and (-x, -y)
    expect(bivariateTDensity(0, 0, 0.3, 4)).toBeCloseTo(1 / (2 * Math.PI * Math.sqrt(0.91)), 14);
    expect(bivariateTDensity(1.2, -0.4, 0.3, 4)).toBe(bivariateTDensity(-0.4, 1.2, 0.3, 4));
    expect(bivariateTDensity(1.2, -0.4, 0.3, 4)).toBe(bivariateTDensity(-1.2, 0.4, 0.3, 4));
    // (1 + Q / nu)^(-(nu + 2) / 2) -> exp(-Q / 2)
    expect(Math.abs(bivariateTDensity(-2, -1, 0.4, 1e8) / bivariateTDensity(-2, -1, 0.4, Number.POSITIVE_INFINITY) - 1)).toBeLessThan(1e-7);
    // the t has the fatter joint tail
    expect(bivariateTDensity(-3, -3, 0.3, 4)).toBeGreaterThan(bivariateTDensity(-3, -3, 0.3, Number.POSITIVE_INFINITY));
  });

  it('integrates to one (midpoint rule on a polar grid of the whitened density)', () => {
    // brute force: Int_0^R 2 pi r f(r, 0) dr at rho = 0, plus the tail beyond R from the F law 1 - (1 + R^2 / nu)^(-nu / 2)
    const nu = 4;
    const R = 40;
    const N = 200000;
    let mass = 0;
    for (let i = 0; i < N; i++) {
      const r = ((i + 0.5) / N) * R;
      mass += 2 * Math.PI * r * bivariateTDensity(r, 0, 0, nu) * (R / N);
    }
    expect(Math.abs(mass + Math.pow(1 + (R * R) / nu, -nu / 2) - 1)).toBeLessThan(1e-6);
  });

  it('refuses a correlation at +-1, nu not positive and a point at infinity with a RangeError', () => {
    expect(() => bivariateTDensity(0, 0, 1, 4)).toThrow(RangeError);
    expect(() => bivariateTDensity(0, 0, 0.3, 0)).toThrow(/degrees of freedom/);
    expect(() => bivariateTDensity(Number.NEGATIVE_INFINITY, 0, 0.3, 4)).toThrow(RangeError);
  });
});

describe('bivariateTContour', () => {
  it('has the squared radius 2 F(2, nu)^-1(q) that SciPy finds, and encloses q by a brute-force radial quad', () => {
    // computed with SciPy 1.17 by make_pair_t.py (scipy.stats.f.ppf, chi2.ppf for the normal; `inside` by quad of multivariate_t.pdf)
    for (const c of fx.contours) {
      const e = bivariateTContour(0, nuOf(c.nu), c.q);
      expect(Math.abs((e.alongDiagonal * e.alongDiagonal) / c.c2 - 1), `nu=${c.nu} q=${c.q}`).toBeLessThan(1e-12);
      expect(Math.abs(c.inside - c.q)).toBeLessThan(1e-10);
    }
  });

  it('is a level set of the density: the density is the same at points all round the ellipse', () => {
    // definition of a contour; the ellipse x^2 - 2 rho x y + y^2 = c^2 (1 - rho^2) in axes turned by 45 degrees
    const rho = 0.6;
    const nu = 3;
    const { alongDiagonal: a, acrossDiagonal: b } = bivariateTContour(rho, nu, 0.8);
    const at = (t: number) => {
      const u = a * Math.cos(t);
      const v = b * Math.sin(t);
      return bivariateTDensity((u - v) / Math.SQRT2, (u + v) / Math.SQRT2, rho, nu);
    };
    const d0 = at(0);
    for (const t of [0.4, 1.3, 2.9, 4.4]) expect(Math.abs(at(t) / d0 - 1)).toBeLessThan(1e-12);
  });

  it('is wider for the t than for the normal at high q and equal in the limit', () => {
    // the t's tails are heavier; (1 - q)^(-2 / nu) - 1 ~ -(2 / nu) ln(1 - q) as nu -> infinity
    expect(bivariateTContour(0.3, 4, 0.99).alongDiagonal).toBeGreaterThan(bivariateTContour(0.3, Number.POSITIVE_INFINITY, 0.99).alongDiagonal);
    expect(Math.abs(bivariateTContour(0.3, 1e9, 0.99).alongDiagonal / bivariateTContour(0.3, Number.POSITIVE_INFINITY, 0.99).alongDiagonal - 1)).toBeLessThan(1e-8);
    expect(() => bivariateTContour(0.3, 4, 1)).toThrow(RangeError);
  });
});
