import { describe, expect, it } from 'vitest';
import engine from '@/tests/fixtures/engine/engine-fixtures.json';
import ref from '@/tests/fixtures/time/ar1-mle-fixtures.json';
import { ar1Mle } from '@/lib/stats/estimators/ar1-mle';
import { HigherMaximumError } from '@/lib/stats/intervals/likelihood-ratio';
import { ar1Fit, ar1PhiProfileCurve, lrTestPhiZero } from '@/lib/stats/intervals/ar1-intervals';

type EnginePanel = { obligors: number[]; defaults: number[] };
const panels = engine.panels as unknown as Record<string, EnginePanel>;

describe('lrTestPhiZero', () => {
  it('uses the chi-square(1) tail', () => {
    // A&S table 26.8: chi2_1 upper 5% and 10% points 3.841459 and 2.705543
    expect(lrTestPhiZero(-10 + 3.841458820694124 / 2, -10).pValue).toBeCloseTo(0.05, 12);
    expect(lrTestPhiZero(-10 + 2.705543454095404 / 2, -10).pValue).toBeCloseTo(0.1, 12);
    expect(lrTestPhiZero(-10, -10)).toEqual({ statistic: 0, pValue: 1 });
    expect(lrTestPhiZero(-10 - 1e-9, -10)).toEqual({ statistic: 0, pValue: 1 });
    expect(() => lrTestPhiZero(-11, -10)).toThrow(/below the independent model/);
  });
});

describe('ar1Fit', () => {
  it.each(ref.cases.map((c) => [c.panel, c] as const))('panel %s: LR test of phi = 0 as SciPy computes it', (_name, c) => {
    const fit = ar1Fit({ obligors: c.obligors, defaults: c.defaults }, { phiProfilePoints: 0 });
    // computed with SciPy 1.17 (tests/fixtures/time/make_ar1_mle.py: both maxima by Nelder-Mead)
    expect(Math.abs(fit.lrTestPhi0!.statistic - c.lrStatistic)).toBeLessThan(2e-6);
    expect(Math.abs(fit.lrTestPhi0!.pValue - c.lrPValue)).toBeLessThan(1e-5);
  });

  it('puts each end of both intervals where the profile crosses the cut-off, around the estimate', () => {
    for (const name of ['A', 'C', 'E']) {
      const fit = ar1Fit(panels[name], { phiProfilePoints: 0 });
      const { result } = fit;
      const { profile } = ar1Mle(panels[name]);
      const cut = fit.cutoff!;
      expect(cut).toBeCloseTo(result.logLik! - 1.9207294103470195, 12); // chi2_1(0.95) / 2 (DESIGN.md)
      const rho = fit.profile!;
      expect(rho.lower).toBeLessThan(result.rho!);
      expect(rho.upper).toBeGreaterThan(result.rho!);
      // each end is within 1e-6 of the crossing: |l** - cut| / |slope| (the search's tolerance is 1e-7)
      const off = (q: { logLik: number; slope: number | null }) => Math.abs(q.logLik - cut) / Math.abs(q.slope!);
      if (!rho.lowerAtBound) expect(off(profile!.atRho(rho.lower)), `${name} rho lower`).toBeLessThan(1e-6);
      if (!rho.upperAtBound) expect(off(profile!.atRho(rho.upper)), `${name} rho upper`).toBeLessThan(1e-6);
      const phi = fit.phiInterval!;
      expect(phi.lower).toBeLessThan(result.phi!);
      expect(phi.upper).toBeGreaterThan(result.phi!);
      if (!phi.lowerAtBound) expect(off(profile!.atPhi(phi.lower)), `${name} phi lower`).toBeLessThan(1e-6);
      if (!phi.upperAtBound) expect(off(profile!.atPhi(phi.upper)), `${name} phi upper`).toBeLessThan(1e-6);
    }
  });

  it('re-maximises the nuisance parameters at each profile point (property: no nearby (p, phi) is higher)', () => {
    const fit = ar1Fit(panels.A, { phiProfilePoints: 0 });
    const { profile } = ar1Mle(panels.A);
    const q = profile!.atRho(fit.profile!.upper);
    for (const [dk, dp] of [[0.01, 0], [-0.01, 0], [0, 0.03], [0, -0.03], [0.01, 0.03]]) {
      expect(profile!.likelihood.logLik(q.k + dk, q.rho, q.phi! + dp)).toBeLessThan(q.logLik + 1e-9);
    }
  });

  it('draws the profile of phi with its top at the estimate', () => {
    const fit = ar1Fit(panels.E, { phiProfilePoints: 12 });
    expect(fit.phiProfile).toHaveLength(13);
    const phis = fit.phiProfile.map((q) => q.phi);
    expect(phis).toEqual([...phis].sort((a, b) => a - b));
    const top = fit.phiProfile.reduce((b, q) => (q.logLik > b.logLik ? q : b));
    expect(top.phi).toBe(fit.result.phi);
    // inside the interval the profile is above the cut-off, outside below
    for (const q of fit.phiProfile) {
      if (q.phi > fit.phiInterval!.lower && q.phi < fit.phiInterval!.upper) expect(q.logLik).toBeGreaterThanOrEqual(fit.cutoff! - 1e-9);
      if (q.phi < fit.phiInterval!.lower - 1e-6 || q.phi > fit.phiInterval!.upper + 1e-6) expect(q.logLik).toBeLessThan(fit.cutoff!);
    }
  });

  it('at rho = 0 reports phi as not identified: the whole range, no evidence against phi = 0', () => {
    const fit = ar1Fit(panels.F);
    expect(fit.result.rho).toBe(0);
    expect(fit.profile).toMatchObject({ lower: 0, lowerAtBound: true, upperAtBound: false });
    expect(fit.phiInterval).toMatchObject({ lower: -1, upper: 1, lowerAtBound: true, upperAtBound: true });
    expect(fit.lrTestPhi0).toEqual({ statistic: 0, pValue: 1 });
    expect(fit.phiProfile.every((q) => q.logLik === fit.result.logLik)).toBe(true);
  });

  it('reports an interval end beyond the search range as the bound (DESIGN.md: 1 for phi)', () => {
    const fit = ar1Fit(panels.A, { phiProfilePoints: 0 });
    // panel A: 10 years carry little information about persistence; the upper end of phi may
    // reach the edge, and is then 1 exactly
    if (fit.phiInterval!.upperAtBound) expect(fit.phiInterval!.upper).toBe(1);
    else expect(fit.phiInterval!.upper).toBeLessThan(0.99);
    const B = ar1Fit(panels.B, { phiProfilePoints: 0 });
    expect(B.phiInterval).toMatchObject({ lower: -1, upper: 1, lowerAtBound: true, upperAtBound: true });
  });

  it('says when a profile point beats the stated maximum (the signal to search again), and refuses undefined estimates', () => {
    const { result, profile } = ar1Mle(panels.E);
    const understated = { ...result, logLik: result.logLik! - 1 };
    expect(() => ar1PhiProfileCurve(profile!, understated, 5)).toThrow(HigherMaximumError);
    const short = ar1Fit({ obligors: [100, 100, 100], defaults: [1, 2, 3] });
    expect(short).toMatchObject({ profile: null, phiInterval: null, lrTestPhi0: null, phiProfile: [], cutoff: null });
    expect(short.result.reason).toMatch(/at least 6 periods/);
    expect(() => ar1Fit(panels.A, { level: 1.5 })).toThrow(RangeError);
  });
});
