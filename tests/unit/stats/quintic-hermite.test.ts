import { describe, expect, it } from 'vitest';
import { quinticHermite, quinticHermiteValue } from '@/lib/stats/quintic-hermite';

// A polynomial of degree 5 and its first two derivatives.
const poly = (c: number[]) => ({
  f: (x: number) => c.reduce((s, ci, i) => s + ci * x ** i, 0),
  g: (x: number) => c.reduce((s, ci, i) => (i >= 1 ? s + i * ci * x ** (i - 1) : s), 0),
  s: (x: number) => c.reduce((s, ci, i) => (i >= 2 ? s + i * (i - 1) * ci * x ** (i - 2) : s), 0),
});

describe('quintic Hermite interpolation', () => {
  it('reproduces every polynomial of degree 5 with its first two derivatives (uniqueness of the Hermite interpolant)', () => {
    // Burden & Faires (2011), Numerical Analysis, 9th ed., section 3.4: the Hermite interpolant matching
    // values and derivatives up to order 2 at two points is the unique polynomial of degree <= 5, so a
    // quintic is reproduced exactly (to rounding).
    const cases = [
      [1, -2, 0.5, 3, -1, 0.25],
      [0, 0, 0, 0, 0, 1],
      [-3.5, 0.1, -0.7, 0, 2, -0.4],
    ];
    for (const c of cases) {
      const { f, g, s } = poly(c);
      for (const [x0, x1] of [
        [0, 1],
        [-1.5, 0.25],
        [2, 2.03125],
      ]) {
        for (const u of [0, 0.1, 0.37, 0.5, 0.81, 1]) {
          const x = x0 + u * (x1 - x0);
          const out = quinticHermite(x0, f(x0), g(x0), s(x0), x1, f(x1), g(x1), s(x1), x, { value: 0, d1: 0, d2: 0 });
          const scale = 1 + Math.abs(f(x));
          expect(Math.abs(out.value - f(x))).toBeLessThan(1e-12 * scale);
          expect(Math.abs(out.d1 - g(x))).toBeLessThan(1e-9 * (1 + Math.abs(g(x))));
          expect(Math.abs(out.d2 - s(x))).toBeLessThan(1e-7 * (1 + Math.abs(s(x))));
          expect(quinticHermiteValue(x0, f(x0), g(x0), s(x0), x1, f(x1), g(x1), s(x1), x)).toBeCloseTo(out.value, 12);
        }
      }
    }
  });

  it('has the error of order h^6 on a smooth function (halving h divides the error by about 64)', () => {
    // common practice (the error term of Hermite interpolation, Burden & Faires section 3.4): f = exp
    const err = (h: number) => {
      const x = 0.3 + 0.5 * h;
      return Math.abs(quinticHermiteValue(0.3, Math.exp(0.3), Math.exp(0.3), Math.exp(0.3), 0.3 + h, Math.exp(0.3 + h), Math.exp(0.3 + h), Math.exp(0.3 + h), x) - Math.exp(x));
    };
    const ratio = err(0.4) / err(0.2);
    expect(ratio).toBeGreaterThan(50);
    expect(ratio).toBeLessThan(80);
  });
});
