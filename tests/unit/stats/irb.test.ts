import { describe, expect, it } from 'vitest';
import {
  capitalRequirement,
  maturityAdjustment,
  riskWeight,
  supervisoryCorrelation,
  type AssetClass,
} from '@/lib/stats/irb';

const corp = (pd: number) => supervisoryCorrelation('corporate', pd);

describe('supervisoryCorrelation', () => {
  it('corporate: 0.24 as PD -> 0 and 0.12 as PD -> 1 (BCBS 2006 para 272)', () => {
    expect(corp(1e-12)).toBeCloseTo(0.24, 10);
    expect(corp(0.999999)).toBeCloseTo(0.12, 12);
    // decreasing in PD between the two
    expect(corp(0.001)).toBeGreaterThan(corp(0.01));
    expect(corp(0.01)).toBeGreaterThan(corp(0.1));
  });

  it('corporate at PD 1%: 0.12 w + 0.24 (1 - w), w = (1 - e^-0.5)/(1 - e^-50) (BCBS 2006 para 272, by hand)', () => {
    const w = (1 - Math.exp(-0.5)) / (1 - Math.exp(-50));
    expect(corp(0.01)).toBeCloseTo(0.12 * w + 0.24 * (1 - w), 15);
  });

  it('SME: -0.04 (1 - (S - 5)/45), S clipped to [5, 50] (BCBS 2006 para 273)', () => {
    const pd = 0.02;
    const sme = (s: number) => supervisoryCorrelation('sme-corporate', pd, { turnoverMillions: s });
    expect(sme(5)).toBeCloseTo(corp(pd) - 0.04, 15);
    expect(sme(1)).toBeCloseTo(corp(pd) - 0.04, 15); // below 5 treated as 5
    expect(sme(27.5)).toBeCloseTo(corp(pd) - 0.02, 15);
    expect(sme(50)).toBeCloseTo(corp(pd), 15);
    expect(sme(400)).toBeCloseTo(corp(pd), 15);
    expect(() => supervisoryCorrelation('sme-corporate', pd)).toThrow(/needs turnoverMillions/);
  });

  it('retail: mortgage 0.15 (para 328), qualifying revolving 0.04 (paras 229/330), other retail 0.16 -> 0.03 (para 330)', () => {
    expect(supervisoryCorrelation('residential-mortgage', 0.01)).toBe(0.15);
    expect(supervisoryCorrelation('qualifying-revolving', 0.07)).toBe(0.04);
    expect(supervisoryCorrelation('other-retail', 1e-12)).toBeCloseTo(0.16, 10);
    expect(supervisoryCorrelation('other-retail', 0.999999)).toBeCloseTo(0.03, 12);
    const w = (1 - Math.exp(-35 * 0.05)) / (1 - Math.exp(-35));
    expect(supervisoryCorrelation('other-retail', 0.05)).toBeCloseTo(0.03 * w + 0.16 * (1 - w), 15);
  });

  it('refuses unknown classes and PDs outside (0, 1)', () => {
    expect(() => supervisoryCorrelation('sovereign' as AssetClass, 0.01)).toThrow(/unknown asset class 'sovereign'/);
    expect(() => corp(0)).toThrow(/pd must be strictly between 0 and 1/);
    expect(() => corp(1)).toThrow(RangeError);
    expect(() => corp(Number.NaN)).toThrow(RangeError);
  });
});

describe('maturityAdjustment', () => {
  it('is (1 + (M - 2.5) b)/(1 - 1.5 b), b = (0.11852 - 0.05478 ln PD)^2 (BCBS 2006 para 272, by hand)', () => {
    const b = (0.11852 - 0.05478 * Math.log(0.01)) ** 2;
    expect(maturityAdjustment(0.01, 2.5)).toBeCloseTo(1 / (1 - 1.5 * b), 15);
    expect(maturityAdjustment(0.01, 1)).toBeCloseTo((1 - 1.5 * b) / (1 - 1.5 * b), 15); // = 1 at M = 1
    expect(maturityAdjustment(0.01, 5)).toBeGreaterThan(maturityAdjustment(0.01, 2.5));
  });

  it('refuses maturities outside [1, 5] years (BCBS 2006 para 320)', () => {
    expect(() => maturityAdjustment(0.01, 0.5)).toThrow(/between 1 and 5 years/);
    expect(() => maturityAdjustment(0.01, 7)).toThrow(RangeError);
  });
});

describe('capitalRequirement and riskWeight', () => {
  it('reproduces the illustrative corporate risk weights, LGD 45%, M 2.5, no 1.06 (BCBS 2006 illustrative table, from memory, to 0.01%)', () => {
    const table: [number, number][] = [
      [0.0003, 14.44],
      [0.001, 29.65],
      [0.01, 92.32],
      [0.013, 100.95],
      [0.1, 193.09],
      [0.2, 238.23],
    ];
    for (const [pd, rwPercent] of table) {
      const rw = riskWeight({ pd, lgd: 0.45, rho: corp(pd), maturityYears: 2.5 });
      expect(Math.abs(100 * rw - rwPercent), `PD ${pd}`).toBeLessThan(0.005);
    }
  });

  it('applies the 1.06 scaling only when asked (2006 framework para 44 vs 2017 framework)', () => {
    const opts = { pd: 0.01, lgd: 0.45, rho: corp(0.01), maturityYears: 2.5 };
    expect(riskWeight({ ...opts, scaling: 1.06 })).toBeCloseTo(1.06 * riskWeight(opts), 15);
    expect(riskWeight(opts)).toBeCloseTo(12.5 * capitalRequirement(opts), 15);
    expect(() => riskWeight({ ...opts, scaling: 1.2 as 1 })).toThrow(/scaling must be 1/);
  });

  it('K is the conditional expected loss at the 99.9% factor quantile minus EL (BCBS 2005 section 3, by hand)', () => {
    // at rho = 0 the conditional PD is the PD: no unexpected loss
    expect(capitalRequirement({ pd: 0.02, lgd: 0.45, rho: 0 })).toBeCloseTo(0, 15);
    // retail mortgage at PD 1%, LGD 25%, no maturity adjustment: K = 0.25 (Phi((Phi^-1(0.01) + sqrt(0.15) 3.0902)/sqrt(0.85)) - 0.01)
    const k = capitalRequirement({ pd: 0.01, lgd: 0.25, rho: 0.15 });
    expect(k).toBeGreaterThan(0.02);
    expect(k).toBeLessThan(0.03);
    // LGD enters linearly
    expect(capitalRequirement({ pd: 0.01, lgd: 0.5, rho: 0.15 })).toBeCloseTo(2 * k, 15);
  });

  it('refuses bad inputs with a sentence', () => {
    expect(() => capitalRequirement({ pd: 0.01, lgd: 1.2, rho: 0.1 })).toThrow(/lgd must be in \[0, 1\]/);
    expect(() => capitalRequirement({ pd: 0.01, lgd: 0.4, rho: 1 })).toThrow(/rho must be in \[0, 1\)/);
    expect(() => capitalRequirement({ pd: 0.01, lgd: 0.4, rho: 0.1, confidence: 1 })).toThrow(/confidence/);
    expect(() => capitalRequirement({ pd: 1, lgd: 0.4, rho: 0.1 })).toThrow(/para 272/);
  });
});

describe('capitalRequirement at rho = 0', () => {
  it('is exactly 0: with no systematic factor the stressed PD is the PD (BCBS 2005 explanatory note, sect. 4)', () => {
    for (const pd of [0.0003, 0.01, 0.2]) expect(capitalRequirement({ pd, lgd: 0.45, rho: 0 })).toBe(0);
  });
});
