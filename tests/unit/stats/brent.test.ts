import { describe, expect, it } from 'vitest';
import { brentMinimize, brentRoot } from '@/lib/stats/brent';

describe('brentRoot', () => {
  it('finds sqrt(2) as the root of x^2 - 2', () => {
    const r = brentRoot((x) => x * x - 2, 0, 2);
    expect(r.converged).toBe(true);
    expect(r.value).toBeCloseTo(Math.SQRT2, 12); // exact: sqrt(2)
  });

  it('finds the fixed point of cos (the Dottie number)', () => {
    const r = brentRoot((x) => Math.cos(x) - x, 0, 1);
    // 0.7390851332151607: computed with SciPy 1.17 scipy.optimize.brentq(cos(x)-x, 0, 1, xtol=1e-15)
    expect(Math.abs(r.value - 0.7390851332151607)).toBeLessThan(1e-12);
  });

  it('handles a root at an end point and a steep function', () => {
    expect(brentRoot((x) => x, 0, 1).value).toBe(0); // exact
    const r = brentRoot((x) => Math.exp(50 * x) - 2, -1, 1);
    expect(Math.abs(r.value - Math.log(2) / 50)).toBeLessThan(1e-12); // exact: ln 2 / 50
  });

  it('refuses an interval without a sign change and bad intervals', () => {
    expect(() => brentRoot((x) => x * x + 1, -1, 1)).toThrow(RangeError);
    expect(() => brentRoot((x) => x, 1, 0)).toThrow(/a < b/);
    expect(() => brentRoot(() => Number.NaN, 0, 1)).toThrow(/NaN/);
  });

  it('reports non-convergence when the iteration limit is too small', () => {
    const r = brentRoot((x) => Math.cos(x) - x, 0, 1, { maxIterations: 2 });
    expect(r.converged).toBe(false);
    expect(r.iterations).toBe(2);
  });
});

describe('brentMinimize', () => {
  it('finds the minimum of x - log x at 1', () => {
    const r = brentMinimize((x) => x - Math.log(x), 0.1, 5, { tolerance: 1e-12 });
    expect(r.converged).toBe(true);
    expect(Math.abs(r.value - 1)).toBeLessThan(1e-7); // calculus: d/dx = 1 - 1/x
    expect(r.fValue).toBeCloseTo(1, 12);
  });

  it('converges to an end point when the function is monotone', () => {
    const r = brentMinimize((x) => x, 0, 1, { tolerance: 1e-10 });
    expect(r.value).toBeLessThan(1e-8); // exact minimiser: 0
  });

  it('finds the minimum of a quartic with a flat bottom', () => {
    const r = brentMinimize((x) => (x - 0.3) ** 4 + 1, -2, 2, { tolerance: 1e-12 });
    expect(Math.abs(r.value - 0.3)).toBeLessThan(1e-3); // exact minimiser 0.3; quartic: f-accuracy eps => x-accuracy eps^(1/4)
  });

  it('reports non-convergence and refuses bad input', () => {
    expect(brentMinimize((x) => Math.sin(x), 0, 6, { maxIterations: 3 }).converged).toBe(false);
    expect(() => brentMinimize((x) => x, 0, Number.POSITIVE_INFINITY)).toThrow(RangeError);
    expect(() => brentMinimize(() => Number.NaN, 0, 1)).toThrow(/NaN/);
  });
});
