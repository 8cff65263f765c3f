import { beforeAll, describe, expect, it } from 'vitest';
import { tCopulaMle, type TCopulaFit } from '@/lib/stats/estimators/t-copula-mle';
import { createRng } from '@/lib/stats/random';
import { simulateTCopulaPanel } from '@/lib/stats/simulate-t-copula';

/**
 * The check "panels simulated under t with nu = 4 and long T (T = 200, seeded) estimate nu
 * within its interval and reject the Gaussian", at values a practitioner meets: PD 2%, asset
 * correlation 0.1, 5,000 obligors a year (a retail or SME segment), 200 years. Five seeded panels.
 *
 * What the data allow (measured while writing this test on 18 seeded panels: this design with
 * seeds 1001-1006, the five below among them, and PD 1% with rho 0.15 and cohorts of 10,000, or rho
 * 0.1 and cohorts of 20,000, six seeds each): the profile interval of nu held 4 in 18 of 18, but the
 * likelihood-ratio statistic passed the asymptotic 5% critical value in only 9 of 18 (3 of the 5
 * below). Even 200 years identify nu = 4 weakly against a Gaussian copula whose rho is
 * re-fitted (the t law's default rates differ from the re-fitted Gaussian's mainly by a skewed
 * probit, the chi law of sqrt(V / nu)), so the power of the test at T = 200 is about one half, and
 * "at least 4 of 5 reject" would be a claim the method does not support. The counts below are
 * chosen from that power, not from these five panels.
 */
const DESIGN = { pd: 0.02, rho: 0.1, nu: 4, cohort: 5000, years: 200 };
const SEEDS = [1001, 1002, 1003, 1004, 1005];

/**
 * 5% critical value of the likelihood-ratio test of 1/nu = 0 (a boundary) against 1/nu > 0: the
 * 50:50 mixture of chi-square(0) and chi-square(1) (Self & Liang 1987, JASA 82:605-610, case 5),
 * whose 95% quantile is chi-square(1)'s 90% quantile, 2.705543 (computed with SciPy 1.17.1,
 * chi2.ppf(0.9, 1)). This is the asymptotic critical value, labelled as such: the review leads with
 * the parametric-bootstrap p-value (copula-lr-test.ts), which with B replications of a 200-year
 * panel for each of five panels would not fit the time of a unit test. At T = 200 the asymptotic
 * value is, if anything, conservative (the issue saw 0 of 60 rejections of Gaussian panels at
 * T = 20 against a nominal 5%), so it can only understate the power.
 */
const CRITICAL_VALUE_5PCT = 2.705543454095404;

let fits: TCopulaFit[] = [];

beforeAll(() => {
  fits = SEEDS.map((seed) => {
    const obligors = Array.from({ length: DESIGN.years }, () => DESIGN.cohort);
    const panel = simulateTCopulaPanel({ pd: DESIGN.pd, rho: DESIGN.rho, nu: DESIGN.nu, obligors }, createRng(seed));
    return tCopulaMle(panel);
  });
}, 180_000);

describe('t copula on long panels drawn with nu = 4 (T = 200, PD 2%, rho 0.1, cohorts of 5,000)', () => {
  it('estimates a finite nu whose profile interval holds 4 in at least 4 of 5 panels', () => {
    // Frey & McNeil (2003) for the model; the interval {nu : profile >= max - chi2_1(0.95) / 2}
    // (Wilks 1938; Venzon & Moolgavkar 1988) covers the true nu with probability ~0.95, so at least
    // 4 of 5 covering has probability 0.977 (binomial, computed with SciPy 1.17.1).
    let covering = 0;
    let finite = 0;
    for (const fit of fits) {
      expect(['ok', 'clipped']).toContain(fit.status);
      const iv = fit.nuInterval!;
      if (fit.nu !== null) {
        finite++;
        // the estimate lies in its own interval (an unbounded upper end is null)
        expect(fit.nu).toBeGreaterThanOrEqual(iv.lower! - 1e-9);
        if (iv.upper !== null) expect(fit.nu).toBeLessThanOrEqual(iv.upper + 1e-9);
      }
      if (iv.lower !== null && iv.lower <= DESIGN.nu && (iv.upper === null || iv.upper >= DESIGN.nu)) covering++;
    }
    expect(covering).toBeGreaterThanOrEqual(4);
    // a fat tail is found, not the Gaussian limit (nu = infinity), in at least 4 of 5
    expect(finite).toBeGreaterThanOrEqual(4);
  });

  it('rejects the Gaussian copula by the LR statistic against the asymptotic 5% critical value in at least 2 of 5 panels', () => {
    // Self & Liang (1987) for the critical value (above). With the power of about 0.5 measured at
    // this T (file comment), at least 2 of 5 rejections has probability 0.81; were the data Gaussian
    // (or the estimator blind to the tail), each panel would reject with probability 0.05 at most
    // and at least 2 of 5 would have probability 0.023 (binomial, computed with SciPy 1.17.1).
    const statistics = fits.map((fit) => Math.max(0, 2 * (fit.logLik! - fit.gaussianLogLik!)));
    for (const s of statistics) expect(Number.isFinite(s)).toBe(true);
    const rejections = statistics.filter((s) => s > CRITICAL_VALUE_5PCT).length;
    expect(rejections).toBeGreaterThanOrEqual(2);
    // and the statistics lean the right way: their median exceeds the median of the null mixture (0)
    // and of chi-square(1) (0.455, computed with SciPy 1.17.1, chi2.ppf(0.5, 1))
    const median = [...statistics].sort((a, b) => a - b)[2];
    expect(median).toBeGreaterThan(0.455);
  });
});
