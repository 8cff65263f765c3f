/**
 * Statistical behaviour of the estimators on panels simulated from known (p, rho):
 * long panels recover the truth within their sampling error, and the profile-likelihood interval
 * covers the truth at close to its nominal rate. Every simulation is seeded, so each check is
 * deterministic; its tolerance is derived from the sampling error it allows for (stated beside it).
 */
import { describe, expect, it } from 'vitest';
import { binomialMleWithProfile } from '@/lib/stats/estimators/binomial-mle';
import { vasicekMle } from '@/lib/stats/estimators/vasicek-mle';
import { profileInterval } from '@/lib/stats/intervals/profile';
import { waldInterval } from '@/lib/stats/intervals/wald';
import { createRng, deriveSeed } from '@/lib/stats/random';
import { simulatePanel } from '@/lib/stats/simulate';
import { vasicekVariance } from '@/lib/stats/vasicek';

/** Cohort sizes that vary between periods (2,000 to 8,000), as real books do. */
function cohorts(T: number): number[] {
  return Array.from({ length: T }, (_, t) => 2000 + ((t * 2654435761) % 6001));
}

describe('long panels recover (p, rho) within their sampling error', () => {
  it.each([
    [0.01, 0.05, 1],
    [0.03, 0.15, 2],
    [0.005, 0.3, 3],
  ])('binomialMle at p = %f, rho = %f (T = 300)', (p, rho, seed) => {
    const T = 300;
    const sim = simulatePanel({ pd: p, rho, obligors: cohorts(T) }, createRng(seed));
    const { result, profile } = binomialMleWithProfile(sim);
    expect(result.status).toBe('ok');
    const wald = waldInterval(profile!, result)!;
    // Tolerance: 4 asymptotic standard errors of rho-hat (observed information; Wald 1943),
    // a two-sided tail probability of 6e-5 for the normal limit of the MLE.
    expect(Math.abs(result.rho! - rho)).toBeLessThan(4 * wald.se);
    // pd: 4 standard errors of the mean default rate of T periods, sqrt(Var_Vasicek(DR) / T) plus
    // the binomial noise p (1 - p) / n (the MLE of p is at least as precise as that mean).
    const sePd = Math.sqrt((vasicekVariance(p, rho) + (p * (1 - p)) / 2000) / T);
    expect(Math.abs(result.pd! - p)).toBeLessThan(4 * sePd);
  });

  it('the closed-form estimator recovers rho for very large cohorts (T = 300)', () => {
    // With n = 1e7 the binomial noise is negligible and x_t = Phi^-1(DR_t) is normal with variance
    // rho / (1 - rho); rho-hat = s2 / (1 + s2) has asymptotic se sqrt(2 / T) rho (1 - rho)
    // (delta method on var(s2) = 2 sigma^4 / T). Tolerance: 4 of those.
    const T = 300;
    const rho = 0.12;
    const sim = simulatePanel({ pd: 0.02, rho, obligors: new Array(T).fill(10_000_000) }, createRng(4));
    const est = vasicekMle(sim);
    expect(est.status).toBe('ok');
    expect(Math.abs(est.rho! - rho)).toBeLessThan(4 * Math.sqrt(2 / T) * rho * (1 - rho));
  });
});

describe('the profile-likelihood interval covers the truth at close to its nominal rate', () => {
  it('95% interval at T = 20, p = 0.02, rho = 0.1, cohorts of 1,000 to 3,000 (R = 300, seeded)', () => {
    // Tolerance: 3 binomial standard deviations of the coverage count, 3 sqrt(0.95 0.05 / R)
    // = 0.038 for R = 300 (Morris, White & Crowther 2019, table 6). Likelihood-ratio intervals are
    // accurate to O(1/T) in coverage (Wilks 1938), well inside that at T = 20.
    const R = 300;
    const rho = 0.1;
    const obligors = Array.from({ length: 20 }, (_, t) => 1000 + ((t * 7919) % 2001));
    let covered = 0;
    let available = 0;
    for (let r = 0; r < R; r++) {
      const sim = simulatePanel({ pd: 0.02, rho, obligors }, createRng(deriveSeed(99, r)));
      const { result, profile } = binomialMleWithProfile(sim);
      if (result.rho === null || !profile) continue;
      const iv = profileInterval(profile, result, 0.95);
      available++;
      if (iv.lower <= rho && rho <= iv.upper) covered++;
    }
    expect(available).toBe(R); // every simulated panel has defaults at p = 2% and n >= 1000
    const coverage = covered / R;
    expect(Math.abs(coverage - 0.95)).toBeLessThan(3 * Math.sqrt((0.95 * 0.05) / R));
  });
});
