import { describe, expect, it } from 'vitest';
import { densityContour, pairInputProblem, pairMetrics } from '@/lib/fits/pair';

describe('pairMetrics', () => {
  it('two 5% obligors at rho 0.3 default together with about 0.71% against 0.25% (common practice; 0.0071346 computed with SciPy 1.17)', () => {
    const m = pairMetrics(0.05, 0.05, 0.3);
    expect(m.k1).toBeCloseTo(-1.6448536, 6); // 5% normal deviate, A&S table 26.5
    expect(m.independent).toBeCloseTo(0.0025, 12);
    expect(m.joint).toBeCloseTo(0.0071346, 7);
  });

  it('does not confuse rho 0.98 (about 4.18%) with rho 0.9 (3.19%) (common practice)', () => {
    expect(pairMetrics(0.05, 0.05, 0.98).joint).toBeCloseTo(0.0418, 4);
    expect(pairMetrics(0.05, 0.05, 0.9).joint).toBeCloseTo(0.0319, 4);
  });

  it('default correlation at p = 1%, rho = 0.12 is 0.01182789 (computed with SciPy 1.17: a worked check of the engine specification)', () => {
    expect(pairMetrics(0.01, 0.01, 0.12).defaultCorrelation).toBeCloseTo(0.01182789, 7);
  });

  it("matches Sheppard's formula Phi2(0, 0; rho) = 1/4 + arcsin(rho) / (2 pi) for PDs of 50%", () => {
    for (const rho of [0, 0.1, 0.5, 0.9]) {
      expect(pairMetrics(0.5, 0.5, rho).joint).toBeCloseTo(0.25 + Math.asin(rho) / (2 * Math.PI), 12);
    }
  });

  it('is symmetric in the two obligors and independent at rho = 0', () => {
    const a = pairMetrics(0.02, 0.1, 0.2);
    const b = pairMetrics(0.1, 0.02, 0.2);
    expect(a.joint).toBeCloseTo(b.joint, 14);
    expect(a.defaultCorrelation).toBeCloseTo(b.defaultCorrelation, 14);
    const z = pairMetrics(0.02, 0.1, 0);
    expect(z.joint).toBe(0.002);
    expect(z.defaultCorrelation).toBe(0);
  });

  it('names the bad input instead of returning a number', () => {
    expect(pairInputProblem(0, 0.05, 0.3)).toMatch(/PD of obligor A/);
    expect(pairInputProblem(0.05, Number.NaN, 0.3)).toMatch(/PD of obligor B must be a number/);
    expect(pairInputProblem(0.05, 0.05, 1)).toMatch(/asset correlation/);
    expect(() => pairMetrics(0.05, 0.05, -0.1)).toThrow(RangeError);
  });
});

describe('densityContour', () => {
  it('at rho = 0 is the circle of radius sqrt(-2 ln(1 - q)) (chi-square with 2 degrees of freedom)', () => {
    const e = densityContour(0, 0.95);
    expect(e.alongDiagonal).toBeCloseTo(Math.sqrt(5.991464547107979), 12); // chi2_2(0.95), SciPy 1.17
    expect(e.acrossDiagonal).toBeCloseTo(e.alongDiagonal, 14);
  });

  it('its points satisfy x^2 - 2 rho x y + y^2 = c^2 (1 - rho^2)', () => {
    const rho = 0.6;
    const q = 0.5;
    const { alongDiagonal: a, acrossDiagonal: b } = densityContour(rho, q);
    const c2 = -2 * Math.log(1 - q);
    for (const t of [0, 0.7, 2, 4]) {
      const u = a * Math.cos(t);
      const v = b * Math.sin(t);
      const x = (u + v) / Math.SQRT2;
      const y = (u - v) / Math.SQRT2;
      expect(x * x - 2 * rho * x * y + y * y).toBeCloseTo(c2 * (1 - rho * rho), 12);
    }
  });
});

describe('readPairInputs', () => {
  it('reads PDs in percent and the correlation as plain numbers', async () => {
    const { readPairInputs } = await import('@/lib/fits/pair');
    expect(readPairInputs({ pdA: '5', pdB: ' 1.25% ', rho: '0.3' })).toEqual({ problems: {}, values: { p1: 0.05, p2: 0.0125, rho: 0.3 } });
    expect(readPairInputs({ pdA: '.5', pdB: '1e-1', rho: '0' }).values).toEqual({ p1: 0.005, p2: 0.001, rho: 0 });
  });

  it('refuses a decimal comma with a sentence, and names every bad field at once without computing anything', async () => {
    const { readPairInputs } = await import('@/lib/fits/pair');
    const r = readPairInputs({ pdA: '5,5', pdB: 'abc', rho: '1.5' });
    expect(r.values).toBeNull();
    expect(r.problems).toEqual({
      pdA: 'Write the decimal with a point (5.5), not a comma.',
      pdB: 'The PD of obligor B in percent must be one number, for example 1.5.',
      rho: 'The asset correlation must lie between 0 and 0.999.',
    });
    expect(readPairInputs({ pdA: '', pdB: '0', rho: '0,3' }).problems).toEqual({
      pdA: 'Give the PD of obligor A in percent, for example 1.5.',
      pdB: 'The PD of obligor B must lie between 0.0001% and 99.9%.',
      rho: 'Write the decimal with a point (0.3), not a comma.',
    });
    // A thousands separator is not a number either.
    expect(readPairInputs({ pdA: '1,000.5', pdB: '1', rho: '0.1' }).problems.pdA).toMatch(/must be one number/);
  });
});
