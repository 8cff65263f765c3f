import { describe, expect, it } from 'vitest';
import fx from '@/tests/fixtures/copula/pair-t-fixtures.json';
import { readPairInputs } from '@/lib/fits/pair';
import { pairNuProblem, pairTMetrics, pairTStartOf, readPairNu } from '@/lib/fits/pair-t';

describe('pairTMetrics', () => {
  it('gives the t joint default, default correlation and tail dependence, and the Gaussian ones beside them, as SciPy does', () => {
    // computed with SciPy 1.17 by tests/fixtures/copula/make_pair_t.py (quad over V, multivariate_t.cdf, multivariate_normal.cdf, t.cdf)
    for (const c of fx.pairs) {
      const m = pairTMetrics(c.p1, c.p2, c.rho, c.nu);
      const at = `p1=${c.p1} p2=${c.p2} rho=${c.rho} nu=${c.nu}`;
      expect(Math.abs(m.joint / c.tJoint - 1), at).toBeLessThan(1e-8);
      expect(Math.abs(m.joint / c.tJointMultivariateT - 1), at).toBeLessThan(2e-5);
      expect(Math.abs(m.gaussian.joint / c.gaussianJoint - 1), at).toBeLessThan(1e-9);
      expect(Math.abs(m.defaultCorrelation - c.tDefaultCorrelation), at).toBeLessThan(1e-8);
      expect(Math.abs(m.gaussian.defaultCorrelation - c.gaussianDefaultCorrelation), at).toBeLessThan(1e-9);
      expect(Math.abs(m.tailDependence - c.tailDependence), at).toBeLessThan(1e-12);
      expect(Math.abs(m.ratioToGaussian / (c.tJoint / c.gaussianJoint) - 1), at).toBeLessThan(1e-8);
      expect(m.independent).toBe(c.p1 * c.p2);
      expect(m.secondGivenFirst).toBe(m.joint / c.p1);
    }
  });

  it('two 1% obligors at rho 0.3 and nu 4 default together with 0.1911% against 0.0556% under the Gaussian copula', () => {
    // the e2e case; make_pair_t.py (SciPy 1.17): 0.001911027606, 0.000556328489, the thresholds t_4^-1(0.01) = -3.7469 (Student t table)
    const m = pairTMetrics(0.01, 0.01, 0.3, 4);
    expect(m.joint).toBeCloseTo(0.0019110276, 10);
    expect(m.gaussian.joint).toBeCloseTo(0.0005563285, 10);
    expect(m.k1).toBeCloseTo(-3.7469, 4);
    expect(m.gaussian.k1).toBeCloseTo(-2.3263, 4);
  });

  it('keeps each PD: the thresholds are the t quantiles, symmetric in the two obligors, and the t tail is the fatter one', () => {
    // property: swapping the obligors changes nothing; the t copula adds joint defaults at positive rho (McNeil, Frey & Embrechts 2015, section 7.3)
    const a = pairTMetrics(0.02, 0.1, 0.2, 5);
    const b = pairTMetrics(0.1, 0.02, 0.2, 5);
    expect(Math.abs(a.joint - b.joint)).toBeLessThan(1e-15);
    expect(a.k1).toBe(b.k2);
    expect(a.ratioToGaussian).toBeGreaterThan(1);
    // at rho = 0 the t pair is still dependent through the common V, the Gaussian pair is not
    const z = pairTMetrics(0.01, 0.01, 0, 4);
    expect(z.gaussian.joint).toBe(1e-4);
    expect(z.joint).toBeGreaterThan(9e-4);
  });

  it('comes near the Gaussian copula at the largest nu the explorer takes', () => {
    // the t copula tends to the Gaussian as nu -> infinity (definition); nu = 1000 is the explorer's end
    const m = pairTMetrics(0.05, 0.05, 0.3, 1000);
    expect(Math.abs(m.ratioToGaussian - 1)).toBeLessThan(0.01);
    expect(m.tailDependence).toBeLessThan(1e-12);
  });

  it('names a bad input instead of returning a number', () => {
    expect(() => pairTMetrics(0.01, 0.01, 0.3, 1.5)).toThrow(/degrees of freedom ν must be above 2/);
    expect(() => pairTMetrics(0.01, 0.01, 1.2, 4)).toThrow(/asset correlation/);
    expect(pairNuProblem(2)).toMatch(/above 2/);
    expect(pairNuProblem(2.0001)).toBeNull();
    expect(pairNuProblem(1001)).toMatch(/above 1000 is the Gaussian copula.*at most 1000/);
    expect(pairNuProblem(Number.NaN)).toMatch(/must be a number/);
  });
});

describe('readPairNu', () => {
  it('reads one plain number above 2', () => {
    expect(readPairNu(' 4 ')).toEqual({ problem: null, value: 4 });
    expect(readPairNu('2.5')).toEqual({ problem: null, value: 2.5 });
    expect(readPairNu('1e3')).toEqual({ problem: null, value: 1000 });
  });

  it('refuses a decimal comma, an empty field, text, a percentage and nu at or below 2 with a sentence for the field', () => {
    expect(readPairNu('4,5')).toEqual({ problem: 'Write the decimal with a point (4.5), not a comma.', value: null });
    expect(readPairNu('').problem).toBe('Give the degrees of freedom ν, for example 4.');
    expect(readPairNu('four').problem).toBe('The degrees of freedom ν must be one number, for example 4.');
    expect(readPairNu('4%').problem).toMatch(/must be one number/);
    expect(readPairNu('1.5').problem).toBe('The degrees of freedom ν must be above 2 (the t copula\'s fits need a finite variance), for example 4.');
    expect(readPairNu('2').problem).toMatch(/must be above 2/);
    expect(readPairNu('Infinity').problem).toMatch(/must be one number/);
  });

  it('leaves the other fields\' reading as it was', () => {
    // readPairInputs now reads through the same plain-number rule
    expect(readPairInputs({ pdA: '1', pdB: '1%', rho: '0.3' }).values).toEqual({ p1: 0.01, p2: 0.01, rho: 0.3 });
    expect(readPairInputs({ pdA: '5,5', pdB: '1', rho: '0.3' }).problems.pdA).toBe('Write the decimal with a point (5.5), not a comma.');
  });
});

describe('pairTStartOf', () => {
  // the engine's estimates.tCopula { rho, pd, nu, status, reason? } (nu null at the Gaussian limit)
  const fitted = { rho: 0.05, pd: 0.02, nu: 6.3, status: 'ok' };

  it('starts the t copula from a fitted rho, nu and PD', () => {
    expect(pairTStartOf(fitted)).toEqual({ kind: 'start', pd: 0.02, rho: 0.05, nu: 6.3 });
    expect(pairTStartOf({ ...fitted, status: 'clipped', rho: 0 })).toEqual({ kind: 'start', pd: 0.02, rho: 0, nu: 6.3 });
  });

  it('says the Gaussian limit when nu is null or beyond the explorer\'s largest nu', () => {
    expect(pairTStartOf({ ...fitted, nu: null })).toEqual({ kind: 'gaussian-limit', pd: 0.02, rho: 0.05 });
    expect(pairTStartOf({ ...fitted, nu: 5000 })).toEqual({ kind: 'gaussian-limit', pd: 0.02, rho: 0.05 });
  });

  it('gives the reason when there is nothing to start from, and nothing when the fit ran no t copula', () => {
    expect(pairTStartOf(undefined)).toBeNull();
    expect(pairTStartOf({ rho: null, pd: null, nu: null, status: 'undefined', reason: 'No defaults in the window.' })).toEqual({ kind: 'none', reason: 'No defaults in the window.' });
    expect(pairTStartOf({ ...fitted, status: 'not-converged' })).toEqual({ kind: 'none', reason: "the estimate's status is not-converged." });
    expect(pairTStartOf({ ...fitted, nu: 1.8 })).toEqual({ kind: 'none', reason: expect.stringMatching(/above 2/) });
    expect(pairTStartOf({ ...fitted, rho: 0.9995 })).toEqual({ kind: 'none', reason: expect.stringMatching(/asset correlation/) });
  });
});
