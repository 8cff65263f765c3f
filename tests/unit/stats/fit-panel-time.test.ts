import { describe, expect, it } from 'vitest';
import engine from '@/tests/fixtures/engine/engine-fixtures.json';
import ar1Fixtures from '@/tests/fixtures/time/ar1-mle-fixtures.json';
import chiFixtures from '@/tests/fixtures/time/chi-square-fixtures.json';
import { auditRange } from '@/lib/stats/audit';
import { momentTarget } from '@/lib/stats/estimators/moment-target';
import { completeSegmentFit, fitPanel, prepareSegmentFit, type PanelInput } from '@/lib/stats/fit-panel';
import { completeBreakTest } from '@/lib/stats/fit-stability';
import { ar1Fit } from '@/lib/stats/intervals/ar1-intervals';
import { momentBootstrapRange, summariseMomentBootstrap } from '@/lib/stats/intervals/moment-bootstrap';
import { createRng, deriveSeed } from '@/lib/stats/random';
import { simulatePanel } from '@/lib/stats/simulate';
import { breakTestRange, supLrStatistic } from '@/lib/stats/stability/break-test';
import { jackknife } from '@/lib/stats/stability/jackknife';
import { rollingWindow } from '@/lib/stats/stability/rolling-window';

const years = (T: number, from = 2001) => Array.from({ length: T }, (_, t) => String(from + t));
const A = engine.panels.A;
const panelA: PanelInput = { segment: 'Panel A', periods: years(10), obligors: A.obligors, defaults: A.defaults };
const E = engine.panels.E;
const panelE: PanelInput = { segment: 'Panel E', periods: years(20), obligors: E.obligors, defaults: E.defaults };

describe('fitPanel: the models to run', () => {
  it('runs the independent model alone: its five estimators and the stability block, no AR(1) parts', () => {
    const f = fitPanel(panelA, { models: ['independent'] });
    expect(f.models).toEqual(['independent']);
    expect(Object.keys(f.estimates)).toEqual(['binomialMle', 'vasicekMle', 'momentVariance', 'momentVarianceCorrected', 'jointDefault']);
    expect(f.stability).not.toBeNull();
    expect(f.diagnostics.lrTestPhi0).toBeNull();
    expect(f.diagnostics.lrTestPhi0Note).toMatch(/AR\(1\) model was not among the models/);
  });

  it('runs the AR(1) model alone: binomialMle (its nested null), ar1Mle and the corrected moments, no stability block (DESIGN.md)', () => {
    const f = fitPanel(panelA, { models: ['ar1'] });
    expect(f.models).toEqual(['ar1']);
    expect(Object.keys(f.estimates)).toEqual(['binomialMle', 'momentVarianceAutocorrected', 'ar1Mle']);
    expect(f.stability).toBeNull();
  });

  it('refuses an unknown or repeated model with a sentence', () => {
    expect(() => fitPanel(panelA, { models: [] })).toThrow(/at least one model/);
    expect(() => fitPanel(panelA, { models: ['garch' as 'ar1'] })).toThrow(/unknown model "garch"/);
    expect(() => fitPanel(panelA, { models: ['ar1', 'ar1'] })).toThrow(/named twice/);
  });
});

describe('fitPanel: an interval for every estimator', () => {
  it("gives vasicekMle its chi-square interval (SciPy, make_chi_square.py) with the approximation stated", () => {
    const f = fitPanel(panelA, { models: ['independent'] });
    const want = chiFixtures.cases.find((c) => c.panel === 'A' && c.level === 0.95)!;
    const chi = f.estimates.vasicekMle!.intervals.chiSquare!;
    // computed with SciPy 1.17 by tests/fixtures/time/make_chi_square.py
    expect(Math.abs(chi.lower - want.lower)).toBeLessThan(1e-10);
    expect(Math.abs(chi.upper - want.upper)).toBeLessThan(1e-10);
    expect(chi.approximation).toMatch(/large-pool/);
  });

  it('says why vasicekMle has no chi-square interval on zero-default years', () => {
    const B = engine.panels.B;
    const f = fitPanel({ segment: 'B', periods: years(10), obligors: B.obligors, defaults: B.defaults }, { models: ['independent'] });
    expect(f.estimates.vasicekMle!.intervals.chiSquare).toBeNull();
    expect(f.estimates.vasicekMle!.intervalNotes!.chiSquare).toMatch(/default rate of 0/);
  });

  it("bootstraps each moment estimator at its own estimate: DESIGN.md's interval from the replications by definition", () => {
    const f = fitPanel(panelA, { bootstrap: { replications: 40, seed: 11 } });
    for (const key of ['momentVariance', 'momentVarianceCorrected', 'jointDefault'] as const) {
      const e = f.estimates[key]!;
      // definition (DESIGN.md): simulate at the estimator's own (p, rho) with the same n_t, seeded
      const spec = { estimator: key, obligors: A.obligors, pd: e.pd!, rho: e.rho!, seed: 11 };
      const want = summariseMomentBootstrap(momentBootstrapRange(spec, 0, 40), spec, 0.95);
      if (want.status !== 'ok') throw new Error(`${key}: the bootstrap of panel A should have an interval`);
      const { status: _status, ...interval } = want;
      expect(e.intervals.bootstrap).toEqual({ ...interval, seed: 11 });
    }
    // the autocorrected estimator simulates the persistence its correction assumed (phi = the r_1 it used)
    const auto = f.estimates.momentVarianceAutocorrected!;
    const r1 = (momentTarget('momentVarianceAutocorrected', A) as { correction: { lag1Used: number } }).correction.lag1Used;
    expect(auto.correction!.lag1Used).toBe(r1);
    const spec = { estimator: 'momentVarianceAutocorrected' as const, obligors: A.obligors, pd: auto.pd!, rho: auto.rho!, seed: 11, phi: r1 };
    const want = summariseMomentBootstrap(momentBootstrapRange(spec, 0, 40), spec, 0.95) as { lower: number; upper: number };
    expect(auto.intervals.bootstrap).toMatchObject({ lower: want.lower, upper: want.upper, replications: 40 });
  });

  it('says why a moment estimator has no bootstrap when it has no value', () => {
    // every rate equal: no variance to match (momentVariance undefined), the corrected one clipped at 0
    const flat: PanelInput = { segment: 'flat', periods: years(10), obligors: new Array(10).fill(1000), defaults: new Array(10).fill(10) };
    const f = fitPanel(flat, { models: ['independent'], bootstrap: { replications: 20, seed: 1 } });
    expect(f.estimates.momentVariance!.intervals.bootstrap).toBeNull();
    expect(f.estimates.momentVariance!.intervalNotes!.bootstrap).toMatch(/no value on these data/);
    // clipped at rho = 0 is a value (DESIGN.md), so its bootstrap runs
    expect(f.estimates.momentVarianceCorrected!.status).toBe('clipped');
    expect(f.estimates.momentVarianceCorrected!.intervals.bootstrap!.replications).toBe(20);
  });
});

describe('fitPanel: the persistent factor', () => {
  it('reports ar1Mle as the SciPy maximum (make_ar1_mle.py) with its fields and the LR test of phi = 0', () => {
    const f = fitPanel(panelA, { models: ['ar1'] });
    const a = f.estimates.ar1Mle!;
    const want = ar1Fixtures.cases.find((c) => c.panel === 'A')!;
    // computed with SciPy 1.17 (Nelder-Mead on a brute-force grid recursion) by make_ar1_mle.py
    expect(Math.abs(a.logLik! - want.ar1.logLik)).toBeLessThan(1e-4);
    expect(Math.abs(a.rho! - want.ar1.rho)).toBeLessThan(2e-3);
    expect(Math.abs(a.phi! - want.ar1.phi)).toBeLessThan(2e-2);
    expect(Math.abs(a.lrTestPhi0!.statistic - want.lrStatistic)).toBeLessThan(2e-4);
    expect(Object.keys(a)).toEqual(expect.arrayContaining(['rho', 'pd', 'phi', 'logLik', 'status', 'intervals', 'phiInterval', 'lrTestPhi0']));
    expect(a.intervals.profile).toMatchObject({ level: 0.95 });
    // the same as ar1Fit on the panel (one computation, reported as is)
    const direct = ar1Fit(A, { level: 0.95 });
    expect(a.intervals.profile).toEqual(direct.profile);
    expect(a.phiInterval).toEqual(direct.phiInterval);
    expect(a.phiProfile!.points).toEqual(direct.phiProfile);
    // the diagnostics carry the test as a serial-dependence check
    expect(f.diagnostics.lrTestPhi0).toEqual({ phi: a.phi, statistic: a.lrTestPhi0!.statistic, pValue: a.lrTestPhi0!.pValue });
    expect(f.diagnostics.lrTestPhi0Note).toBeNull();
  });

  it('warns that the independent intervals are too narrow when the LR test finds a persistent factor (phi = 0.8, seeded)', () => {
    // a panel simulated with a persistent factor: p = 2%, rho = 0.1, phi = 0.8, T = 20, n = 2000
    let found = false;
    for (let i = 0; i < 6 && !found; i++) {
      const sim = simulatePanel({ pd: 0.02, rho: 0.1, phi: 0.8, obligors: new Array(20).fill(2000) }, createRng(deriveSeed(77, i)));
      const f = fitPanel({ segment: 'persistent', periods: years(20), obligors: sim.obligors, defaults: sim.defaults }, { models: ['ar1'] });
      const lr = f.diagnostics.lrTestPhi0!;
      const warned = f.warnings.some((w) => w.code === 'persistent-factor');
      // the warning follows the test at 5% (definition) and says what it means
      expect(warned).toBe(lr.pValue < 0.05 && lr.phi !== null);
      if (warned) {
        expect(lr.phi!).toBeGreaterThan(0);
        expect(f.warnings.find((w) => w.code === 'persistent-factor')!.message).toMatch(/intervals are too narrow/);
        found = true;
      }
    }
    expect(found).toBe(true);
  });

  it('says why the test of phi = 0 did not run on a short panel', () => {
    const f = fitPanel({ segment: 'short', periods: years(5), obligors: A.obligors.slice(0, 5), defaults: A.defaults.slice(0, 5) });
    expect(f.estimates.ar1Mle).toMatchObject({ rho: null, status: 'undefined' });
    expect(f.estimates.ar1Mle!.reason).toMatch(/at least 6 periods/);
    expect(f.diagnostics.lrTestPhi0).toBeNull();
    expect(f.diagnostics.lrTestPhi0Note).toMatch(/^Not computed: the AR\(1\) model needs at least 6 periods/);
  });

  it("audits at ar1Mle's fitted (p, rho, phi) with the persistent-factor estimators when the AR(1) model runs", () => {
    const prepared = prepareSegmentFit(panelA, { models: ['independent', 'ar1'], audit: { replications: 4, seed: 5 } });
    const a = prepared.fit.estimates.ar1Mle!;
    expect(prepared.audit!.spec).toMatchObject({ pd: a.pd, rho: a.rho, phi: a.phi, persistent: true, seed: 5 });
    const fit = completeSegmentFit(prepared, { audit: auditRange(prepared.audit!.spec, 0, 4) });
    expect(fit.estimatorAudit!.truth).toEqual({ pd: a.pd, rho: a.rho, phi: a.phi });
    expect(fit.estimatorAudit!.persistent!.ar1Profile.level).toBe(0.95);
    // without the AR(1) model: binomialMle's (p, rho), independent years
    const plain = prepareSegmentFit(panelA, { models: ['independent'], audit: { replications: 4, seed: 5 } });
    const mle = plain.fit.estimates.binomialMle;
    expect(plain.audit!.spec).toEqual({ obligors: A.obligors, pd: mle.pd, rho: mle.rho, seed: 5, level: 0.95 });
  });
});

describe('fitPanel: stability across the window (DESIGN.md stability)', () => {
  it('is the jackknife, rolling window and break statistic of the panel, by their definitions', () => {
    const f = fitPanel(panelE, { models: ['independent'], stability: { rollingWindow: 8 } });
    const labelled = { periods: panelE.periods, obligors: E.obligors, defaults: E.defaults };
    const st = f.stability!;
    expect(st.jackknife).toEqual({ status: 'ok', ...jackknife(labelled) });
    expect(st.rolling).toEqual(rollingWindow(labelled, { window: 8, level: 0.95 }));
    const sup = supLrStatistic(E);
    expect(st.breakTest).toMatchObject({ status: 'statistic-only', statistic: sup.statistic, splitYear: panelE.periods[sup.splitIndex], pValue: null, replications: 0 });
    // without a bootstrap there is no p-value, and the result says why (Andrews 1993)
    expect((st.breakTest as { reason: string }).reason).toMatch(/^No p-value: .* not chi-square distributed \(Andrews 1993\).*--bootstrap B/);
  });

  it("gives the break test its bootstrap p-value, the same for any split of the replications", () => {
    const opts = { models: ['independent' as const], stability: { breakTest: { replications: 6, seed: 3 } } };
    const whole = fitPanel(panelE, opts);
    const prepared = prepareSegmentFit(panelE, opts);
    const spec = prepared.breakTest!.spec;
    const mle = prepared.fit.estimates.binomialMle;
    // the null model is binomialMle on the whole window (Davison & Hinkley 1997, 4.2)
    expect(spec).toEqual({ obligors: E.obligors, pd: mle.pd, rho: mle.rho, seed: 3 });
    const split = completeSegmentFit(prepared, { breakTest: [...breakTestRange(spec, 4, 6), ...breakTestRange(spec, 0, 4)] });
    expect(split).toEqual(whole);
    const bt = whole.stability!.breakTest as { status: string; pValue: number; replications: number; seed: number };
    const reps = breakTestRange(spec, 0, 6);
    const exceed = reps.filter((r) => r.statistic !== null && r.statistic >= supLrStatistic(E).statistic).length;
    // (1 + #{sup* >= sup}) / (1 + B) (Davison & Hinkley 1997, eq. 4.11)
    expect(bt).toMatchObject({ status: 'ok', pValue: (1 + exceed) / 7, replications: 6, seed: 3 });
  });

  it('warns that the window mixes regimes when the break test rejects at 5%', () => {
    const labelled = { periods: panelE.periods, obligors: E.obligors, defaults: E.defaults };
    const observed = supLrStatistic(E);
    const plan = { spec: { obligors: E.obligors, pd: 0.0156, rho: 0.0285, seed: 1 }, replications: 39, observed };
    // 39 replications all below the observed statistic: p = 1 / 40 = 0.025 (definition)
    const low = Array.from({ length: 39 }, (_, index) => ({ index, statistic: observed.statistic / 2 }));
    const { breakTest, warning } = completeBreakTest(labelled, plan, low);
    expect(breakTest).toMatchObject({ status: 'ok', pValue: 1 / 40 });
    expect(warning!.code).toBe('structural-break');
    expect(warning!.message).toMatch(/mixes regimes/);
    const high = low.map((r) => ({ ...r, statistic: observed.statistic * 2 }));
    expect(completeBreakTest(labelled, plan, high).warning).toBeNull();
  });

  it('gives each part a status and a sentence when the panel is too short for it', () => {
    const f = fitPanel({ ...panelA, periods: years(8), obligors: A.obligors.slice(0, 8), defaults: A.defaults.slice(0, 8) }, { models: ['independent'] });
    expect(f.stability!.breakTest).toEqual({
      status: 'undefined',
      reason: 'The break test compares at least 5 periods before and after each split, so it needs 10 periods; this panel has 8.',
    });
    expect(f.stability!.rolling).toMatchObject({ status: 'undefined', window: 10, reason: expect.stringMatching(/needs at least 10; this panel has 8/) });
    expect(f.stability!.jackknife.status).toBe('ok');
    expect(() => fitPanel(panelA, { stability: { rollingWindow: 1 } })).toThrow(/rolling window must be a whole number/);
    expect(() => fitPanel(panelA, { stability: { breakTest: { replications: 1, seed: 1 } } })).toThrow(/break test needs/);
  });

  it('is left out when asked (stability: null) and for the AR(1) model alone', () => {
    expect(fitPanel(panelA, { models: ['independent'], stability: null }).stability).toBeNull();
  });
});

describe('fitPanel: the time of each stage', () => {
  it('times each estimator, interval method, the diagnostics and the stability with the injected clock, and nothing without one', () => {
    let now = 0;
    const clock = () => (now += 1); // every reading one ms later
    const prepared = prepareSegmentFit(panelA, { clock });
    for (const stage of [
      'binomialMle',
      'binomialMle.profile',
      'binomialMle.wald',
      'vasicekMle',
      'vasicekMle.chiSquare',
      'momentVariance',
      'momentVarianceCorrected',
      'momentVarianceAutocorrected',
      'jointDefault',
      'ar1Mle',
      'ar1Mle.profile',
      'ar1Mle.phiInterval',
      'ar1Mle.phiProfile',
      'diagnostics',
      'implications',
      'stability.jackknife',
      'stability.rolling',
      'stability.breakTest',
    ]) {
      expect(prepared.stages[stage], stage).toBeGreaterThanOrEqual(1);
    }
    expect(prepareSegmentFit(panelA).stages).toEqual({});
    // the result is plain JSON: nothing undefined or NaN hiding in the new blocks
    const f = prepared.fit;
    expect(JSON.parse(JSON.stringify(f))).toEqual(f);
  });
});
