import chisquareQuantile from '@stdlib/stats-base-dists-chisquare-quantile';
import { describe, expect, it } from 'vitest';
import ref from '@/tests/fixtures/time/chi-square-fixtures.json';
import { vasicekMle } from '@/lib/stats/estimators/vasicek-mle';
import { vasicekChiSquareInterval, type ChiSquareInterval } from '@/lib/stats/intervals/chi-square';
import { createRng, deriveSeed } from '@/lib/stats/random';
import { simulatePanel } from '@/lib/stats/simulate';

describe('vasicekChiSquareInterval', () => {
  it('uses chi-square quantiles that match SciPy', () => {
    for (const q of ref.quantiles) {
      // computed with SciPy 1.17 (tests/fixtures/time/make_chi_square.py, scipy.stats.chi2.ppf)
      expect(Math.abs(chisquareQuantile(q.p, q.df) / q.q - 1)).toBeLessThan(1e-12);
    }
  });

  it.each(ref.cases.map((c) => [c.panel, c.level, c] as const))('panel %s at level %s matches SciPy', (_name, level, c) => {
    const iv = vasicekChiSquareInterval({ obligors: c.obligors, defaults: c.defaults }, level);
    expect(iv.status).toBe('ok');
    const ok = iv as ChiSquareInterval;
    // computed with SciPy 1.17 (tests/fixtures/time/make_chi_square.py)
    expect(Math.abs(ok.lower / c.lower - 1)).toBeLessThan(1e-12);
    expect(Math.abs(ok.upper / c.upper - 1)).toBeLessThan(1e-12);
    expect(ok.approximation).toMatch(/chi-square with T - 1 degrees of freedom/);
    const rho = vasicekMle({ obligors: c.obligors, defaults: c.defaults }).rho!;
    expect(Math.abs(rho - c.rhoHat)).toBeLessThan(1e-14); // SciPy's closed form, same script
    if (level >= 0.9) {
      // at 90% and above the estimate (divisor T) lies inside; at 50% and T = 2 it need not
      // (chi2_1 median 0.455 < T = 2: the estimate is below the interval)
      expect(ok.lower).toBeLessThan(rho);
      expect(ok.upper).toBeGreaterThan(rho);
    }
  });

  it('is nested: a higher level gives a wider interval (property)', () => {
    const panel = { obligors: ref.cases[0].obligors, defaults: ref.cases[0].defaults };
    const a = vasicekChiSquareInterval(panel, 0.5) as ChiSquareInterval;
    const b = vasicekChiSquareInterval(panel, 0.9) as ChiSquareInterval;
    const c = vasicekChiSquareInterval(panel, 0.99) as ChiSquareInterval;
    expect(c.lower).toBeLessThan(b.lower);
    expect(b.lower).toBeLessThan(a.lower);
    expect(a.upper).toBeLessThan(b.upper);
    expect(b.upper).toBeLessThan(c.upper);
  });

  it('covers rho at the nominal rate for very large cohorts (seeded Monte Carlo, 400 panels)', () => {
    // With n = 10^8 the binomial noise of DR is ~1e-4 relative: the large-pool model holds, where
    // the interval is exact (Cochran's theorem). Tolerance: 3 binomial standard deviations of a
    // coverage of 0.95 over 400 panels (3 x 0.0109).
    const obligors = new Array(10).fill(100_000_000);
    let covered = 0;
    const R = 400;
    for (let r = 0; r < R; r++) {
      const sim = simulatePanel({ pd: 0.05, rho: 0.1, obligors }, createRng(deriveSeed(2024, r)));
      const iv = vasicekChiSquareInterval(sim, 0.95) as ChiSquareInterval;
      if (iv.lower <= 0.1 && 0.1 <= iv.upper) covered++;
    }
    expect(Math.abs(covered / R - 0.95)).toBeLessThan(3 * Math.sqrt((0.95 * 0.05) / R));
  });

  it('gives a status and a sentence where it has no interval, and refuses bad input', () => {
    const zero = vasicekChiSquareInterval({ obligors: [100, 100, 100], defaults: [1, 0, 2] });
    expect(zero).toMatchObject({ status: 'undefined', reason: expect.stringMatching(/Period 2 has a default rate of 0/) });
    expect(vasicekChiSquareInterval({ obligors: [100], defaults: [3] })).toMatchObject({ status: 'undefined', reason: expect.stringMatching(/at least 2 periods/) });
    expect(vasicekChiSquareInterval({ obligors: [100, 200], defaults: [3, 6] })).toMatchObject({ status: 'undefined', reason: expect.stringMatching(/same default rate/) });
    expect(() => vasicekChiSquareInterval({ obligors: [100, 200], defaults: [3, 7] }, 1)).toThrow(RangeError);
    expect(() => vasicekChiSquareInterval({ obligors: [100, 200], defaults: [3, 700] })).toThrow(/period 2/);
  });
});
