import { describe, expect, it } from 'vitest';
import { binomialMle } from '@/lib/stats/estimators/binomial-mle';
import { TCopulaProfile, tCopulaMle } from '@/lib/stats/estimators/t-copula-mle';
import { createRng } from '@/lib/stats/random';
import { simulateTCopulaPanel } from '@/lib/stats/simulate-t-copula';
import { TCopulaLikelihood, tQuantile } from '@/lib/stats/t-copula-likelihood';

const panel = { obligors: [1200, 1350, 1500, 1400, 1300, 1250, 1600, 1700], defaults: [10, 25, 8, 14, 40, 12, 9, 22] };

describe('tCopulaMle', () => {
  it('finds a maximum that no point of a coarse (rho, nu) grid beats, its Gaussian candidate equal to binomialMle\'s maximum', () => {
    // property: a maximum is a maximum (grid of 48 points with k_nu re-maximised); the Gaussian limit is binomialMle (Gordy & Heitfield 2002)
    const fit = tCopulaMle(panel, { intervals: false });
    expect(['ok', 'clipped']).toContain(fit.status);
    const g = binomialMle(panel);
    expect(Math.abs(fit.gaussianLogLik! - g.logLik!)).toBeLessThan(1e-6);
    expect(fit.logLik!).toBeGreaterThanOrEqual(fit.gaussianLogLik! - 1e-9);
    const profile = new TCopulaProfile(panel);
    for (const rho of [0, 0.01, 0.03, 0.06, 0.1, 0.2]) {
      for (const w of [0, 0.05, 0.1, 0.2, 0.3, 0.45, 0.49, 0.25]) {
        expect(profile.atRhoAndInverseNu(rho, w).logLik, `rho=${rho} 1/nu=${w}`).toBeLessThanOrEqual(fit.logLik! + 1e-6);
      }
    }
  });

  it('covers the nu a panel was drawn with (nu = 3, large cohorts), the interval end where the profile drops 1.92', () => {
    // seeded simulation from the model (Frey & McNeil 2003); the interval is {nu : profile >= max - chi2_1(0.95) / 2} (Wilks 1938).
    // Yearly counts identify nu weakly (this panel's maximum is the Gaussian limit with rho ~ 0.56), so only coverage is asserted.
    const sim = simulateTCopulaPanel({ pd: 0.01, rho: 0.02, nu: 3, obligors: Array.from({ length: 20 }, () => 50000) }, createRng(11));
    const fit = tCopulaMle(sim);
    const iv = fit.nuInterval!;
    expect(iv.lower!).toBeLessThan(3);
    expect(iv.upper === null || iv.upper > 3).toBe(true);
    const profile = new TCopulaProfile(sim);
    const atLower = profile.atInverseNu(1 / iv.lower!);
    expect(Math.abs(fit.logLik! - atLower.logLik - 1.9207294103470195)).toBeLessThan(1e-3);
    const at = fit.nu === null ? Number.POSITIVE_INFINITY : fit.nu;
    expect(new TCopulaLikelihood(sim).logLik(tQuantile(fit.pd!, at), fit.rho!, at)).toBeCloseTo(fit.logLik!, 6);
  });

  it('gives a status and a sentence for no defaults, a single year, the Gaussian limit and a flat profile of nu, never NaN', () => {
    const none = tCopulaMle({ obligors: [1000, 1000], defaults: [0, 0] });
    expect(none.status).toBe('undefined');
    expect(none.reason).toMatch(/no defaults/);
    const single = tCopulaMle({ obligors: [1000], defaults: [12] });
    expect(single.status).toBe('undefined');
    expect(single.reason).toMatch(/single year/);
    // equal rates: no spread beyond chance, so a small nu (dependence through V even at rho = 0) is refuted: the Gaussian limit
    const even = tCopulaMle({ obligors: [1000, 1000, 1000], defaults: [10, 11, 9] }, { intervals: false });
    expect(even.nu).toBeNull();
    expect(even.nuProfileFlat).toBe(false);
    expect(even.reason).toMatch(/Gaussian limit/);
    // eight wildly dispersed years: every nu from 2 to infinity within 1.92 of the maximum
    const wild = tCopulaMle({ obligors: Array.from({ length: 8 }, () => 50000), defaults: [4, 17, 0, 551, 71, 0, 7, 0] }, { intervals: false });
    expect(wild.nuProfileFlat).toBe(true);
    expect(wild.reason).toMatch(/flat/);
    expect(Number.isFinite(wild.logLik!)).toBe(true);
  });
});
