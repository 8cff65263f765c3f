import { describe, expect, it } from 'vitest';
import engine from '@/tests/fixtures/engine/engine-fixtures.json';
import ref from '@/tests/fixtures/engine/diagnostics-fixtures.json';
import { completeSegmentFit, fitPanel, prepareSegmentFit, type PanelInput } from '@/lib/stats/fit-panel';
import { auditRange } from '@/lib/stats/audit';
import { bootstrapRange } from '@/lib/stats/intervals/bootstrap';
import { momentBootstrapRange } from '@/lib/stats/intervals/moment-bootstrap';
import { ESTIMATOR_KEYS } from '@/lib/stats/estimators/types';
import { ENGINE_VERSION } from '@/lib/stats/version';
import pitRef from '@/tests/fixtures/engine/pit-fixtures.json';

type Name = keyof typeof engine.panels;
const names = Object.keys(engine.panels) as Name[];
const years = (T: number) => Array.from({ length: T }, (_, t) => String(2001 + t));
const input = (name: Name): PanelInput => {
  const p = engine.panels[name];
  return { segment: `Panel ${name}`, periods: years(p.obligors.length), obligors: p.obligors, defaults: p.defaults };
};

describe('fitPanel: the worked panels of the engine specification', () => {
  it('panel A', () => {
    const f = fitPanel(input('A'));
    const m = f.estimates.binomialMle;
    // engine specification, computed with SciPy 1.17 (tolerances as stated there)
    expect(Math.abs(m.rho! - 0.037091)).toBeLessThan(1e-5);
    expect(Math.abs(m.pd! - 0.013307)).toBeLessThan(1e-5);
    expect(Math.abs(m.logLik! - -33.785195)).toBeLessThan(1e-5);
    expect(Math.abs(m.intervals.profile!.lower - 0.01177)).toBeLessThan(2e-3);
    expect(Math.abs(m.intervals.profile!.upper - 0.1147)).toBeLessThan(2e-3);
    expect(Math.abs(f.estimates.momentVariance!.rho! - 0.05111)).toBeLessThan(1e-6);
    expect(Math.abs(f.estimates.jointDefault!.rho! - 0.037745)).toBeLessThan(1e-6);
    expect(m.atBoundary).toBe(false);
    expect(m.intervals.bootstrap).toBeNull();
  });

  it('panel B', () => {
    const f = fitPanel(input('B'));
    const m = f.estimates.binomialMle;
    // engine specification, computed with SciPy 1.17
    expect(f.estimates.vasicekMle).toMatchObject({ rho: null, pd: null, status: 'undefined' });
    expect(f.estimates.vasicekMle!.reason).toMatch(/default rate of 0/);
    expect(Math.abs(m.rho! - 0.06262)).toBeLessThan(1e-5);
    expect(Math.abs(m.pd! - 0.002561)).toBeLessThan(1e-6);
    expect(m.intervals.profile!.lower).toBe(0);
    expect(Math.abs(m.intervals.profile!.upper - 0.344)).toBeLessThan(2e-3);
    expect(Math.abs(f.estimates.jointDefault!.rho! - 0.050346)).toBeLessThan(1e-6);
    expect(f.warnings.map((w) => w.code)).toContain('zero-default-periods');
    expect(f.diagnostics.zeroDefaultPeriods).toBe(4);
    expect(f.diagnostics.lag1Autocorrelation).toBeNull(); // x_t infinite in zero-default years
  });
});

describe('fitPanel against the SciPy fixtures', () => {
  it.each(names)('panel %s: estimates, intervals, LR test and implications', (name) => {
    const f = fitPanel(input(name), { assetClass: 'corporate' });
    const e = engine.panels[name];
    const d = ref.panels[name] as (typeof ref.panels)['A'];
    const m = f.estimates.binomialMle;
    // computed with SciPy 1.17 (tests/fixtures/engine/make_fixtures.py, make_diagnostics.py)
    expect(Math.abs(m.rho! - e.binomialMle.rho)).toBeLessThan(1e-5);
    expect(Math.abs(m.logLik! - e.binomialMle.logLik)).toBeLessThan(1e-5);
    expect(Math.abs(m.intervals.profile!.lower - e.binomialMle.profile95[0])).toBeLessThan(1e-5);
    expect(Math.abs(m.intervals.profile!.upper - e.binomialMle.profile95[1])).toBeLessThan(1e-5);
    if ('se' in e.binomialMle) expect(Math.abs(m.intervals.wald!.se / (e.binomialMle as { se: number }).se - 1)).toBeLessThan(1e-2);
    else expect(m.intervals.wald).toBeNull(); // DESIGN.md: no Wald interval at the boundary
    for (const key of ['momentVariance', 'momentVarianceCorrected', 'jointDefault'] as const) {
      const want = e[key].rho;
      if (want === null) expect(f.estimates[key]!.rho).toBeNull();
      else expect(Math.abs(f.estimates[key]!.rho! - want)).toBeLessThan(1e-9);
    }
    if (e.vasicekMle === null) expect(f.estimates.vasicekMle!.status).toBe('undefined');
    else expect(Math.abs(f.estimates.vasicekMle!.rho! - e.vasicekMle.rho)).toBeLessThan(1e-12);
    const lr = f.diagnostics.lrTestRhoZero!;
    expect(Math.abs(lr.statistic - e.lrTest.statistic)).toBeLessThan(2e-5);
    const im = f.implications!;
    // capital at our estimate vs SciPy's: the estimates agree to ~1e-6, so K to ~1e-4 relative
    expect(Math.abs(im.quantile999 / (d.quantile999 ?? e.binomialMle.pd) - 1)).toBeLessThan(1e-4);
    if (d.capital) expect(Math.abs(im.capital.atEstimate / d.capital.maturity25[0] - 1)).toBeLessThan(1e-4);
    expect(im.maturityYears).toBe(2.5); // corporate: maturity adjustment at 2.5 years (BCBS 2006 para 318)
    expect(im.supervisory!.assetClass).toBe('corporate');
  });
});

describe('the SegmentFit shape', () => {
  const f = fitPanel(input('A'));

  it('carries the per-segment fields of the CLI, the observed series and the engine keys', () => {
    // every model by default: every estimator, in display order
    expect(Object.keys(f.estimates)).toEqual([...ESTIMATOR_KEYS]);
    expect(f.models).toEqual(['independent', 'ar1']);
    expect(f).toMatchObject({ segment: 'Panel A', T: 10, periods: years(10), level: 0.95 });
    expect(f.observed[2]).toEqual({ period: '2003', obligors: 1100, defaults: 25, dr: 25 / 1100 });
    expect(ENGINE_VERSION).toMatch(/^\d+\.\d+\.\d+$/);
    expect(JSON.parse(JSON.stringify(f))).toEqual(f); // plain JSON, no undefined or NaN hiding
  });

  it('profile curve: ~40 points from 0, increasing, never above the maximum', () => {
    const c = f.profileCurve;
    expect(c.length).toBeGreaterThanOrEqual(40);
    expect(c.length).toBeLessThanOrEqual(45);
    expect(c[0].rho).toBe(0);
    for (let i = 1; i < c.length; i++) expect(c[i].rho).toBeGreaterThan(c[i - 1].rho);
    const top = f.estimates.binomialMle.logLik!;
    // property: the reported maximum is not beaten by any curve point
    for (const p of c) expect(p.logLik).toBeLessThanOrEqual(top + 1e-9);
    expect(c.some((p) => p.rho === f.estimates.binomialMle.rho)).toBe(true);
    // the interval ends lie on the curve at the cut-off chi2_1(0.95)/2 = 1.9207 below the top (A&S Table 26.8)
    const atUpper = c.find((p) => p.rho === f.estimates.binomialMle.intervals.profile!.upper)!;
    expect(Math.abs(top - atUpper.logLik - 1.9207294)).toBeLessThan(1e-4);
    expect(Math.abs(f.profileCutoff! - (top - 1.9207294))).toBeLessThan(1e-6); // A&S Table 26.8
  });

  it('intervals at another level', () => {
    const g = fitPanel(input('A'), { level: 0.9 });
    const e = engine.panels.A.binomialMle.profile90;
    // computed with SciPy 1.17 (make_fixtures.py, level 0.90)
    expect(Math.abs(g.estimates.binomialMle.intervals.profile!.lower - e[0])).toBeLessThan(1e-5);
    expect(Math.abs(g.estimates.binomialMle.intervals.profile!.upper - e[1])).toBeLessThan(1e-5);
    expect(g.estimates.binomialMle.intervals.wald!.level).toBe(0.9);
  });
});

describe('edge panels', () => {
  it('at the boundary (panel F): no Wald interval, no implied factor, the PIT under the binomial, warning', () => {
    const f = fitPanel(input('F'));
    expect(f.estimates.binomialMle).toMatchObject({ rho: 0, atBoundary: true });
    expect(f.estimates.binomialMle.intervals.wald).toBeNull();
    expect(f.diagnostics.impliedFactor).toBeNull();
    expect(f.diagnostics.autocorrelationNote).toMatch(/no implied factor/);
    // at rho = 0 the fitted count law is Binomial(n, p): computed with SciPy 1.17 (make_pit.py, binom.cdf/pmf)
    pitRef.panels.F.pit.forEach((u, t) => expect(Math.abs(f.diagnostics.pit![t] - u)).toBeLessThan(1e-9));
    expect(f.diagnostics.lrTestRhoZero).toEqual({ statistic: 0, pValue: 1 }); // SciPy fixture: statistic 0
    expect(f.warnings.map((w) => w.code)).toContain('at-boundary');
  });

  it('one obligor per period: rho is not identified (flat profile)', () => {
    // The model: with n_t = 1, P(d_t = 1) = p whatever rho (DESIGN.md), so the likelihood is flat in rho.
    const f = fitPanel({ segment: 'single', periods: years(8), obligors: [1, 1, 1, 1, 1, 1, 1, 1], defaults: [0, 1, 0, 0, 1, 0, 0, 0] });
    expect(f.warnings.map((w) => w.code)).toContain('not-identified-flat');
    expect(f.estimates.binomialMle.intervals.profile).toMatchObject({ lower: 0, upperAtSearchLimit: true });
  });

  it('no defaults: binomialMle undefined, no intervals or implications, bootstrap unavailable', () => {
    const f = fitPanel(
      { segment: 'quiet', periods: years(6), obligors: [100, 100, 100, 100, 100, 100], defaults: [0, 0, 0, 0, 0, 0] },
      { bootstrap: { replications: 10, seed: 1 } },
    );
    expect(f.estimates.binomialMle).toMatchObject({ rho: null, pd: null, status: 'undefined', logLik: null });
    expect(f.estimates.binomialMle.intervals).toEqual({ profile: null, wald: null, bootstrap: null });
    expect(f.implications).toBeNull();
    expect(f.profileCurve).toEqual([]);
    expect(f.profileCutoff).toBeNull();
    expect(f.warnings.map((w) => w.code)).toEqual(expect.arrayContaining(['not-identified-no-defaults', 'bootstrap-unavailable']));
  });

  it('refuses bad input naming the segment and period', () => {
    const ok = input('A');
    expect(() => fitPanel({ ...ok, defaults: [...ok.defaults.slice(0, 9), 2000] })).toThrow(/"Panel A", period 2010: defaults = 2000/);
    expect(() => fitPanel({ ...ok, periods: [...ok.periods.slice(0, 9), '2001'] })).toThrow(/period 2001 twice/);
    expect(() => fitPanel({ ...ok, obligors: ok.obligors.slice(1) })).toThrow(/one of each per period/);
    expect(() => fitPanel(ok, { level: 95 })).toThrow(/level/);
    expect(() => fitPanel(ok, { bootstrap: { replications: 1, seed: 1 } })).toThrow(/replications/);
  });
});

describe('bootstrap and audit in fitPanel', () => {
  it('equal prepare + any split of the replications + complete', () => {
    const opts = { models: ['independent'] as const, bootstrap: { replications: 12, seed: 42 }, audit: { replications: 6, seed: 43 } };
    const whole = fitPanel(input('A'), { ...opts, models: [...opts.models] });
    const prepared = prepareSegmentFit(input('A'), { ...opts, models: [...opts.models] });
    const spec = prepared.bootstrap!.spec;
    const reps = [...bootstrapRange(spec, 7, 12), ...bootstrapRange(spec, 0, 7)];
    const audit = [...auditRange(prepared.audit!.spec, 4, 6), ...auditRange(prepared.audit!.spec, 0, 4)];
    // the moment estimators' bootstraps follow --bootstrap (each at its own estimate)
    expect(prepared.momentBootstraps.map((m) => m.estimator)).toEqual(['momentVariance', 'momentVarianceCorrected', 'jointDefault']);
    const momentBootstraps = Object.fromEntries(
      prepared.momentBootstraps.map((m) => [m.estimator, [...momentBootstrapRange(m.spec, 5, 12), ...momentBootstrapRange(m.spec, 0, 5)]]),
    );
    expect(completeSegmentFit(prepared, { bootstrap: reps, audit, momentBootstraps })).toEqual(whole);
    const b = whole.estimates.binomialMle.intervals.bootstrap!;
    expect(b).toMatchObject({ level: 0.95, replications: 12, seed: 42, failed: 0 });
    expect(b.lower).toBeLessThanOrEqual(b.upper);
    // the audit simulates at the fitted values with the segment's own n_t (DESIGN.md estimator audit)
    expect(whole.estimatorAudit).toMatchObject({ replications: 6, seed: 43, periods: 10 });
    expect(whole.estimatorAudit!.truth).toEqual({ pd: whole.estimates.binomialMle.pd, rho: whole.estimates.binomialMle.rho });
    expect(() => completeSegmentFit(prepared, { bootstrap: reps, momentBootstraps })).toThrow(/audit replications are missing/);
    expect(() => completeSegmentFit(prepared, { bootstrap: reps, audit })).toThrow(/momentVariance bootstrap replications are missing/);
    expect(() => completeSegmentFit(prepareSegmentFit(input('A')), { bootstrap: reps })).toThrow(/did not plan a bootstrap/);
  });

  it('no audit without an estimate, and none unless asked for', () => {
    expect(fitPanel(input('A')).estimatorAudit).toBeNull();
    const f = fitPanel(
      { segment: 'quiet', periods: years(6), obligors: [100, 100, 100, 100, 100, 100], defaults: [0, 0, 0, 0, 0, 0] },
      { audit: { replications: 5, seed: 1 } },
    );
    expect(f.estimatorAudit).toBeNull();
    expect(f.warnings.map((w) => w.code)).toContain('audit-unavailable');
    expect(() => fitPanel(input('A'), { audit: { replications: 1, seed: 1 } })).toThrow(/audit needs/);
  });
});
