import { describe, expect, it } from 'vitest';
import ref from '@/tests/fixtures/time/moment-bootstrap-fixtures.json';
import { jointDefault } from '@/lib/stats/estimators/joint-default';
import { momentTarget, type MomentEstimatorKey } from '@/lib/stats/estimators/moment-target';
import { momentVariance } from '@/lib/stats/estimators/moment-variance';
import { momentVarianceCorrected } from '@/lib/stats/estimators/moment-variance-corrected';
import {
  classifyMomentEstimate,
  momentBootstrap,
  momentBootstrapRange,
  summariseMomentBootstrap,
  type MomentBootstrapInterval,
  type MomentBootstrapReplication,
  type MomentBootstrapSpec,
} from '@/lib/stats/intervals/moment-bootstrap';
import { createRng, deriveSeed } from '@/lib/stats/random';
import { simulatePanel } from '@/lib/stats/simulate';

const estimators = { momentVariance, momentVarianceCorrected, jointDefault };

describe('momentTarget', () => {
  it('is the definition of DESIGN.md for each moment estimator', () => {
    const panel = { obligors: [1000, 800, 1200], defaults: [5, 20, 10] };
    const dr = [0.005, 0.025, 10 / 1200];
    const p = (dr[0] + dr[1] + dr[2]) / 3;
    const s2 = dr.reduce((s, x) => s + (x - p) ** 2, 0) / 2;
    const h = (1 / 1000 + 1 / 800 + 1 / 1200) / 3;
    const p2 = ((5 * 4) / (1000 * 999) + (20 * 19) / (800 * 799) + (10 * 9) / (1200 * 1199)) / 3;
    // DESIGN.md, "Estimators" (worked here by hand from the definitions)
    expect(momentTarget('momentVariance', panel)).toMatchObject({ kind: 'target', p });
    expect((momentTarget('momentVariance', panel) as { target: number }).target).toBeCloseTo(s2, 18);
    expect((momentTarget('momentVarianceCorrected', panel) as { target: number }).target).toBeCloseTo((s2 - p * (1 - p) * h) / (1 - h), 18);
    expect((momentTarget('jointDefault', panel) as { target: number }).target).toBeCloseTo(p2 - p * p, 18);
    expect(momentTarget('momentVariance', { obligors: [10, 10], defaults: [0, 0] })).toMatchObject({ kind: 'undefined' });
    expect(momentTarget('jointDefault', { obligors: [1, 10], defaults: [0, 1] })).toMatchObject({ kind: 'undefined', reason: expect.stringMatching(/Period 1/) });
  });
});

describe('classifyMomentEstimate (DESIGN.md: target <= 0 is rho = 0 and clipped; no value is undefined)', () => {
  it('clips a target at or below 0 and leaves out an estimator without a value', () => {
    // equal default rates: s2 = 0, a target of 0 (the estimator itself says undefined)
    expect(momentVariance({ obligors: [100, 200], defaults: [2, 4] }).status).toBe('undefined');
    expect(classifyMomentEstimate('momentVariance', { obligors: [100, 200], defaults: [2, 4] })).toEqual({ rho: 0, outcome: 'clipped' });
    // one default in each of two periods: p2 = 0 < p^2
    expect(classifyMomentEstimate('jointDefault', { obligors: [100, 100], defaults: [1, 1] })).toEqual({ rho: 0, outcome: 'clipped' });
    expect(classifyMomentEstimate('momentVarianceCorrected', { obligors: [100, 100], defaults: [1, 2] })).toEqual({ rho: 0, outcome: 'clipped' });
    expect(classifyMomentEstimate('jointDefault', { obligors: [100, 100], defaults: [0, 0] })).toMatchObject({ rho: null, outcome: 'undefined', reason: expect.stringMatching(/No period has a default/) });
    const panel = { obligors: [1000, 1000, 1000], defaults: [5, 20, 10] };
    for (const key of ['momentVariance', 'momentVarianceCorrected', 'jointDefault'] as const) {
      expect(classifyMomentEstimate(key, panel)).toEqual({ rho: estimators[key](panel).rho, outcome: 'value' });
    }
  });
});

describe('momentBootstrapRange', () => {
  const spec: MomentBootstrapSpec = { estimator: 'jointDefault', obligors: [200, 220, 180, 200, 210], pd: 0.01, rho: 0.08, seed: 7 };

  it('replication i is the estimator on the panel simulated from createRng(deriveSeed(seed, i))', () => {
    const [r] = momentBootstrapRange(spec, 4, 5);
    const sim = simulatePanel({ pd: 0.01, rho: 0.08, obligors: spec.obligors.slice() }, createRng(deriveSeed(7, 4)));
    expect(r).toEqual({ index: 4, ...classifyMomentEstimate('jointDefault', sim) });
  });

  it('gives identical numbers for any split of the index range', () => {
    const whole = momentBootstrapRange(spec, 0, 30);
    const split = [...momentBootstrapRange(spec, 17, 30), ...momentBootstrapRange(spec, 0, 9), ...momentBootstrapRange(spec, 9, 17)];
    expect(summariseMomentBootstrap(split, spec)).toEqual(summariseMomentBootstrap(whole, spec));
    expect(momentBootstrap(spec, 30)).toEqual(summariseMomentBootstrap(whole, spec));
  });

  it('refuses bad specs and ranges', () => {
    expect(() => momentBootstrapRange({ ...spec, estimator: 'binomialMle' as MomentEstimatorKey }, 0, 1)).toThrow(/one of momentVariance/);
    expect(() => momentBootstrapRange({ ...spec, pd: 0 }, 0, 1)).toThrow(RangeError);
    expect(() => momentBootstrapRange(spec, 3, 2)).toThrow(RangeError);
    expect(() => momentBootstrap(spec, 0)).toThrow(RangeError);
  });
});

describe('summariseMomentBootstrap', () => {
  const spec: MomentBootstrapSpec = { estimator: 'momentVariance', obligors: [100], pd: 0.01, rho: 0.2, seed: 3 };
  const reps = (values: (number | null | 'clip')[]): MomentBootstrapReplication[] =>
    values.map((v, index) =>
      v === null ? { index, rho: null, outcome: 'undefined', reason: 'No period has a default.' } : v === 'clip' ? { index, rho: 0, outcome: 'clipped' } : { index, rho: v, outcome: 'value' },
    );

  it('forms the percentile interval and the bias over the replicates with a value, clipped ones at 0', () => {
    const s = summariseMomentBootstrap(reps([0.4, 'clip', null, 0.3, 0.2]), spec, 0.95) as MomentBootstrapInterval;
    // worked by hand: values 0, 0.2, 0.3, 0.4 (m = 4); h = 3 x 0.025 = 0.075 -> 0.015; h = 2.925 -> 0.3925
    expect(s.lower).toBeCloseTo(0.015, 15);
    expect(s.upper).toBeCloseTo(0.3925, 15);
    expect(s.bias).toBeCloseTo(0.9 / 4 - 0.2, 15); // Efron & Tibshirani (1993) 10.2
    expect(s).toMatchObject({ status: 'ok', level: 0.95, replications: 5, clipped: 1, undefined: 1 });
  });

  it('says so when fewer than 2 replicates have a value, and refuses broken merges', () => {
    expect(summariseMomentBootstrap(reps([null, 0.1, null]), spec)).toMatchObject({
      status: 'undefined',
      reason: expect.stringMatching(/Only 1 of 3/),
      undefined: 2,
    });
    const r = reps([0.1, 0.2, 0.3]);
    expect(() => summariseMomentBootstrap([r[0], r[1], r[1]], spec)).toThrow(/missing, repeated/);
    expect(() => summariseMomentBootstrap(r, spec, 0)).toThrow(RangeError);
  });
});

describe('momentBootstrap draws from the sampling distribution of the estimator', () => {
  it.each(ref.cases.map((c) => [c.name, c] as const))('%s: ends, mean and shares agree with a NumPy Monte Carlo of 200,000 (an AR(1) factor where the case names phi)', (_name, c) => {
    const B = ref.testReplications;
    const phi = (c as { phi?: number }).phi;
    const spec: MomentBootstrapSpec = { estimator: c.estimator as MomentEstimatorKey, obligors: c.obligors, pd: c.pd, rho: c.rho, seed: 99, ...(phi === undefined ? {} : { phi }) };
    const s = momentBootstrap(spec, B, 0.95) as MomentBootstrapInterval;
    expect(s.replications).toBe(B);
    const [q025, , q975] = c.quantiles;
    // computed with NumPy (tests/fixtures/time/make_moment_bootstrap.py): the q-quantile of B draws
    // lies in [Q(q - 4 sd), Q(q + 4 sd)] (order statistics, sd = sqrt(q (1 - q) / B))
    expect(s.lower).toBeGreaterThanOrEqual(q025.band[0]);
    expect(s.lower).toBeLessThanOrEqual(q025.band[1]);
    expect(s.upper).toBeGreaterThanOrEqual(q975.band[0]);
    expect(s.upper).toBeLessThanOrEqual(q975.band[1]);
    // mean of the defined replicates: within 4 Monte Carlo standard errors of both runs
    const mean = s.bias + c.rho;
    expect(Math.abs(mean - c.mean)).toBeLessThan(4 * Math.hypot(c.sd / Math.sqrt(B), c.meanMcse));
    // shares of clipped and undefined replicates: within 4 binomial sd (plus 1/B for a share of 0)
    const share = (x: number) => 4 * Math.sqrt((x * (1 - x)) / B) + 1 / B;
    expect(Math.abs(s.clipped / B - c.clippedShare)).toBeLessThan(share(c.clippedShare));
    expect(Math.abs(s.undefined / B - c.undefinedShare)).toBeLessThan(share(c.undefinedShare));
  });
});
