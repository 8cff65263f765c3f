import { describe, expect, it } from 'vitest';
import { panelArrays } from '@/lib/stats/panel-arrays';

describe('panelArrays', () => {
  it('holds the counts, log C(n, d) of each period and the pooled rate', () => {
    // C(10, 3) = 120 and C(5, 0) = 1 (hand-checked); pooled rate 3 / 15
    const a = panelArrays({ obligors: [10, 5], defaults: [3, 0] }, 'test');
    expect(a.periods).toBe(2);
    expect(Array.from(a.obligors)).toEqual([10, 5]);
    expect(Array.from(a.defaults)).toEqual([3, 0]);
    expect(a.logChoose[0]).toBeCloseTo(Math.log(120), 12);
    expect(a.logChoose[1]).toBe(0);
    expect(a.pooledRate).toBeCloseTo(0.2, 15);
  });

  it('refuses a bad panel with the caller named', () => {
    expect(() => panelArrays({ obligors: [10], defaults: [11] }, 'SomeLikelihood')).toThrow(/SomeLikelihood/);
  });
});
