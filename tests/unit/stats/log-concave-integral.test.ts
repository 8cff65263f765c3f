import { describe, expect, it } from 'vitest';
import { LogConcaveIntegrator, logConcaveIntegral, type LogConcaveIntegrand } from '@/lib/stats/log-concave-integral';

const LN_SQRT_2PI = 0.9189385332046727;

/** exp(-(x - mu)^2 / (2 s^2)) with the mean as a moment. */
function gaussian(mu: number, s: number): LogConcaveIntegrand {
  return {
    moments: 2,
    derivatives(x, out) {
      out[0] = -((x - mu) ** 2) / (2 * s * s);
      out[1] = -(x - mu) / (s * s);
      out[2] = -1 / (s * s);
    },
    node(x, row) {
      row[0] = x;
      row[1] = (x - mu) ** 2;
      return -((x - mu) ** 2) / (2 * s * s);
    },
  };
}

describe('LogConcaveIntegrator', () => {
  it('integrates a unit Gaussian to sqrt(2 pi) with its mean and variance as moments', () => {
    // Int exp(-x^2/2) dx = sqrt(2 pi) (calculus)
    const I = new LogConcaveIntegrator(2);
    const r = I.integrate(gaussian(0, 1), { curvatureBound: 1 });
    expect(r.converged).toBe(true);
    expect(Math.abs(r.value - LN_SQRT_2PI)).toBeLessThan(1e-13);
    expect(Math.abs(I.moments[0])).toBeLessThan(1e-13);
    expect(Math.abs(I.moments[1] - 1)).toBeLessThan(1e-12);
  });

  it('finds a spike of width 1e-6 at 3 from a start at 0 and from warm starts a trillion away', () => {
    // Int exp(-(x - mu)^2 / (2 s^2)) dx = s sqrt(2 pi) (calculus); the nodes' positions carry a
    // rounding of ~3 x 1.1e-16 / 1e-6 relative to the width, hence the 1e-9 tolerance
    const I = new LogConcaveIntegrator(2);
    for (const start of [0, 1e12, -1e12]) {
      const r = I.integrate(gaussian(3, 1e-6), { start, curvatureBound: 0 });
      expect(r.converged, `start ${start}`).toBe(true);
      expect(Math.abs(r.value - (Math.log(1e-6) + LN_SQRT_2PI))).toBeLessThan(1e-9);
      expect(Math.abs(r.mode - 3)).toBeLessThan(1e-12);
      expect(Math.abs(I.moments[0] - 3)).toBeLessThan(1e-12);
    }
  });

  it('integrates exp(a x - e^x) to Gamma(a) without a curvature bound (an exponential cliff on one side)', () => {
    // Int exp(a x - e^x) dx = Gamma(a) (substitute t = e^x); Gamma(3) = 2, Gamma(0.5) = sqrt(pi)
    for (const [a, logGamma] of [
      [3, Math.log(2)],
      [0.5, 0.5 * Math.log(Math.PI)],
      [200, 857.9336698258575], // log Gamma(200) by Python 3.11 math.lgamma (the C library lgamma)
    ] as const) {
      const r = logConcaveIntegral((x) => [a * x - Math.exp(x), a - Math.exp(x), -Math.exp(x)]);
      expect(r.converged, `a = ${a}`).toBe(true);
      expect(Math.abs(r.value - logGamma), `a = ${a}`).toBeLessThan(1e-10 * Math.max(1, Math.abs(logGamma)));
    }
  });

  it('integrates over a half-line, with the maximum at the limit', () => {
    // Int_0^inf exp(-x^2/2) dx = sqrt(pi/2); Int_1^inf exp(-x^2/2) dx = sqrt(2 pi) Phi(-1),
    // Phi(-1) = 0.15865525393145705 (A&S table 26.1)
    const g = (x: number) => [-x * x / 2, -x, -1] as const;
    expect(Math.abs(logConcaveIntegral(g, { lower: 0, curvatureBound: 1 }).value - 0.5 * Math.log(Math.PI / 2))).toBeLessThan(1e-13);
    const r = logConcaveIntegral(g, { lower: 1, curvatureBound: 1 });
    expect(r.mode).toBe(1);
    expect(Math.abs(r.value - (LN_SQRT_2PI + Math.log(0.15865525393145705)))).toBeLessThan(1e-12);
  });

  it('reports a failure with a reason instead of a number', () => {
    // not finite anywhere: no mode, never a silent value
    const r = logConcaveIntegral(() => [Number.NaN, Number.NaN, Number.NaN]);
    expect(r.converged).toBe(false);
    expect(Number.isNaN(r.value)).toBe(true);
    expect(r.reason).toMatch(/mode/);
    expect(() => new LogConcaveIntegrator(0).integrate(gaussian(0, 1))).toThrow(/moments/);
    expect(() => logConcaveIntegral((x) => [-x * x, -2 * x, -2], { lower: 1, upper: 0 })).toThrow(RangeError);
  });

  it('gives the same value from a cold start and from any warm start (a maximum is a maximum)', () => {
    const I = new LogConcaveIntegrator(2);
    const cold = I.integrate(gaussian(-3, 0.01), { curvatureBound: 0 }).value;
    for (const start of [-1e6, -3.2, 0, 17, 1e6]) {
      for (const widths of [1e-9, 1, 1e3]) {
        const warm = I.integrate(gaussian(-3, 0.01), { start, leftWidth: widths, rightWidth: widths });
        expect(Math.abs(warm.value - cold)).toBeLessThan(1e-12);
      }
    }
  });
});

describe('an integrand whose curvature is exactly the bound', () => {
  it('integrates a standard normal from a warm start off its mode (the mode found is within 1e-6 of 0)', () => {
    // closed form: Int exp(-x^2 / 2) dx = sqrt(2 pi); the curvature equals the bound c = 1, so the
    // truncation width must allow for the small error of the mode (regression: grades at rho = 0)
    const I = new LogConcaveIntegrator(2);
    for (const start of [-8.5e-7, 3e-4, 0.7, -5]) {
      const r = I.integrate(gaussian(0, 1), { start, leftWidth: 0.05, rightWidth: 0.05, curvatureBound: 1 });
      expect(r.converged, `start ${start}`).toBe(true);
      expect(Math.abs(r.value - LN_SQRT_2PI)).toBeLessThan(1e-12);
    }
  });
});
