import { describe, expect, it } from 'vitest';
import { pitSerialTest } from '@/lib/stats/autocorrelation';
import { fitPanel } from '@/lib/stats/fit-panel';
import { createRng, deriveSeed } from '@/lib/stats/random';
import { conditionalPd } from '@/lib/stats/vasicek';

/** A panel whose yearly factor follows an AR(1): Z_t = phi Z_{t-1} + sqrt(1 - phi^2) e_t, Z_1 stationary. */
function ar1Panel(phi: number, pd: number, rho: number, n: number, T: number, seed: number) {
  const rng = createRng(seed);
  const defaults: number[] = [];
  let z = rng.normal();
  for (let t = 0; t < T; t++) {
    if (t > 0) z = phi * z + Math.sqrt(1 - phi * phi) * rng.normal();
    defaults.push(rng.binomial(n, conditionalPd(pd, rho, z)));
  }
  return { segment: 'sim', periods: defaults.map((_, t) => String(2001 + t)), obligors: new Array(T).fill(n), defaults };
}

describe('pitSerialTest', () => {
  it('is the lag-1 autocorrelation of the normal scores against 1.96/sqrt(T)', () => {
    // definition (Diebold, Gunther & Tay 1998; Berkowitz 2001); Phi^-1(0.5) = 0, Phi^-1(0.8413447) = 1
    const r = pitSerialTest([0.5, 0.8413447460685429, 0.5, 0.8413447460685429]);
    expect(r.statistic).toBeCloseTo(-0.75, 9); // lag1 of [0, 1, 0, 1] (Box & Jenkins eq. 2.1.12)
    expect(r.threshold).toBeCloseTo(0.98, 12);
    expect(r.material).toBe(false);
    expect(() => pitSerialTest([0.3, 0.3, 0.3])).toThrow(/same/);
    expect(() => pitSerialTest([0.3, 1, 0.2])).toThrow(/value 2/);
  });

  it('runs on panels with zero-default years and sees a persistent factor that the implied-factor check misses', () => {
    // The engine-defects check: AR(1) factor with phi 0.6, p = 0.5%, n = 500, T = 20 (seeded Monte
    // Carlo of 40 panels a side). Under independence the 5% band rejects about 5% of panels
    // (binomial sd over 40: 3.4%); under phi = 0.6 the PIT test must reject more often, and
    // it must run on every panel although most have zero-default years.
    const rate = (phi: number, base: number) => {
      let ran = 0;
      let rejected = 0;
      let implied = 0;
      let zeroYears = 0;
      for (let r = 0; r < 40; r++) {
        const f = fitPanel(ar1Panel(phi, 0.005, 0.12, 500, 20, deriveSeed(base, r)), { models: ['independent'], stability: null });
        if (f.diagnostics.zeroDefaultPeriods > 0) zeroYears++;
        if (f.diagnostics.lag1Autocorrelation !== null) implied++;
        if (f.diagnostics.pitSerialTest === null) continue;
        ran++;
        if (f.diagnostics.pitSerialTest.material) rejected++;
      }
      return { ran, rejected: rejected / 40, implied, zeroYears };
    };
    const persistent = rate(0.6, 31);
    const independent = rate(0, 32);
    expect(persistent.zeroYears).toBeGreaterThan(30);
    expect(persistent.implied).toBeLessThan(10); // the implied-factor check could not run there
    expect(persistent.ran).toBe(40);
    expect(independent.ran).toBe(40);
    expect(independent.rejected).toBeLessThan(0.05 + 3 * 0.034);
    // measured: 7 of 40 against 1 of 40 (a screen at this size: 2.5 expected defaults a year)
    expect(persistent.rejected).toBeGreaterThan(independent.rejected + 0.1);
  });

  it("beside it, the AR(1) model's LR test of phi = 0 runs on every such panel and rejects more often under persistence", () => {
    // Same design, 20 panels a side (seeded): most have zero-default years, where the implied
    // factor is infinite; the AR(1) likelihood uses every year. At the 5% level the test should
    // reject about 1 in 20 independent panels (Wilks 1938); measured: 5 of 20 under phi = 0.6,
    // 0 of 20 independent.
    const rate = (phi: number, base: number) => {
      let ran = 0;
      let rejected = 0;
      for (let r = 0; r < 20; r++) {
        const f = fitPanel(ar1Panel(phi, 0.005, 0.12, 500, 20, deriveSeed(base, r)), { models: ['ar1'] });
        if (f.diagnostics.lrTestPhi0 === null) continue;
        ran++;
        if (f.diagnostics.lrTestPhi0.pValue < 0.05) rejected++;
      }
      return { ran, rejected };
    };
    const persistent = rate(0.6, 31);
    const independent = rate(0, 32);
    expect(persistent.ran).toBe(20);
    expect(independent.ran).toBe(20);
    expect(independent.rejected).toBeLessThanOrEqual(4); // binomial(20, 0.05): P(> 4) < 0.3%
    expect(persistent.rejected).toBeGreaterThanOrEqual(independent.rejected + 3);
  }, 120_000);
});
