import { describe, expect, it } from 'vitest';
import { benchmarkOf } from '@/lib/fits/run';
import { isCurrentResults } from '@/lib/fits/results';
import { alternativeWindows, compareWindows } from '@/lib/fits/windows';
import { fitPanel } from '@/lib/stats/fit-panel';

const years = (n: number, from = 2000) => Array.from({ length: n }, (_, i) => String(from + i));

describe('alternativeWindows', () => {
  it('T = 5: only the whole window (too short to leave a year out)', () => {
    expect(alternativeWindows(years(5), [0.01, 0.02, 0.03, 0.02, 0.01]).map((w) => w.label)).toEqual(['Whole window']);
  });

  it('T = 10: the worst period is the one with the highest default rate, named by its label', () => {
    const rates = [0.01, 0.02, 0.05, 0.03, 0.01, 0.02, 0.01, 0.04, 0.02, 0.01];
    const w = alternativeWindows(years(10), rates);
    expect(w.map((x) => x.label)).toEqual(['Whole window', 'Without the worst period (2002)']);
    expect(w[1].idx).toEqual([0, 1, 3, 4, 5, 6, 7, 8, 9]);
  });

  it('T = 13: also the last 10 and the two halves (6 and 7 periods)', () => {
    const w = alternativeWindows(years(13), Array(13).fill(0.01));
    expect(w.map((x) => x.label)).toEqual(['Whole window', 'Without the worst period (2000)', 'Last 10 periods', 'First half', 'Second half']);
    expect(w[2].idx).toEqual([3, 4, 5, 6, 7, 8, 9, 10, 11, 12]);
    expect(w[3].idx).toEqual([0, 1, 2, 3, 4, 5]);
    expect(w[4].idx).toEqual([6, 7, 8, 9, 10, 11, 12]);
  });
});

describe('compareWindows', () => {
  // Panel A (binomialMle rho 0.037091 computed with SciPy 1.17 by tests/fixtures/engine/make_fixtures.py).
  const panelA = {
    segment: 'A',
    periods: years(10, 2010),
    obligors: [1000, 1050, 1100, 980, 1020, 1200, 1150, 1080, 990, 1010],
    defaults: [8, 12, 25, 30, 9, 5, 14, 20, 11, 6],
  };

  it('the whole window repeats the segment fit; leaving out 2013 (30 of 980) lowers rho (the most extreme year of the panel)', () => {
    const whole = fitPanel(panelA, { level: 0.95 });
    const w = compareWindows(panelA, whole, 0.95);
    expect(w[0].binomialMle.rho).toBeCloseTo(0.037091, 5);
    expect(w[1].label).toBe('Without the worst period (2013)');
    expect(w[1].T).toBe(9);
    expect(w[1].periods).not.toContain('2013');
    expect(w[1].binomialMle.rho!).toBeLessThan(w[0].binomialMle.rho!);
    // The window's fit is the engine's fit of the sub-panel.
    const sub = fitPanel({ ...panelA, periods: panelA.periods.filter((_, i) => i !== 3), obligors: panelA.obligors.filter((_, i) => i !== 3), defaults: panelA.defaults.filter((_, i) => i !== 3) });
    expect(w[1].binomialMle.rho).toBe(sub.estimates.binomialMle.rho);
    expect(w[1].jointDefault).toBe(sub.estimates.jointDefault!.rho);
  });
});

describe('benchmarkOf', () => {
  const base = { segment: 'S', periods: ['2020'], obligors: [10], defaults: [1] };
  it('no asset class: no benchmark and no warning', () => {
    expect(benchmarkOf({ ...base, assetClass: 'none' })).toEqual({ assetClass: null, turnoverMillions: null, warning: null });
  });
  it('SME corporate without turnover: no benchmark, and a warning saying why (BCBS 2006 para 273 needs the turnover)', () => {
    const b = benchmarkOf({ ...base, assetClass: 'sme-corporate', turnoverEurMillions: null });
    expect(b.assetClass).toBeNull();
    expect(b.warning?.code).toBe('sme-turnover-missing');
  });
  it('SME corporate with turnover passes it on; other classes pass none', () => {
    expect(benchmarkOf({ ...base, assetClass: 'sme-corporate', turnoverEurMillions: 20 })).toMatchObject({ assetClass: 'sme-corporate', turnoverMillions: 20, warning: null });
    expect(benchmarkOf({ ...base, assetClass: 'other-retail', turnoverEurMillions: 20 })).toMatchObject({ assetClass: 'other-retail', turnoverMillions: null });
  });
});

describe('isCurrentResults', () => {
  it('refuses the interim layout (no observed, profileCurve, windows, estimatorAudit) and accepts the current one', () => {
    expect(isCurrentResults({ engine: { version: 'rhobook-fit 0.2 (interim engine)' }, segments: [{ segment: 'A', profile: {}, audit: null, windows: [] }] })).toBe(false);
    expect(isCurrentResults(null)).toBe(false);
    const fit = fitPanel({ segment: 'A', periods: ['1', '2', '3', '4', '5'], obligors: [100, 100, 100, 100, 100], defaults: [1, 3, 2, 5, 1] });
    expect(isCurrentResults({ engine: { version: '1' }, segments: [{ ...fit, windows: [] }] })).toBe(true);
  });
});
