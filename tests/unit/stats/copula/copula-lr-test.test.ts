import { describe, expect, it } from 'vitest';
import {
  copulaBootstrapRange,
  copulaPowerRange,
  summariseCopulaPower,
  summariseCopulaTest,
  type CopulaLrReplication,
} from '@/lib/stats/copula-lr-test';
import { chiSquareDeviate } from '@/lib/stats/simulate-t-copula';
import { createRng } from '@/lib/stats/random';

const spec = { obligors: [400, 450, 420, 480, 500], pd: 0.02, rho: 0.05, seed: 20261204 };

describe('likelihood-ratio test of the Gaussian copula against the t copula', () => {
  it('gives the same replications whatever the split into slices (seeded per replication)', () => {
    // reproducibility rule of DEVELOPERS.md (deriveSeed per replication)
    const whole = copulaBootstrapRange(spec, 0, 3);
    const parts = [...copulaBootstrapRange(spec, 2, 3), ...copulaBootstrapRange(spec, 0, 2)].sort((a, b) => a.index - b.index);
    expect(parts).toEqual(whole);
    for (const r of whole) expect(r.statistic === null || r.statistic >= 0).toBe(true);
    const power = copulaPowerRange({ ...spec, nu: 4 }, 0, 2);
    expect(copulaPowerRange({ ...spec, nu: 4 }, 1, 2)[0]).toEqual(power[1]);
  });

  it('forms the Monte Carlo p-value (1 + #{LR_b >= LR}) / (B + 1), the 95% quantile and the 50:50 chi-square mixture', () => {
    // Davison & Hinkley (1997), section 4.2; Hyndman & Fan (1996) definition 7; Self & Liang (1987): 0.5 P(chi2_1 >= 2.71) = 0.0500
    const reps: CopulaLrReplication[] = Array.from({ length: 19 }, (_, i) => ({ index: i, statistic: i * 0.5 }));
    reps.push({ index: 19, statistic: null, reason: 'no defaults' });
    const test = summariseCopulaTest(7, reps);
    // statistics >= 7: 7, 7.5, 8, 8.5, 9 -> 5 of 19 that gave one
    expect(test.pValue).toBeCloseTo(6 / 20, 12);
    expect(test.failed).toBe(1);
    expect(test.replications).toBe(20);
    expect(test.criticalValue).toBeCloseTo(0.95 * 18 * 0.5, 12);
    expect(summariseCopulaTest(2.705543454095404, reps).pValueAsymptotic).toBeCloseTo(0.05, 10);
    expect(summariseCopulaTest(0, reps).pValueAsymptotic).toBe(1);
    const power = summariseCopulaPower(4, reps);
    expect(power.rejectRate).toBeCloseTo(10 / 19, 12);
    expect(() => summariseCopulaTest(1, reps.slice(1))).toThrow(/missing, repeated/);
  });

  it('draws chi-square deviates with the right mean and variance (the mixing variable of the power study)', () => {
    // chi-square(nu): mean nu, variance 2 nu (Johnson, Kotz & Balakrishnan 1994, ch. 18); 20,000 draws, tolerance 4 standard errors
    for (const nu of [0.7, 3, 4.5, 30]) {
      const rng = createRng(7);
      const N = 20000;
      let s = 0;
      let s2 = 0;
      for (let i = 0; i < N; i++) {
        const v = chiSquareDeviate(nu, rng);
        s += v;
        s2 += v * v;
      }
      const mean = s / N;
      const variance = s2 / N - mean * mean;
      expect(Math.abs(mean - nu), `nu=${nu}`).toBeLessThan(4 * Math.sqrt((2 * nu) / N));
      expect(Math.abs(variance / (2 * nu) - 1), `nu=${nu}`).toBeLessThan(0.08);
    }
  });
});
