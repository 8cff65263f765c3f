import { describe, expect, it } from 'vitest';
import { safeguardedNewtonRoot } from '@/lib/stats/safeguarded-newton';

describe('safeguardedNewtonRoot', () => {
  it('finds sqrt(2) as the root of x^2 - 2 with few evaluations', () => {
    const r = safeguardedNewtonRoot((x) => ({ f: x * x - 2, df: 2 * x }), 0, 2, -2, 2, { tolerance: 1e-14 });
    expect(r.converged).toBe(true);
    expect(Math.abs(r.value - Math.SQRT2)).toBeLessThan(1e-14); // exact: sqrt(2)
    expect(r.evaluations).toBeLessThan(10); // quadratic convergence (Press et al. 2007, 9.4)
  });

  it('finds the fixed point of cos (the Dottie number)', () => {
    const r = safeguardedNewtonRoot((x) => ({ f: Math.cos(x) - x, df: -Math.sin(x) - 1 }), 0, 1, 1, Math.cos(1) - 1);
    // 0.7390851332151607: computed with SciPy 1.17 scipy.optimize.brentq(cos(x)-x, 0, 1, xtol=1e-15)
    expect(Math.abs(r.value - 0.7390851332151607)).toBeLessThan(1e-12);
  });

  it('still converges (by bisection) when the derivative is useless', () => {
    // f = x^3 - 0.1 with a derivative of the wrong sign: every Newton step leaves the bracket
    const r = safeguardedNewtonRoot((x) => ({ f: x ** 3 - 0.1, df: -1 }), 0, 1, -0.1, 0.9, { tolerance: 1e-12 });
    expect(r.converged).toBe(true);
    expect(Math.abs(r.value - Math.cbrt(0.1))).toBeLessThan(1e-11); // exact: 0.1^(1/3)
  });

  it('handles a decreasing function and a start at an end of the bracket', () => {
    const r = safeguardedNewtonRoot((x) => ({ f: Math.exp(-x) - 0.5, df: -Math.exp(-x) }), 0, 5, 0.5, Math.exp(-5) - 0.5, {
      start: 5,
      tolerance: 1e-13,
    });
    expect(Math.abs(r.value - Math.LN2)).toBeLessThan(1e-12); // exact: ln 2
  });

  it('refuses a bracket without a sign change, bad intervals and NaN', () => {
    expect(() => safeguardedNewtonRoot((x) => ({ f: x, df: 1 }), 1, 2, 1, 2)).toThrow(/same sign/);
    expect(() => safeguardedNewtonRoot((x) => ({ f: x, df: 1 }), 2, 1, 2, 1)).toThrow(/lower < upper/);
    expect(() => safeguardedNewtonRoot(() => ({ f: Number.NaN, df: 1 }), 0, 1, -1, 1)).toThrow(/NaN/);
  });

  it('reports non-convergence when the iteration limit is too small', () => {
    const r = safeguardedNewtonRoot((x) => ({ f: x ** 3 - 0.1, df: -1 }), 0, 1, -0.1, 0.9, { maxIterations: 3 });
    expect(r.converged).toBe(false);
    expect(r.iterations).toBe(3);
  });
});
