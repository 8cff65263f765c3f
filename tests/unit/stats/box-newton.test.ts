import { describe, expect, it } from 'vitest';
import { boxNewtonMaximize, type BoxNewtonProblem } from '@/lib/stats/box-newton';

/** Minus Rosenbrock's function, f = -(100 (y - x^2)^2 + (1 - x)^2), with its derivatives. */
const rosenbrock: BoxNewtonProblem['evaluate'] = ([x, y]) => ({
  value: -(100 * (y - x * x) ** 2 + (1 - x) ** 2),
  gradient: [400 * x * (y - x * x) + 2 * (1 - x), -200 * (y - x * x)],
  hessian: [
    [400 * (y - x * x) - 800 * x * x - 2, 400 * x],
    [400 * x, -200],
  ],
});

describe('boxNewtonMaximize', () => {
  it("finds Rosenbrock's maximum at (1, 1) from the classic start (-1.2, 1)", () => {
    // Rosenbrock (1960), Computer Journal 3:175-184: the minimum of 100 (y - x^2)^2 + (1 - x)^2 is (1, 1)
    const r = boxNewtonMaximize({ evaluate: rosenbrock, lower: [-5, -5], upper: [5, 5], maxStep: [1, 1] }, [-1.2, 1], { tolerance: 1e-20 });
    expect(r.converged).toBe(true);
    expect(Math.abs(r.x[0] - 1)).toBeLessThan(1e-8);
    expect(Math.abs(r.x[1] - 1)).toBeLessThan(1e-8);
    // at the default tolerance (a gain below 1e-10) the value is within 1e-10 of the maximum 0
    const loose = boxNewtonMaximize({ evaluate: rosenbrock, lower: [-5, -5], upper: [5, 5], maxStep: [1, 1] }, [-1.2, 1]);
    expect(loose.value).toBeGreaterThan(-1e-9);
  });

  it('stops at a bound the maximum lies beyond, and reports it as active', () => {
    // max of -(x - 2)^2 - (y - 0.3)^2 on [0, 1] x [0, 1] is (1, 0.3) (worked by hand)
    const r = boxNewtonMaximize(
      {
        evaluate: ([x, y]) => ({ value: -((x - 2) ** 2) - (y - 0.3) ** 2, gradient: [-2 * (x - 2), -2 * (y - 0.3)], hessian: [[-2, 0], [0, -2]] }),
        lower: [0, 0],
        upper: [1, 1],
        maxStep: [1, 1],
      },
      [0.5, 0.9],
    );
    expect(r.converged).toBe(true);
    expect(r.x[0]).toBe(1);
    expect(Math.abs(r.x[1] - 0.3)).toBeLessThan(1e-9);
    expect(r.atBound).toEqual([true, false]);
  });

  it('holds fixed and idle coordinates where they are', () => {
    const evaluate: BoxNewtonProblem['evaluate'] = ([x, y]) => ({
      value: -((x - 1) ** 2) - (y - x) ** 2,
      gradient: [-2 * (x - 1) + 2 * (y - x), -2 * (y - x)],
      hessian: [[-4, 2], [2, -2]],
    });
    // y fixed at 0: max over x of -(x - 1)^2 - x^2 is x = 1/2
    const fixed = boxNewtonMaximize({ evaluate, lower: [-3, -3], upper: [3, 3], maxStep: [1, 1], fixed: [false, true] }, [2, 0]);
    expect(Math.abs(fixed.x[0] - 0.5)).toBeLessThan(1e-9);
    expect(fixed.x[1]).toBe(0);
    // x pushed against its upper bound 0.2 (f_x = 3.2 > 0 at (0.2, 1)) makes y idle: y stays at its start
    const idle = boxNewtonMaximize(
      { evaluate, lower: [-3, -3], upper: [0.2, 3], maxStep: [1, 1], idleAt: (atBound) => [false, atBound[0]] },
      [0.2, 1],
    );
    expect(idle.x).toEqual([0.2, 1]);
    expect(idle.converged).toBe(true);
  });

  it('leaves a saddle by a modified Newton step and reaches a maximum', () => {
    // f = -(x^2 - 1)^2 - y^2 has a saddle-like stationary point at x = 0 (f_xx = +4) and maxima at x = +-1
    const r = boxNewtonMaximize(
      {
        evaluate: ([x, y]) => ({ value: -((x * x - 1) ** 2) - y * y, gradient: [-4 * x * (x * x - 1), -2 * y], hessian: [[-12 * x * x + 4, 0], [0, -2]] }),
        lower: [-3, -3],
        upper: [3, 3],
        maxStep: [0.5, 0.5],
      },
      [1e-3, 0.4],
    );
    expect(r.converged).toBe(true);
    expect(Math.abs(Math.abs(r.x[0]) - 1)).toBeLessThan(1e-6);
    expect(Math.abs(r.x[1])).toBeLessThan(1e-6);
  });

  it('refuses crossed bounds and a start where the function is not finite', () => {
    const evaluate: BoxNewtonProblem['evaluate'] = () => ({ value: Number.NaN, gradient: [0], hessian: [[-1]] });
    expect(() => boxNewtonMaximize({ evaluate, lower: [1], upper: [0], maxStep: [1] }, [0.5])).toThrow(/lower/);
    expect(() => boxNewtonMaximize({ evaluate, lower: [0], upper: [1], maxStep: [1] }, [0.5])).toThrow(/not finite/);
  });
});
