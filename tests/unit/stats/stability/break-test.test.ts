import { describe, expect, it } from 'vitest';
import { binomialMle } from '@/lib/stats/estimators/binomial-mle';
import { createRng, deriveSeed } from '@/lib/stats/random';
import { simulatePanel } from '@/lib/stats/simulate';
import {
  breakTest,
  breakTestNullModel,
  breakTestRange,
  summariseBreakTest,
  supLrStatistic,
  type BreakTest,
} from '@/lib/stats/stability/break-test';
import type { LabelledPanel } from '@/lib/stats/stability/jackknife';

const years = (T: number, first = 2001) => Array.from({ length: T }, (_, t) => String(first + t));

/** A panel whose PD steps from pd1 to pd2 at index `at` (same rho), simulated from one seed. */
function withBreak(T: number, at: number, pd1: number, pd2: number, seed: number, n = 2000): LabelledPanel {
  const obligors = new Array(T).fill(n);
  const a = simulatePanel({ pd: pd1, rho: 0.05, obligors: obligors.slice(0, at) }, createRng(deriveSeed(seed, 0)));
  const b = simulatePanel({ pd: pd2, rho: 0.05, obligors: obligors.slice(at) }, createRng(deriveSeed(seed, 1)));
  return { periods: years(T), obligors, defaults: [...a.defaults, ...b.defaults] };
}

describe('supLrStatistic', () => {
  it('is 2 (l*(before) + l*(after) - l*(whole)) maximised over splits with 5 periods a side (Andrews 1993, eq. 4.3)', () => {
    const panel = withBreak(12, 6, 0.01, 0.02, 3);
    const s = supLrStatistic(panel);
    expect(s.splits.map((x) => x.splitIndex)).toEqual([5, 6, 7]);
    const l = (from: number, to: number) => binomialMle({ obligors: panel.obligors.slice(from, to), defaults: panel.defaults.slice(from, to) }).logLik!;
    for (const { splitIndex, statistic } of s.splits) {
      expect(statistic).toBeCloseTo(2 * (l(0, splitIndex) + l(splitIndex, 12) - l(0, 12)), 8);
      expect(statistic).toBeGreaterThanOrEqual(0); // nested models: the parts fit at least as well
    }
    expect(s.statistic).toBe(Math.max(...s.splits.map((x) => x.statistic)));
  });

  it('takes the supremum 0 for a part without any default', () => {
    const panel = { obligors: new Array(10).fill(300), defaults: [0, 0, 0, 0, 0, 3, 5, 2, 4, 6] };
    const s = supLrStatistic(panel);
    // l*(first five) = 0 (p -> 0), so LR = 2 (l*(last five) - l*(all ten))
    const l = (from: number, to: number) => binomialMle({ obligors: panel.obligors.slice(from, to), defaults: panel.defaults.slice(from, to) }).logLik!;
    expect(s.statistic).toBeCloseTo(2 * (0 + l(5, 10) - l(0, 10)), 8);
  });

  it('needs 10 periods', () => {
    expect(() => supLrStatistic({ obligors: new Array(9).fill(100), defaults: new Array(9).fill(1) })).toThrow(/at least 10 periods/);
  });
});

describe('breakTest', () => {
  it('finds a break simulated at a known year, with a small p-value (B = 39)', () => {
    const panel = withBreak(20, 10, 0.01, 0.03, 11);
    const r = breakTest(panel, { replications: 39, seed: 5 }) as BreakTest;
    expect(r.status).toBe('ok');
    expect(r.splitYear).toBe('2011'); // the first year of the second regime
    expect(r.pValue).toBe(1 / 40); // no null replicate reaches the observed supremum
    expect(r.replications).toBe(39);
    expect(r.splits).toHaveLength(11);
  });

  it('rejects at close to the nominal rate on panels without a break (seeded Monte Carlo)', () => {
    // 50 panels of T = 10 (one split) under the no-break model, B = 19 each: the Monte Carlo
    // p-value (1 + k) / 20 is (close to) uniform on {1/20, ..., 1} under the null (Davison & Hinkley
    // 1997, 4.2), so P(p <= 0.10) = 0.10: 5 expected rejections, sd 2.1; tolerance 3 sd.
    const R = 50;
    let rejections = 0;
    for (let r = 0; r < R; r++) {
      const sim = simulatePanel({ pd: 0.02, rho: 0.08, obligors: new Array(10).fill(600) }, createRng(deriveSeed(4242, r)));
      const test = breakTest({ periods: years(10), ...sim }, { replications: 19, seed: deriveSeed(99, r) });
      if (test.status === 'ok' && test.pValue <= 0.1) rejections++;
    }
    expect(Math.abs(rejections - 0.1 * R)).toBeLessThan(3 * Math.sqrt(R * 0.1 * 0.9));
  });

  it('gives identical results for any split of the replications', () => {
    const panel = withBreak(12, 6, 0.01, 0.015, 21);
    const model = breakTestNullModel(panel) as { pd: number; rho: number };
    const spec = { obligors: panel.obligors, pd: model.pd, rho: model.rho, seed: 8 };
    const observed = supLrStatistic(panel);
    const whole = summariseBreakTest(panel, observed, breakTestRange(spec, 0, 12));
    const split = summariseBreakTest(panel, observed, [...breakTestRange(spec, 7, 12), ...breakTestRange(spec, 0, 7)]);
    expect(split).toEqual(whole);
    expect(breakTest(panel, { replications: 12, seed: 8 })).toEqual(whole);
  });

  it('gives a status and a sentence for short or empty panels, and refuses broken merges', () => {
    expect(breakTest({ periods: years(9), obligors: new Array(9).fill(100), defaults: new Array(9).fill(2) }, { replications: 10, seed: 1 })).toMatchObject({
      status: 'undefined',
      reason: expect.stringMatching(/needs 10 periods; this panel has 9/),
    });
    expect(breakTest({ periods: years(10), obligors: new Array(10).fill(100), defaults: new Array(10).fill(0) }, { replications: 10, seed: 1 })).toMatchObject({
      status: 'undefined',
      reason: expect.stringMatching(/No period has a default/),
    });
    const panel = withBreak(10, 5, 0.01, 0.01, 2);
    expect(() => summariseBreakTest(panel, supLrStatistic(panel), [{ index: 0, statistic: 1 }, { index: 0, statistic: 2 }])).toThrow(/missing, repeated/);
    expect(() => breakTest(panel, { replications: 0, seed: 1 })).toThrow(RangeError);
  });
});
