import { describe, expect, it } from 'vitest';
import engine from '@/tests/fixtures/engine/engine-fixtures.json';
import ref from '@/tests/fixtures/engine/diagnostics-fixtures.json';
import { binomialMle } from '@/lib/stats/estimators/binomial-mle';
import {
  bootstrapRange,
  parametricBootstrap,
  sortedQuantile,
  summariseBootstrap,
  type BootstrapReplication,
  type BootstrapSpec,
} from '@/lib/stats/intervals/bootstrap';
import { createRng, deriveSeed } from '@/lib/stats/random';
import { simulatePanel } from '@/lib/stats/simulate';

const A = engine.panels.A;
const specA: BootstrapSpec = { obligors: A.obligors, pd: A.binomialMle.pd, rho: A.binomialMle.rho, seed: 7 };

describe('sortedQuantile (Hyndman & Fan definition 7)', () => {
  it('matches numpy.percentile', () => {
    const values = [...ref.percentile.values].sort((a, b) => a - b);
    ref.percentile.q.forEach((q, i) => {
      // computed with NumPy (tests/fixtures/engine/make_diagnostics.py, method 'linear')
      expect(Math.abs(sortedQuantile(values, q) - ref.percentile.quantiles[i])).toBeLessThan(1e-15);
    });
  });
  it('handles one value and refuses bad input', () => {
    expect(sortedQuantile([0.3], 0.975)).toBe(0.3);
    expect(() => sortedQuantile([], 0.5)).toThrow(RangeError);
    expect(() => sortedQuantile([2, 1], 0.5)).toThrow(/sorted/);
    expect(() => sortedQuantile([1, 2], 1.5)).toThrow(RangeError);
  });
});

describe('summariseBootstrap', () => {
  const reps = (values: (number | null)[]): BootstrapReplication[] =>
    values.map((rho, index) => (rho === null ? { index, rho, status: 'undefined', reason: 'No period has a default.' } : { index, rho, status: 'ok' }));
  const spec = { obligors: [100], pd: 0.01, rho: 0.2, seed: 3 };

  it('gives the percentile interval and the bias by their definitions', () => {
    const s = summariseBootstrap(reps([0.4, 0.1, null, 0.3, 0.2]), spec, 0.95);
    // worked by hand: sorted 0.1..0.4, h = 3 x 0.025 = 0.075 -> 0.1075; h = 2.925 -> 0.3925
    expect(s.lower).toBeCloseTo(0.1075, 15);
    expect(s.upper).toBeCloseTo(0.3925, 15);
    expect(s.bias).toBeCloseTo(0.25 - 0.2, 15); // Efron & Tibshirani (1993) 10.2: mean(rho*) - rho_hat
    expect(s).toMatchObject({ replications: 5, failed: 1, seed: 3, failures: [{ reason: 'No period has a default.', count: 1 }] });
  });

  it('does not depend on the order in which slices arrive', () => {
    const r = reps([0.4, 0.1, 0.35, 0.3, 0.2, 0.05]);
    expect(summariseBootstrap([...r].reverse(), spec, 0.9)).toEqual(summariseBootstrap(r, spec, 0.9));
  });

  it('refuses missing or repeated replications, too few estimates and bad levels', () => {
    const r = reps([0.1, 0.2, 0.3]);
    expect(() => summariseBootstrap([r[0], r[1], r[1]], spec)).toThrow(/missing, repeated/);
    expect(() => summariseBootstrap(reps([0.1, null, null]), spec)).toThrow(/only 1 of 3/);
    expect(() => summariseBootstrap(r, spec, 1)).toThrow(RangeError);
  });
});

describe('bootstrapRange', () => {
  it('replication i is binomialMle on the panel simulated from createRng(deriveSeed(seed, i))', () => {
    const [r] = bootstrapRange(specA, 3, 4);
    // the definition of the replication (DESIGN.md: seeded, same n_t, at the estimate)
    const sim = simulatePanel({ pd: specA.pd, rho: specA.rho, obligors: A.obligors }, createRng(deriveSeed(7, 3)));
    expect(r).toEqual({ index: 3, rho: binomialMle(sim).rho, status: binomialMle(sim).status });
  });

  it('gives identical replications for any split of the index range', () => {
    const whole = bootstrapRange(specA, 0, 8);
    const split = [...bootstrapRange(specA, 5, 8), ...bootstrapRange(specA, 0, 2), ...bootstrapRange(specA, 2, 5)];
    expect(split.sort((a, b) => a.index - b.index)).toEqual(whole);
    expect(summariseBootstrap(split, specA)).toEqual(parametricBootstrap(specA, 8));
    expect(bootstrapRange(specA, 4, 4)).toEqual([]);
  });

  it('counts failed replications with their reason', () => {
    // Tiny cohorts at a small PD: many simulated panels have no default at all, where binomialMle
    // is undefined. Count those panels directly from the simulation.
    const spec = { obligors: [40, 40, 40, 40, 40], pd: 0.004, rho: 0.1, seed: 11 };
    const B = 30;
    let empty = 0;
    for (let i = 0; i < B; i++) {
      const sim = simulatePanel({ pd: spec.pd, rho: spec.rho, obligors: spec.obligors }, createRng(deriveSeed(spec.seed, i)));
      if (sim.defaults.every((d) => d === 0)) empty++;
    }
    expect(empty).toBeGreaterThan(5); // P(no default) ~ (1 - 0.004)^200 ~ 0.45 plus correlation
    const reps = bootstrapRange(spec, 0, B);
    const s = summariseBootstrap(reps, spec);
    expect(s.failed).toBe(empty);
    expect(s.failures[0].reason).toMatch(/No period has a default/);
    expect(s.failures[0].count).toBe(empty);
  });

  it('spreads like the standard error of the estimate (panel A)', () => {
    const reps = bootstrapRange(specA, 0, 40);
    const values = reps.map((r) => r.rho!);
    const m = values.reduce((a, b) => a + b, 0) / values.length;
    const sd = Math.sqrt(values.reduce((a, b) => a + (b - m) ** 2, 0) / (values.length - 1));
    // The bootstrap sd estimates the estimator's standard error; the observed-information se is
    // computed with SciPy 1.17 (make_fixtures.py). Tolerance a factor 2: sampling error of a
    // 40-draw sd (~11%) plus the skew of rho_hat near 0 at T = 10.
    expect(sd / A.binomialMle.se).toBeGreaterThan(0.5);
    expect(sd / A.binomialMle.se).toBeLessThan(2);
  });

  it('refuses bad specs and ranges', () => {
    expect(() => bootstrapRange({ ...specA, pd: 0 }, 0, 1)).toThrow(/PD/);
    expect(() => bootstrapRange({ ...specA, rho: 1 }, 0, 1)).toThrow(/rho/);
    expect(() => bootstrapRange({ ...specA, seed: -1 }, 0, 1)).toThrow(/seed/);
    expect(() => bootstrapRange(specA, 3, 2)).toThrow(/index range/);
    expect(() => bootstrapRange({ ...specA, obligors: [10, 0] }, 0, 1)).toThrow(/period 2/);
    expect(() => parametricBootstrap(specA, 0)).toThrow(/replications/);
  });
});
