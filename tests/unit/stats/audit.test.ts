import { describe, expect, it } from 'vitest';
import fixtures from '@/tests/fixtures/audit/audit-fixtures.json';
import { auditRange, estimatorAudit, mergeAudit, type AuditSpec } from '@/lib/stats/audit';
import { binomialMle } from '@/lib/stats/estimators/binomial-mle';
import { vasicekChiSquareInterval } from '@/lib/stats/intervals/chi-square';
import { createRng, deriveSeed } from '@/lib/stats/random';
import { simulatePanel } from '@/lib/stats/simulate';

const spec: AuditSpec = { obligors: [800, 1000, 1200, 900, 1100, 1000, 950, 1050], pd: 0.02, rho: 0.08, seed: 2026 };

describe('estimator audit', () => {
  it('gives the same summary for any split of the replication range (threads)', () => {
    // property: replication r depends only on deriveSeed(seed, r)
    const whole = mergeAudit([auditRange(spec, 0, 12)], spec);
    const split = mergeAudit([auditRange(spec, 7, 12), auditRange(spec, 0, 3), auditRange(spec, 3, 7)], spec);
    expect(split).toEqual(whole);
    expect(estimatorAudit(spec, 12)).toEqual(whole);
  });

  it('replication r is the estimate on the panel simulated from deriveSeed(seed, r)', () => {
    // definition (DESIGN.md estimator audit: simulate at the fitted (p, rho) with the same n_t, seeded)
    const [rep] = auditRange(spec, 5, 6);
    const sim = simulatePanel({ pd: spec.pd, rho: spec.rho, obligors: spec.obligors.slice() }, createRng(deriveSeed(spec.seed, 5)));
    expect(rep.index).toBe(5);
    expect(rep.estimates.binomialMle.rho).toBe(binomialMle({ obligors: sim.obligors, defaults: sim.defaults }).rho);
    const chi = vasicekChiSquareInterval({ obligors: sim.obligors, defaults: sim.defaults }, 0.95);
    expect(rep.chiSquare).toEqual(chi.status === 'ok' ? { lower: chi.lower, upper: chi.upper } : null);
  });

  it('summarises bias, RMSE, status counts and coverage by their definitions', () => {
    // definitions (Morris, White & Crowther 2019, table 6), recounted here from the raw replications
    const reps = auditRange(spec, 0, 40);
    const s = mergeAudit([reps], spec);
    const xs = reps.map((r) => r.estimates.momentVariance).filter((e) => e.rho !== null).map((e) => e.rho!);
    const mean = xs.reduce((a, b) => a + b, 0) / xs.length;
    expect(s.estimators.momentVariance.defined).toBe(xs.length);
    expect(s.estimators.momentVariance.bias).toBeCloseTo(mean - spec.rho, 14);
    expect(s.estimators.momentVariance.rmse).toBeCloseTo(Math.sqrt(xs.reduce((a, x) => a + (x - spec.rho) ** 2, 0) / xs.length), 14);
    const undefinedCount = reps.filter((r) => r.estimates.vasicekMle.status === 'undefined').length;
    expect(s.estimators.vasicekMle.statusCounts.undefined).toBe(undefinedCount);
    const withProfile = reps.filter((r) => r.profile !== null);
    const covered = withProfile.filter((r) => r.profile!.lower <= spec.rho && spec.rho <= r.profile!.upper).length;
    expect(s.coverage.profile).toMatchObject({ available: withProfile.length, covered, level: 0.95 });
    const walds = reps.filter((r) => r.wald !== null).length;
    const atBoundary = reps.filter((r) => r.estimates.binomialMle.rho === 0).length;
    expect(walds + atBoundary).toBe(withProfile.length); // no Wald interval at rho = 0 (DESIGN.md)
    const chi = reps.filter((r) => r.chiSquare !== null);
    // vasicekMle's chi-square interval, recounted; a panel without one is a miss (Morris et al. 2019)
    expect(s.coverage.chiSquare).toMatchObject({ available: chi.length, missing: 40 - chi.length });
    expect(s.coverage.chiSquare.covered).toBe(chi.filter((r) => r.chiSquare!.lower <= spec.rho && spec.rho <= r.chiSquare!.upper).length);
    expect(s.omitted.map((o) => o.item).join(' ')).toMatch(/bootstrap interval coverage/);
  });

  it('counts panels without a Wald interval (estimate at rho = 0) as misses, never drops them', () => {
    // definition (Morris, White & Crowther 2019, coverage over all replications): a method that
    // gives no interval did not cover. Panel: p = 1%, rho = 0.01, T = 10 cohorts of 300, where
    // many estimates fall at rho = 0 (seeded).
    const small: AuditSpec = { obligors: new Array(10).fill(300), pd: 0.01, rho: 0.01, seed: 5 };
    const reps = auditRange(small, 0, 60);
    const s = mergeAudit([reps], small);
    const noWald = reps.filter((r) => r.wald === null).length;
    expect(noWald).toBeGreaterThan(5);
    const covered = reps.filter((r) => r.wald !== null && r.wald.lower <= small.rho && small.rho <= r.wald.upper).length;
    expect(s.coverage.wald).toMatchObject({ available: 60 - noWald, missing: noWald, covered });
    expect(s.coverage.wald.coverage).toBeCloseTo(covered / 60, 15);
  });

  it.each(fixtures.vasicekMleLargePool)(
    'reproduces the exact bias and spread of the closed-form estimator for very large cohorts (rho $rho, T $T)',
    (c) => {
      // computed with SciPy 1.17 (tests/fixtures/audit/make_audit_fixtures.py): with n = 1e8 the
      // binomial noise in Phi^-1(DR_t) is ~1e-6 of the factor variance, so the large-pool law holds.
      // Tolerances: 4 Monte Carlo standard errors, sd / sqrt(R) for the mean and sd / sqrt(2 (R - 1))
      // for the sd (normal theory), for R = 300 replications.
      const R = 300;
      const s = estimatorAudit({ obligors: new Array(c.T).fill(100_000_000), pd: 0.03, rho: c.rho, seed: 11 }, R);
      const v = s.estimators.vasicekMle;
      expect(v.defined).toBe(R);
      expect(Math.abs(v.bias! - c.bias)).toBeLessThan((4 * c.sd) / Math.sqrt(R));
      expect(Math.abs(v.sd! - c.sd)).toBeLessThan((4 * c.sd) / Math.sqrt(2 * (R - 1)));
      expect(Math.abs(v.rmse! - c.rmse)).toBeLessThan((4 * c.sd) / Math.sqrt(2 * (R - 1)) + (4 * c.sd * Math.abs(c.bias)) / (c.rmse * Math.sqrt(R)));
    },
  );

  it('refuses bad specifications and incomplete merges with a sentence', () => {
    expect(() => auditRange({ ...spec, pd: 0 }, 0, 1)).toThrow(/PD/);
    expect(() => auditRange({ ...spec, rho: 1 }, 0, 1)).toThrow(/rho/);
    expect(() => auditRange({ ...spec, seed: -1 }, 0, 1)).toThrow(/seed/);
    expect(() => auditRange({ ...spec, obligors: [10, 0] }, 0, 1)).toThrow(/period 2/);
    expect(() => auditRange(spec, 3, 2)).toThrow(/from <= to/);
    expect(() => mergeAudit([auditRange(spec, 0, 2), auditRange(spec, 3, 4)], spec)).toThrow(/index 2 is missing/);
    expect(() => estimatorAudit(spec, 0)).toThrow(/replications/);
  });
});
