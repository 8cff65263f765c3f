import { describe, expect, it } from 'vitest';
import {
  lrTestSentences,
  mixingLawNotes,
  nuIdentificationSentence,
  nuText,
  observedExceedance,
  openInterval,
  PIT_INTRODUCTION,
  pitRows,
  pitSentences,
  powerSentence,
  smallRho,
  tailCurves,
} from '@/lib/fits/mixing-laws-view';
import type { FitSegmentResult } from '@/lib/fits/results';
import type { ModelComparison } from '@/lib/stats/mixing-laws-block';
import rq from '@/tests/fixtures/copula/rate-quantiles.json';

const test = (pValue: number | null, extra: Partial<NonNullable<ModelComparison['lrTestGaussianVsT']>> = {}) => ({
  lrTestGaussianVsT: { statistic: 1.234, pValue, pValueAsymptotic: 0.1333, replications: 200, criticalValue: 2.5, failed: 0, ...extra },
});

describe('the sentences of the mixing laws', () => {
  it('leads with the bootstrap p-value and gives the asymptotic one after it, labelled', () => {
    const s = lrTestSentences(test(0.31));
    expect(s[0]).toBe('Likelihood-ratio statistic of the Gaussian copula against the t copula: 1.234. Its bootstrap p-value is 0.3100 (200 panels simulated under the fitted Gaussian model).');
    expect(s[1]).toMatch(/^The data do not reject the Gaussian copula at 5%/);
    expect(s.at(-1)).toMatch(/^Asymptotic p-value \(the 50:50 mixture of χ²₀ and χ²₁, Self & Liang 1987\): 0\.1333; with a few dozen years it is far from its nominal level/);
    expect(s.findIndex((x) => x.includes('bootstrap p-value'))).toBeLessThan(s.findIndex((x) => x.startsWith('Asymptotic')));
    // below 5% (the test's level, common practice): rejected
    expect(lrTestSentences(test(0.01))[1]).toBe('The data reject the Gaussian copula at 5% in favour of the fatter joint tail of the t copula.');
    expect(lrTestSentences(test(0.2, { failed: 1, replications: 199 }))[0]).toContain('(199 panels simulated under the fitted Gaussian model; 1 simulated panel could not be fitted and is left out)');
  });

  it('never leads with the asymptotic p-value, even without a bootstrap; says why the test did not run', () => {
    const s = lrTestSentences(test(null));
    expect(s[0]).toContain('No bootstrap was run, so the test has no p-value that can be relied on here.');
    expect(s[0]).not.toContain('0.1333');
    expect(lrTestSentences({ lrTestGaussianVsT: null }, { status: 'undefined', reason: 'The panel has no defaults.' })).toEqual([
      'The likelihood-ratio test of the Gaussian copula against the t copula could not run: it needs both maxima (the t copula is undefined: The panel has no defaults.).',
    ]);
  });

  it('says that low power (under 50%) makes the Gaussian choice a convention, not a finding', () => {
    const low = powerSentence({ ...test(0.4), power: { replications: 200, rejectRate: 0.12, failed: 0, nu: 5 } });
    expect(low).toBe(
      "Power: of 200 panels simulated from a t copula with ν = 5.00 at these cohort sizes and years, 12.0% give a statistic above the test's 5% critical value (2.500). This history cannot distinguish the laws, so the Gaussian choice is a convention, not a finding.",
    );
    const high = powerSentence({ ...test(0.4), power: { replications: 200, rejectRate: 0.5, failed: 0, nu: 4.2 } });
    expect(high).toMatch(/50\.0% give a statistic .* A tail that fat would usually be detected here\.$/);
    expect(powerSentence({ lrTestGaussianVsT: null, power: null })).toBeNull();
  });

  it('writes unbounded interval ends, the Gaussian limit of nu, and a zero correlation without a minus sign', () => {
    expect(openInterval({ lower: 0.012, upper: null })).toBe('[0.0120, unbounded]');
    expect(openInterval({ lower: 3.1, upper: 40.25 }, (v) => v.toFixed(2))).toBe('[3.10, 40.25]');
    expect(openInterval(null)).toBe('—');
    expect(nuText(null, 'ok')).toBe('∞ (Gaussian limit)');
    expect(nuText(null, 'undefined')).toBe('—');
    expect(nuText(6.214, 'ok')).toBe('6.21');
    expect(smallRho(-6.9e-19)).toBe('0.0000');
    expect(smallRho(0.01234)).toBe('0.0123');
    expect(smallRho(Number.NaN)).toBe('—');
    expect(nuIdentificationSentence({ nuProfileFlat: true, nu: null })).toMatch(/^The profile likelihood of ν is flat/);
    expect(nuIdentificationSentence({ nuProfileFlat: false, nu: 5 })).toBeNull();
  });

  it('places the observed rates at i / (T + 1), highest first (Weibull plotting position, Gumbel 1958)', () => {
    expect(observedExceedance([0.01, 0.03, 0.02])).toEqual([
      { rate: 0.03, exceed: 0.25 },
      { rate: 0.02, exceed: 0.5 },
      { rate: 0.01, exceed: 0.75 },
    ]);
  });

  it('draws each law as its quantiles from 98% down to 1 in 10,000, with the Gaussian ones of SciPy', () => {
    const g = rq.gaussian[0];
    const [curve] = tailCurves([{ law: 'gaussian', logLik: 0, pd: g.p, rho: g.rho }], 5);
    const ex = curve.points!.map((p) => p.exceed);
    expect(ex[0]).toBeCloseTo(0.98, 12);
    expect(ex[4]).toBeCloseTo(1e-4, 12);
    for (let i = 1; i < 5; i++) expect(ex[i] / ex[i - 1]).toBeCloseTo((1e-4 / 0.98) ** 0.25, 10);
    // the 99.99% quantile, computed with SciPy 1.17 by tests/fixtures/copula/make_rate_quantiles.py
    expect(curve.points![4].rate).toBeCloseTo(g.x[4], 10);
    for (let i = 1; i < 5; i++) expect(curve.points![i].rate).toBeGreaterThan(curve.points![i - 1].rate);
    const bad = tailCurves([{ law: 'gaussian', logLik: 0, pd: 2, rho: 0.1 }], 3)[0];
    expect(bad.points).toBeNull();
    expect('reason' in bad && bad.reason).toMatch(/p/);
  });

  it('says why no law is compared (no defaults) and which laws are left out', () => {
    const seg = {
      T: 5,
      observed: [],
      estimates: {
        binomialMle: { rho: null, pd: null, status: 'undefined', reason: 'The panel has no defaults: rho is not identified.' },
        tCopula: { status: 'undefined', reason: 'The panel has no defaults: p has no interior maximum, so the t copula is not estimated.' },
      },
      modelComparison: { laws: [], lrTestGaussianVsT: null, power: null, cautions: [] },
    } as unknown as FitSegmentResult;
    expect(mixingLawNotes(seg)).toEqual([
      'No law can be compared on this segment: the Gaussian model has no maximum (The panel has no defaults: rho is not identified).',
      'Student-t copula: undefined. The panel has no defaults: p has no interior maximum, so the t copula is not estimated.',
    ]);
  });
});

describe('the probability integral transform of each law', () => {
  const law = (name: 'gaussian' | 't', pValue: number, upper: number[], lower: number[]) => ({
    law: name,
    logLik: -30,
    parameters: 2,
    aic: 64,
    bic: 65,
    quantile99: 0.05,
    quantile999: 0.08,
    quantile99Ratio: 1,
    quantile999Ratio: 1,
    jointDefault: 2e-4,
    defaultCorrelation: 0.01,
    tailDependence: 0,
    pit: {
      method: 'mid' as const,
      values: [0.12, 0.999, 0.002],
      below: [0.1, 0.998, 0],
      atOrBelow: [0.14, 1, 0.004],
      uniformity: { test: 'kolmogorov-smirnov' as const, randomised: true as const, seed: 9, statistic: 0.4567, pValue },
      tails: { level: 0.01, upper, lower },
    },
  });
  const seg = (laws: ReturnType<typeof law>[] | Record<string, unknown>[]) =>
    ({
      T: 3,
      estimates: {},
      observed: [
        { period: '2019', obligors: 500, defaults: 3, dr: 0.006 },
        { period: '2020', obligors: 500, defaults: 40, dr: 0.08 },
        { period: '2021', obligors: 500, defaults: 0, dr: 0 },
      ],
      modelComparison: { laws, lrTestGaussianVsT: null, power: null, cautions: [] },
    }) as unknown as FitSegmentResult;

  it('spells out the name before PIT and gives each law its test, verdict at 5% and tail years by period', () => {
    // the tail rule and the test are law-count-pit.ts's (Kolmogorov-Smirnov on the randomised PIT); the 5% level is common practice
    expect(PIT_INTRODUCTION).toMatch(/^The probability integral transform \(PIT\)/);
    const s = pitSentences(seg([law('gaussian', 0.02, [1], [2]), law('t', 0.5, [], [])]));
    expect(s[0]).toBe(
      "Under the Gaussian copula: Kolmogorov-Smirnov D = 0.457, p = 0.0200 (exact, on the randomised PIT drawn with seed 9), so the PIT is not uniform at 5%: the Gaussian copula does not describe these years' counts; years in its outer 1%: 2020 in the upper tail (P(D ≥ d) below 0.5%); 2021 in the lower tail (P(D ≤ d) below 0.5%).",
    );
    expect(s[1]).toMatch(/^Under the t copula: .* p = 0\.5000 .*no evidence against uniformity at 5% \(with so few years the test has little power\); no year lies in its outer 1%\.$/);
    expect(s.at(-1)).toMatch(/does not allow for the law's values being fitted to the same years/);
    const rows = pitRows(seg([law('gaussian', 0.02, [1], [2])]));
    expect(rows.map((r) => [r.period, r.cells[0].value, r.cells[0].tail])).toEqual([
      ['2019', 0.12, null],
      ['2020', 0.999, 'upper'],
      ['2021', 0.002, 'lower'],
    ]);
  });

  it('says when a law has no PIT, and when the fit was stored before the PIT existed', () => {
    const failed = { ...law('t', 0.5, [], []), pit: null, pitNote: 'The probability integral transform under the t copula could not be computed: x.' };
    expect(pitSentences(seg([law('gaussian', 0.3, [], []), failed]))).toContain(failed.pitNote);
    const { pit: _p, ...old } = law('gaussian', 0.3, [], []);
    expect(pitSentences(seg([old]))).toEqual(['This fit was computed before the engine gave each law its probability integral transform (PIT): run the fit again to see it.']);
    expect(pitRows(seg([old]))).toEqual([]);
  });
});
