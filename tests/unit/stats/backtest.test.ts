import { readFileSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { backtestPublished } from '@/lib/stats/backtest';

type Case = {
  name: string;
  p: number;
  rho: number;
  obligors: number[];
  defaults: number[];
  q95: number;
  q99: number;
  years: { logLik: number; tailProbability: number; midPit: number }[];
  above95: number;
  above99: number;
  pAtLeast95: number;
  pAtLeast99: number;
};

// Computed with SciPy 1.17 by tests/fixtures/monitoring/make_backtest.py (brute-force quad over
// the factor of binom.pmf / sf / cdf; norm for the quantile; binom.sf for the exceedance tail).
const fixtures = JSON.parse(readFileSync(path.join(import.meta.dirname, '../../fixtures/monitoring/backtest-fixtures.json'), 'utf8')) as {
  scipy: string;
  cases: Case[];
};

describe('backtest of a published (p, rho) on new years', () => {
  it('the fixture names its SciPy', () => {
    expect(fixtures.scipy).toMatch(/^1\.17/);
  });

  for (const c of fixtures.cases) {
    it(`${c.name}: quantiles, exceedances, likelihood, tail probability and mid-PIT against SciPy`, () => {
      const r = backtestPublished({ obligors: c.obligors, defaults: c.defaults }, c.p, c.rho);
      expect(r.years[0].q95).toBeCloseTo(c.q95, 12);
      expect(r.years[0].q99).toBeCloseTo(c.q99, 12);
      expect(r.exceedances.above95).toBe(c.above95);
      expect(r.exceedances.above99).toBe(c.above99);
      expect(r.exceedances.pAtLeast95).toBeCloseTo(c.pAtLeast95, 12);
      expect(r.exceedances.pAtLeast99).toBeCloseTo(c.pAtLeast99, 12);
      r.years.forEach((y, t) => {
        expect(Math.abs(y.logLik - c.years[t].logLik), `logLik year ${t + 1}`).toBeLessThan(1e-8);
        expect(Math.abs(y.tailProbability - c.years[t].tailProbability), `P(D >= d) year ${t + 1}`).toBeLessThan(1e-8);
        expect(Math.abs(y.midPit - c.years[t].midPit), `mid-PIT year ${t + 1}`).toBeLessThan(1e-8);
      });
      expect(r.logLik).toBeCloseTo(
        c.years.reduce((s, y) => s + y.logLik, 0),
        7,
      );
    });
  }

  it('properties: P(D >= d) falls as d rises; a year at the 99% quantile exceeds the 95% one; the expected counts are T (1 - a)', () => {
    const r = backtestPublished({ obligors: [1000, 1000, 1000, 1000], defaults: [5, 20, 40, 80] }, 0.02, 0.08);
    const tails = r.years.map((y) => y.tailProbability);
    for (let i = 1; i < tails.length; i++) expect(tails[i]).toBeLessThan(tails[i - 1]);
    for (const y of r.years) if (y.above99) expect(y.above95).toBe(true);
    expect(r.exceedances.expected95).toBeCloseTo(0.2, 12);
    expect(r.exceedances.expected99).toBeCloseTo(0.04, 12);
    // No exceedance at all is certain to be "at least 0".
    const calm = backtestPublished({ obligors: [1000], defaults: [20] }, 0.02, 0.08);
    expect(calm.exceedances.pAtLeast99).toBe(1);
  });

  it('refuses what it cannot test, with a sentence', () => {
    expect(() => backtestPublished({ obligors: [100], defaults: [1] }, 0, 0.1)).toThrow(RangeError);
    expect(() => backtestPublished({ obligors: [100], defaults: [1] }, 0.01, 1)).toThrow(/rho must be in \[0, 1\)/);
    expect(() => backtestPublished({ obligors: [], defaults: [] }, 0.01, 0.1)).toThrow(/at least one year/);
    expect(() => backtestPublished({ obligors: [100, 50], defaults: [1, 60] }, 0.01, 0.1)).toThrow(/year 2 has obligors = 50 and defaults = 60/);
  });
});
