import { describe, expect, it } from 'vitest';
import engine from '@/tests/fixtures/engine/engine-fixtures.json';
import { lag1Autocorrelation } from '@/lib/stats/autocorrelation';
import { momentTarget, sampleAutocorrelation } from '@/lib/stats/estimators/moment-target';
import { momentVariance } from '@/lib/stats/estimators/moment-variance';
import { momentVarianceAutocorrected } from '@/lib/stats/estimators/moment-variance-autocorrected';
import { bivariateNormalExcess } from '@/lib/stats/bivariate-normal';
import { normalQuantile } from '@/lib/stats/normal';

type EnginePanel = { obligors: number[]; defaults: number[]; momentVariance: { rho: number | null } };
const panels = engine.panels as unknown as Record<string, EnginePanel>;

describe('momentVarianceAutocorrected', () => {
  it('solves the moment equation at the plain variance divided by the AR(1) bias factor at the clipped r_1', () => {
    for (const [name, panel] of Object.entries(panels)) {
      const e = momentVarianceAutocorrected(panel);
      const plain = momentVariance(panel);
      if (plain.rho === null) {
        expect(e.status, name).toBe('undefined');
        continue;
      }
      const T = panel.obligors.length;
      const dr = panel.obligors.map((n, t) => panel.defaults[t] / n);
      const p = dr.reduce((a, b) => a + b) / T;
      const s2 = dr.reduce((a, x) => a + (x - p) ** 2, 0) / (T - 1);
      // r_1 as in the diagnostics (Box & Jenkins 1976, eq. 2.1.12), computed there independently
      const r1 = lag1Autocorrelation(dr);
      expect(Math.abs(sampleAutocorrelation(dr, 1) - r1)).toBeLessThan(1e-14);
      const r = Math.min(0.9, Math.max(-0.9, r1));
      // E[s2] / Var for an AR(1) with coefficient r, as tr(M Sigma) / (T - 1) (Anderson 1971, 8.2):
      // the centring matrix M = I - 11'/T against Sigma_ij = r^|i-j|, summed entry by entry here
      let trace = 0;
      for (let i = 0; i < T; i++) for (let j = 0; j < T; j++) trace += ((i === j ? 1 : 0) - 1 / T) * r ** Math.abs(i - j);
      const target = s2 / (trace / (T - 1));
      const m = momentTarget('momentVarianceAutocorrected', panel) as { target: number; correction: { lag1: number; lag1Used: number; factor: number } };
      expect(Math.abs(m.target / target - 1)).toBeLessThan(1e-13);
      expect(m.correction.lag1).toBe(sampleAutocorrelation(dr, 1));
      expect(m.correction.lag1Used).toBe(r);
      // the equation holds at the estimate (Vasicek 2002: Var of the large-pool default rate)
      expect(e.status, name).toBe('ok');
      const k = normalQuantile(p);
      expect(Math.abs(bivariateNormalExcess(k, k, e.rho!) / target - 1), name).toBeLessThan(1e-12);
      // a positive lag-1 autocorrelation raises the target above the plain one, a negative one lowers it
      if (r1 > 0) expect(e.rho!).toBeGreaterThan(plain.rho);
      if (r1 < 0) expect(e.rho!).toBeLessThan(plain.rho);
      expect(e.pd).toBe(plain.pd);
    }
  });

  it('equals momentVariance when r_1 = 0 (a panel built to have it)', () => {
    // DR = 3%, 2%, 1%, 2%: deviations 1, 0, -1, 0 (x 1e-2), lag-1 products 0, 0, 0, so r_1 = 0,
    // c = 1, and the estimate is momentVariance's (which estimators.test.ts checks against SciPy)
    const panel = { obligors: [1000, 1000, 1000, 1000], defaults: [30, 20, 10, 20] };
    const dr = [0.03, 0.02, 0.01, 0.02];
    expect(Math.abs(sampleAutocorrelation(dr, 1))).toBeLessThan(1e-14);
    expect(momentVarianceAutocorrected(panel).rho).toBeCloseTo(momentVariance(panel).rho!, 14);
  });

  it('uses r_1 clipped to 0.9 for a near random walk and says so in the target', () => {
    // default rates rising steadily: the lag-1 sample autocorrelation of a linear trend of T points
    // is about 1 - 3 / T (from memory), 0.95 at T = 60, beyond the clip
    const T = 60;
    const panel = { obligors: new Array(T).fill(10000), defaults: Array.from({ length: T }, (_, t) => 10 + 5 * t + (t % 2)) };
    const m = momentTarget('momentVarianceAutocorrected', panel) as { correction: { lag1: number; lag1Used: number; factor: number } };
    expect(m.correction.lag1).toBeGreaterThan(0.9);
    expect(m.correction.lag1Used).toBe(0.9);
    expect(momentVarianceAutocorrected(panel).status).not.toBe('not-converged');
  });

  it('gives a status and a sentence where it has no value', () => {
    expect(momentVarianceAutocorrected({ obligors: [100, 100], defaults: [1, 2] })).toMatchObject({ status: 'undefined', reason: expect.stringMatching(/at least 3 periods/) });
    expect(momentVarianceAutocorrected({ obligors: [100, 100, 100], defaults: [0, 0, 0] })).toMatchObject({ status: 'undefined', reason: expect.stringMatching(/No period has a default/) });
    expect(momentVarianceAutocorrected({ obligors: [100, 200, 300], defaults: [1, 2, 3] })).toMatchObject({ status: 'undefined', reason: expect.stringMatching(/same in every period/) });
    expect(() => momentVarianceAutocorrected({ obligors: [100, 200, 300], defaults: [1, 2, 301] })).toThrow(/period 3/);
    expect(() => sampleAutocorrelation([1, 1, 1], 1)).toThrow(/constant/);
  });
});
