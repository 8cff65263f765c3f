import { describe, expect, it } from 'vitest';
import fx from '@/tests/fixtures/portfolio/posterior-fixtures.json';
import engine from '@/tests/fixtures/engine/engine-fixtures.json';
import { rhoPriorLaw } from '@/lib/stats/beta-prior';
import { binomialMle } from '@/lib/stats/estimators/binomial-mle';
import { rhoPosterior } from '@/lib/stats/rho-posterior';

describe('rhoPosterior (grid posterior of rho and p)', () => {
  it('matches a direct SciPy quadrature of the posterior: median, mean, equal-tailed interval of rho and of p', () => {
    // computed with NumPy/SciPy 1.17 by tests/fixtures/portfolio/make_posterior.py (trapezoid rules on fine grids)
    for (const c of fx.cases) {
      const r = rhoPosterior({ obligors: c.obligors, defaults: c.defaults }, { prior: { a: c.a, b: c.b, label: c.prior } });
      const what = `${c.panel} ${c.prior}`;
      expect(Math.abs(r.median - c.rho.median), `${what} median`).toBeLessThan(2e-3);
      expect(Math.abs(r.mean - c.rho.mean!), `${what} mean`).toBeLessThan(2e-3);
      expect(Math.abs(r.lower - c.rho.lower), `${what} lower`).toBeLessThan(2e-3);
      expect(Math.abs(r.upper - c.rho.upper), `${what} upper`).toBeLessThan(2e-3);
      // p's posterior interpolates the conditional densities of 21 rho nodes: to 1.5% (relative);
      // the widest gap is the panel without defaults under a flat prior on rho, whose p reaches
      // into the tail where the reference's grid of k ends (-8); closer with more nodes (next test)
      expect(Math.abs(r.pd.median - c.pd.median) / c.pd.median, `${what} pd median`).toBeLessThan(1.5e-2);
      expect(Math.abs(r.pd.lower - c.pd.lower) / c.pd.lower, `${what} pd lower`).toBeLessThan(1.5e-2);
      expect(Math.abs(r.pd.upper - c.pd.upper) / c.pd.upper, `${what} pd upper`).toBeLessThan(1.5e-2);
      expect(r.prior).toEqual({ rho: c.prior, pd: 'beta:1,1' });
    }
  });

  it('gives the posterior of p closer to SciPy with more rho nodes', () => {
    // convergence of the rule toward tests/fixtures/portfolio/make_posterior.py (SciPy 1.17), whose
    // own grids hold it near 6e-4 (relative) at the upper end
    const c = fx.cases.find((x) => x.panel === 'low' && x.prior === 'flat')!;
    const pd = (nodes: number) => rhoPosterior({ obligors: c.obligors, defaults: c.defaults }, { prior: { a: 1, b: 1, label: 'flat' }, nodes }).pd;
    const coarse = pd(11);
    const fine = pd(81);
    const err = (x: number, y: number) => Math.abs(x - y) / y;
    expect(err(fine.upper, c.pd.upper)).toBeLessThan(err(coarse.upper, c.pd.upper) / 4);
    expect(err(fine.upper, c.pd.upper)).toBeLessThan(1e-3);
    expect(err(fine.median, c.pd.median)).toBeLessThan(3e-4);
  });

  it('under flat priors peaks at the maximum-likelihood rho for a data-rich panel', () => {
    // property: with flat priors the posterior is the normalised likelihood; its rho-marginal (p
    // integrated out) peaks at the MLE up to a shift of order 1/n and the 0.001 cells (panel E:
    // T = 20, cohorts 5,000-50,000, engine fixtures)
    const panel = { obligors: engine.panels.E.obligors, defaults: engine.panels.E.defaults };
    const mle = binomialMle(panel).rho!;
    const r = rhoPosterior(panel, { prior: { a: 1, b: 1, label: 'flat' }, cells: 995 });
    const peak = r.density.reduce((best, d) => (d.posterior > best.posterior ? d : best));
    expect(Math.abs(peak.rho - mle)).toBeLessThan(0.003);
    expect(r.hpdLower).toBeLessThan(mle);
    expect(r.hpdUpper).toBeGreaterThan(mle);
  });

  it('moves toward a strong prior and the densities integrate to one', () => {
    // property of Bayes' rule; numerical check of the grid (cell width 0.995 / 400)
    const panel = { obligors: Array(8).fill(600), defaults: [0, 1, 0, 2, 0, 0, 1, 0] };
    const flat = rhoPosterior(panel, { prior: rhoPriorLaw({ kind: 'flat' }, null) });
    const strong = rhoPosterior(panel, { prior: rhoPriorLaw({ kind: 'supervisory', strength: 200 }, 0.15) });
    expect(Math.abs(strong.median - 0.15)).toBeLessThan(Math.abs(flat.median - 0.15));
    const width = 0.995 / 400;
    expect(Math.abs(strong.density.reduce((s, d) => s + d.posterior * width, 0) - 1)).toBeLessThan(1e-12);
    expect(Math.abs(strong.density.reduce((s, d) => s + d.prior * width, 0) - 1)).toBeLessThan(1e-9);
  });

  it('refuses a prior with zero mass, or without a supervisory correlation, with a sentence', () => {
    const panel = { obligors: [500, 500], defaults: [0, 1] };
    expect(() => rhoPriorLaw({ kind: 'beta', a: 0, b: 3 }, null)).toThrow(/no mass inside/);
    expect(() => rhoPriorLaw({ kind: 'supervisory', strength: 20 }, null)).toThrow(/asset class/);
    expect(() => rhoPosterior(panel, { prior: { a: 1e7, b: 1, label: 'beta:1e7,1' } })).toThrow(/no probability on rho/);
    expect(() => rhoPosterior(panel, { prior: { a: 1, b: 1, label: 'flat' }, pdPrior: { a: 0.5, b: 1 } })).toThrow(/a >= 1/);
  });
});
