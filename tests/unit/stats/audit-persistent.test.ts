import { describe, expect, it } from 'vitest';
import ref from '@/tests/fixtures/time/audit-ar1-fixtures.json';
import { auditRange, estimatorAudit, mergeAudit, type AuditSpec } from '@/lib/stats/audit';
import { ar1Mle } from '@/lib/stats/estimators/ar1-mle';
import { binomialMle } from '@/lib/stats/estimators/binomial-mle';
import { momentVarianceAutocorrected } from '@/lib/stats/estimators/moment-variance-autocorrected';
import { vasicekMle } from '@/lib/stats/estimators/vasicek-mle';
import { createRng, deriveSeed } from '@/lib/stats/random';
import { simulatePanel } from '@/lib/stats/simulate';

describe('estimator audit with a persistent factor', () => {
  it('simulates replication r with the AR(1) factor of the spec from deriveSeed(seed, r)', () => {
    const spec: AuditSpec = { obligors: new Array(12).fill(1500), pd: 0.02, rho: 0.1, seed: 77, phi: 0.6 };
    const [rep] = auditRange(spec, 3, 4);
    const sim = simulatePanel({ pd: 0.02, rho: 0.1, obligors: spec.obligors.slice(), phi: 0.6 }, createRng(deriveSeed(77, 3)));
    expect(rep.estimates.binomialMle.rho).toBe(binomialMle(sim).rho);
    expect(rep.persistent).toBeUndefined();
    expect(mergeAudit([auditRange(spec, 0, 4)], spec).truth).toEqual({ pd: 0.02, rho: 0.1, phi: 0.6 });
  });

  it('audits ar1Mle, its profile interval and momentVarianceAutocorrected when asked, the same for any split', () => {
    const spec: AuditSpec = { obligors: new Array(12).fill(1500), pd: 0.02, rho: 0.1, seed: 78, phi: 0.6, persistent: true };
    const whole = auditRange(spec, 0, 6);
    const sim = simulatePanel({ pd: 0.02, rho: 0.1, obligors: spec.obligors.slice(), phi: 0.6 }, createRng(deriveSeed(78, 2)));
    const ar1 = ar1Mle(sim).result;
    expect(whole[2].persistent!.ar1Mle).toEqual({ rho: ar1.rho, status: ar1.status });
    expect(whole[2].persistent!.phi).toBe(ar1.phi);
    expect(whole[2].persistent!.momentVarianceAutocorrected.rho).toBe(momentVarianceAutocorrected(sim).rho);
    const s = mergeAudit([auditRange(spec, 4, 6), auditRange(spec, 0, 4)], spec);
    expect(s).toEqual(mergeAudit([whole], spec));
    const p = s.persistent!;
    const covered = whole.filter((r) => r.persistent!.ar1Profile && r.persistent!.ar1Profile.lower <= 0.1 && 0.1 <= r.persistent!.ar1Profile.upper).length;
    expect(p.ar1Profile).toMatchObject({ available: whole.filter((r) => r.persistent!.ar1Profile).length, covered });
    const phis = whole.map((r) => r.persistent!.phi).filter((x): x is number => x !== null);
    expect(p.phi.bias).toBeCloseTo(phis.reduce((a, b) => a + b, 0) / phis.length - 0.6, 14); // bias around the true phi
    expect(() => mergeAudit([auditRange({ ...spec, persistent: false }, 0, 2)], spec)).toThrow(/no persistent-factor estimates/);
  });

  it.each(ref.vasicekMleLargePoolAr1)(
    'draws panels whose closed-form estimate has the bias of the AR(1) law for very large cohorts (rho $rho, T $T, phi $phi)',
    (c) => {
      // computed with NumPy (tests/fixtures/time/make_audit_ar1.py, 2,000,000 paths); n = 1e8 makes
      // the binomial noise negligible. The audit's panels (auditRange's simulation, checked above)
      // with the closed form on each, R = 2000; tolerance 4 Monte Carlo standard errors plus the reference's.
      expect(Math.abs(c.s2Mean / c.s2MeanExact - 1)).toBeLessThan(1e-3); // the reference checks itself
      const R = 2000;
      let sum = 0;
      for (let r = 0; r < R; r++) {
        const sim = simulatePanel({ pd: 0.03, rho: c.rho, obligors: new Array(c.T).fill(100_000_000), phi: c.phi }, createRng(deriveSeed(12, r)));
        sum += vasicekMle(sim).rho!;
      }
      expect(Math.abs(sum / R - c.rho - c.bias)).toBeLessThan((4 * c.sd) / Math.sqrt(R) + 4 * c.meanMcse);
    },
  );

  it("shows the independent model's profile interval covering less often under phi = 0.6 (the persistence study: 83% against 94%)", () => {
    // p = 1%, rho = 0.12, n = 1000, T = 20 as in the Monte Carlo study behind the persistent model; R = 200 here, so
    // each coverage has a Monte Carlo sd of about 0.02-0.027: the drop must be at least 0.03 and
    // the coverage under phi = 0.6 within 3 sd of the persistence study's 0.83.
    const base = { obligors: new Array(20).fill(1000), pd: 0.01, rho: 0.12 };
    const independent = estimatorAudit({ ...base, seed: 31 }, 200).coverage.profile.coverage!;
    const persistent = estimatorAudit({ ...base, seed: 32, phi: 0.6 }, 200).coverage.profile.coverage!;
    expect(independent - persistent).toBeGreaterThan(0.03);
    expect(Math.abs(persistent - 0.83)).toBeLessThan(3 * Math.sqrt((0.83 * 0.17) / 200));
  });

  it('refuses phi outside (-1, 1)', () => {
    expect(() => auditRange({ obligors: [100, 100], pd: 0.01, rho: 0.1, seed: 1, phi: 1 }, 0, 1)).toThrow(/phi/);
  });
});
