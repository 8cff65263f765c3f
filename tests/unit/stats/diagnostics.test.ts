import { describe, expect, it } from 'vitest';
import engine from '@/tests/fixtures/engine/engine-fixtures.json';
import ref from '@/tests/fixtures/engine/diagnostics-fixtures.json';
import pitRef from '@/tests/fixtures/engine/pit-fixtures.json';
import { autocorrelationThreshold, lag1Autocorrelation } from '@/lib/stats/autocorrelation';
import { capitalImplications } from '@/lib/stats/capital-implications';
import { panelDiagnostics, type FittedMle } from '@/lib/stats/diagnostics';
import { lrTestRhoZero } from '@/lib/stats/lr-test';

type Name = keyof typeof ref.panels;
const names = Object.keys(ref.panels) as Name[];

function rel(a: number, b: number): number {
  return b === 0 ? Math.abs(a) : Math.abs(a / b - 1);
}

/** Diagnostics evaluated at SciPy's own MLE, so both sides use identical inputs. */
function atScipy(name: Name) {
  const f = ref.panels[name];
  const p = engine.panels[name];
  const mle: FittedMle = { rho: f.rho, pd: f.pd, logLik: f.logLik, status: 'ok', atBoundary: f.rho === 0 };
  return panelDiagnostics({
    obligors: p.obligors,
    defaults: p.defaults,
    mle,
    logLikAtZero: f.logLik - f.lrStatistic / 2,
    logLikAtLimit: f.logLik - 1000,
    interval: { lower: f.interval[0], upper: f.interval[1] },
  });
}

describe('lrTestRhoZero', () => {
  it.each(names)('panel %s: p-value of the 50:50 chi2_0/chi2_1 mixture matches SciPy', (name) => {
    const f = ref.panels[name];
    const t = lrTestRhoZero(f.logLik, f.logLik - f.lrStatistic / 2);
    expect(Math.abs(t.statistic - f.lrStatistic)).toBeLessThan(1e-9);
    // computed with SciPy 1.17 (tests/fixtures/engine/make_diagnostics.py): 0.5 chi2.sf(s, 1)
    if (f.lrPValue === 0) expect(t.pValue).toBeLessThan(1e-300);
    else expect(rel(t.pValue, f.lrPValue)).toBeLessThan(1e-12);
  });

  it('gives 5% at the chi-square(1) upper 10% point and 1 at a statistic of 0', () => {
    // A&S Table 26.8: chi2_1 upper 10% point 2.70554; under the 50:50 mixture its tail is 5%
    // (Self & Liang 1987, case 5).
    expect(lrTestRhoZero(-10, -10 - 2.705543 / 2).pValue).toBeCloseTo(0.05, 6);
    expect(lrTestRhoZero(-10, -10).pValue).toBe(1); // definition: P(S >= 0) = 1
  });

  it('refuses a maximum beaten at rho = 0 and non-finite input', () => {
    expect(() => lrTestRhoZero(-20, -19)).toThrow(/not a maximum/);
    expect(() => lrTestRhoZero(Number.NaN, -19)).toThrow(RangeError);
    expect(lrTestRhoZero(-20, -20 - 1e-12).statistic).toBeGreaterThan(0);
    expect(lrTestRhoZero(-20, -20 + 1e-13).statistic).toBe(0); // rounding-level negative is 0
  });
});

describe('lag1Autocorrelation', () => {
  it('matches hand computations', () => {
    // worked by hand: m = 2.5, numerator 1.25, denominator 5
    expect(lag1Autocorrelation([1, 2, 3, 4])).toBeCloseTo(0.25, 15);
    // worked by hand: alternating series, m = 0, numerator -3, denominator 4
    expect(lag1Autocorrelation([1, -1, 1, -1])).toBeCloseTo(-0.75, 15);
  });
  it('refuses short, constant or non-finite series', () => {
    expect(() => lag1Autocorrelation([1, 2])).toThrow(RangeError);
    expect(() => lag1Autocorrelation([3, 3, 3])).toThrow(/constant/);
    expect(() => lag1Autocorrelation([1, Number.POSITIVE_INFINITY, 2])).toThrow(/value 2/);
  });
  it('threshold is the 5% band 1.96 / sqrt(T)', () => {
    expect(autocorrelationThreshold(20)).toBeCloseTo(0.4383, 4); // common practice (Bartlett 1946 band)
    expect(() => autocorrelationThreshold(0)).toThrow(RangeError);
  });
});

describe('panelDiagnostics at the SciPy estimates', () => {
  it.each(names)('panel %s: implied factor, autocorrelation, PIT and exceedances match SciPy', (name) => {
    const f = ref.panels[name] as (typeof ref.panels)['A'];
    const { diagnostics: d } = atScipy(name);
    const p = engine.panels[name];
    expect(d.zeroDefaultPeriods).toBe(p.defaults.filter((x) => x === 0).length);
    // computed with SciPy 1.17 (tests/fixtures/engine/make_pit.py: quad of binom.cdf and binom.pmf
    // over the factor): the mid-PIT of each count under the fitted binomial mixture
    pitRef.panels[name].pit.forEach((u, t) => expect(Math.abs(d.pit![t] - u), `period ${t + 1}`).toBeLessThan(1e-9));
    expect(d.pitMethod).toMatch(/mid-PIT of the default count/);
    if (f.rho === 0) {
      expect(d.impliedFactor).toBeNull();
      expect(d.fittedNote).toMatch(/point mass/);
      return;
    }
    // computed with SciPy 1.17 (tests/fixtures/engine/make_diagnostics.py)
    f.impliedFactor.forEach((x, t) => {
      if (x === null) expect(d.impliedFactor![t]).toBeNull();
      else expect(Math.abs(d.impliedFactor![t]! - x)).toBeLessThan(1e-10);
    });
    if (f.lag1Autocorrelation === null) expect(d.lag1Autocorrelation).toBeNull();
    else expect(Math.abs(d.lag1Autocorrelation! - f.lag1Autocorrelation)).toBeLessThan(1e-10);
    expect(rel(d.exceedances!.q95, f.q95)).toBeLessThan(1e-12);
    expect(rel(d.exceedances!.q99, f.q99)).toBeLessThan(1e-12);
    expect(d.exceedances!.above95).toBe(f.above95);
    expect(d.exceedances!.above99).toBe(f.above99);
    for (const [key, q] of Object.entries(f.bands)) expect(rel(d.bands![key as keyof typeof f.bands], q)).toBeLessThan(1e-12);
  });
});

describe('capitalImplications', () => {
  it.each(names.filter((n) => ref.panels[n].rho > 0))('panel %s: quantile999 and capital K match SciPy', (name) => {
    const f = ref.panels[name] as (typeof ref.panels)['A'];
    const iv = { lower: f.interval[0], upper: f.interval[1] };
    const plain = capitalImplications(f.pd, f.rho, iv);
    // computed with SciPy 1.17 (make_diagnostics.py), BCBS 2006 para 272 with LGD 0.45
    expect(rel(plain.quantile999, f.quantile999)).toBeLessThan(1e-12);
    expect(plain.lgd).toBe(0.45);
    expect(plain.maturityYears).toBeNull();
    const c = plain.capital;
    [c.atEstimate, c.atLower!, c.atUpper!].forEach((k, i) => expect(Math.abs(k - f.capital.noMaturity[i])).toBeLessThan(1e-13 + 1e-11 * f.capital.noMaturity[i]));
    const corp = capitalImplications(f.pd, f.rho, iv, { maturityYears: 2.5, assetClass: 'corporate' });
    const m = corp.capital;
    [m.atEstimate, m.atLower!, m.atUpper!].forEach((k, i) => expect(Math.abs(k - f.capital.maturity25[i])).toBeLessThan(1e-13 + 1e-11 * f.capital.maturity25[i]));
    expect(rel(corp.supervisory!.rho, f.supervisoryCorporate.rho)).toBeLessThan(1e-12);
    expect(rel(corp.supervisory!.capital, f.supervisoryCorporate.capitalMaturity25)).toBeLessThan(1e-11);
    expect(corp.convention).toMatch(/LGD 0\.45.*M = 2\.5.*without the 1\.06/);
    // computed with SciPy 1.17 (scipy.stats.multivariate_normal, Genz; make_diagnostics.py)
    expect(rel(plain.pair.joint, f.pair.joint)).toBeLessThan(1e-9);
    expect(rel(plain.pair.defaultCorrelation, f.pair.defaultCorrelation)).toBeLessThan(1e-8);
    expect(plain.pair.independent).toBe(f.pd * f.pd);
  });

  it('is 0 at an interval end of 0 and null without an interval', () => {
    const r = capitalImplications(0.0025609, 0.0626, { lower: 0, upper: 0.344 });
    expect(r.capital.atLower).toBe(0); // BCBS 2006 para 272 formula: no correlation, no unexpected loss
    expect(capitalImplications(0.01, 0.1, null).capital.atUpper).toBeNull();
    expect(() => capitalImplications(0.01, 1, null)).toThrow(RangeError);
  });
});

describe('warnings', () => {
  const mleOk = (rho: number, pd: number, logLik = -10): FittedMle => ({ rho, pd, logLik, status: 'ok', atBoundary: rho === 0 });
  const codes = (r: ReturnType<typeof panelDiagnostics>) => r.warnings.map((w) => w.code);

  it('names zero-default years and short series (panel B, T = 10 has none; T = 7 has one)', () => {
    expect(codes(atScipy('B'))).toEqual(['zero-default-periods']);
    const seven = panelDiagnostics({
      obligors: [500, 500, 500, 500, 500, 500, 500],
      defaults: [3, 5, 2, 8, 4, 6, 1],
      mle: mleOk(0.05, 0.0083),
      logLikAtZero: -15,
      logLikAtLimit: -60,
      interval: { lower: 0, upper: 0.2 },
    });
    expect(codes(seven)).toContain('short-series'); // DESIGN.md short-series caution: T < 10
    expect(codes(seven)).not.toContain('not-identified-short');
  });

  it('flags not identified: all-zero segment, T < 5, flat profile', () => {
    const none = panelDiagnostics({
      obligors: [100, 100, 100, 100, 100, 100],
      defaults: [0, 0, 0, 0, 0, 0],
      mle: { rho: null, pd: null, logLik: null, status: 'undefined', atBoundary: false },
      logLikAtZero: null,
      logLikAtLimit: null,
      interval: null,
    });
    expect(codes(none)).toEqual(['not-identified-no-defaults', 'short-series']); // T = 6 < 10
    expect(none.diagnostics.lrTestRhoZero).toBeNull();
    const four = panelDiagnostics({
      obligors: [100, 100, 100, 100],
      defaults: [1, 3, 0, 2],
      mle: mleOk(0.05, 0.015),
      logLikAtZero: -10.5,
      logLikAtLimit: -40,
      interval: { lower: 0, upper: 0.5 },
    });
    expect(codes(four)).toContain('not-identified-short');
    // flat: both ends of the profile within the 95% drop 1.9207 (A&S Table 26.8, chi2_1 / 2)
    const flat = panelDiagnostics({
      obligors: [1, 1, 1, 1, 1, 1],
      defaults: [0, 1, 0, 0, 1, 0],
      mle: mleOk(0, 1 / 3, -3.819),
      logLikAtZero: -3.819,
      logLikAtLimit: -3.819,
      interval: { lower: 0, upper: 0.995 },
    });
    expect(codes(flat)).toContain('not-identified-flat');
    expect(codes(flat)).toContain('at-boundary');
  });

  it('flags material lag-1 autocorrelation of the implied factor, not panel A', () => {
    // A smooth cycle in the default rate: a persistent factor.
    const defaults = [50, 60, 80, 110, 150, 190, 220, 240, 230, 200, 160, 120, 90, 70, 55, 50];
    const r = panelDiagnostics({
      obligors: defaults.map(() => 10000),
      defaults,
      mle: mleOk(0.08, 0.013),
      logLikAtZero: -500,
      logLikAtLimit: -500,
      interval: { lower: 0.04, upper: 0.2 },
    });
    expect(r.diagnostics.lag1Autocorrelation!).toBeGreaterThan(0.7);
    const w = r.warnings.find((x) => x.code === 'autocorrelation');
    expect(w?.message).toMatch(/0\.49/); // threshold 1.96 / sqrt(16) = 0.49 (Bartlett 1946 band)
    expect(codes(atScipy('A'))).not.toContain('autocorrelation');
  });

  it('refuses mismatched panels naming the period', () => {
    expect(() =>
      panelDiagnostics({ obligors: [10, 10], defaults: [1, 11], mle: mleOk(0.1, 0.1), logLikAtZero: -1, logLikAtLimit: -1, interval: null }),
    ).toThrow(/period 2/);
  });
});
