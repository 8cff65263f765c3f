import { describe, expect, it } from 'vitest';
import { HigherMaximumError, likelihoodRatioEnds } from '@/lib/stats/intervals/likelihood-ratio';

describe('likelihoodRatioEnds', () => {
  it('gives estimate -+ z sigma for a normal log-likelihood, where the LR and Wald intervals agree', () => {
    // l(theta) = -(theta - 2)^2 / (2 sigma^2): the LR interval is 2 -+ sigma sqrt(chi2_1(level))
    // = 2 -+ 1.959964 sigma at 95% and 2 -+ 1.644854 sigma at 90% (A&S table 26.1)
    const sigma = 0.3;
    const f = (t: number) => ({ logLik: -((t - 2) ** 2) / (2 * sigma * sigma), slope: -(t - 2) / (sigma * sigma) });
    for (const [level, z] of [[0.95, 1.959963985], [0.9, 1.644853627]]) {
      const r = likelihoodRatioEnds(f, { estimate: 2, maxLogLik: 0, lower: -10, upper: 10, level });
      expect(Math.abs(r.lower - (2 - z * sigma))).toBeLessThan(1e-7);
      expect(Math.abs(r.upper - (2 + z * sigma))).toBeLessThan(1e-7);
      expect(r).toMatchObject({ lowerAtBound: false, upperAtBound: false, converged: true });
    }
  });

  it('finds the ends of a skewed profile without slopes (bisection) and with them alike', () => {
    // Poisson log-likelihood of 4 events: l(m) = 4 log m - m, max at 4; ends solve l = l(4) - 1.9207
    const drop = 1.920729410347062;
    const l = (m: number) => 4 * Math.log(m) - m;
    const withSlope = likelihoodRatioEnds((m) => ({ logLik: l(m), slope: 4 / m - 1 }), { estimate: 4, maxLogLik: l(4), lower: 1e-9, upper: 50 });
    const without = likelihoodRatioEnds((m) => ({ logLik: l(m), slope: null }), { estimate: 4, maxLogLik: l(4), lower: 1e-9, upper: 50 });
    for (const r of [withSlope, without]) {
      expect(Math.abs(l(r.lower) - (l(4) - drop))).toBeLessThan(1e-6);
      expect(Math.abs(l(r.upper) - (l(4) - drop))).toBeLessThan(1e-6);
      expect(r.lower).toBeLessThan(4);
      expect(r.upper).toBeGreaterThan(4);
    }
    expect(Math.abs(withSlope.lower - without.lower)).toBeLessThan(1e-6);
  });

  it('reports a bound as the end where the profile stays above the cut-off', () => {
    const f = (t: number) => ({ logLik: -0.1 * t * t, slope: -0.2 * t });
    const r = likelihoodRatioEnds(f, { estimate: 0, maxLogLik: 0, lower: -1, upper: 10 });
    expect(r.lower).toBe(-1);
    expect(r.lowerAtBound).toBe(true);
    expect(r.upperAtBound).toBe(false);
    // a maximum at the bound: l = -(t + 2)^2 on [-1, 10] is largest at -1; upper end -2 + sqrt(1 + 1.9207)
    const g = (t: number) => ({ logLik: -((t + 2) ** 2), slope: -2 * (t + 2) });
    const atEdge = likelihoodRatioEnds(g, { estimate: -1, maxLogLik: -1, lower: -1, upper: 10 });
    expect(atEdge).toMatchObject({ lower: -1, lowerAtBound: true, upperAtBound: false });
    expect(Math.abs(atEdge.upper - (-2 + Math.sqrt(1 + 1.920729410347062)))).toBeLessThan(1e-7);
  });

  it('says when the profile rises above the stated maximum, and refuses bad input', () => {
    const f = (t: number) => ({ logLik: -((t - 1) ** 2), slope: -2 * (t - 1) });
    expect(() => likelihoodRatioEnds(f, { estimate: 0, maxLogLik: -1, lower: -5, upper: 5 })).toThrow(HigherMaximumError);
    expect(() => likelihoodRatioEnds(f, { estimate: 9, maxLogLik: 0, lower: -5, upper: 5 })).toThrow(/outside/);
    expect(() => likelihoodRatioEnds(f, { estimate: 1, maxLogLik: 0, lower: -5, upper: 5, level: 1 })).toThrow(RangeError);
  });
});
