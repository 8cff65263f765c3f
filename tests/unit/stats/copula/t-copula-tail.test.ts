import { describe, expect, it } from 'vitest';
import fx from '@/tests/fixtures/copula/copula-fixtures.json';
import pairFx from '@/tests/fixtures/copula/pair-t-fixtures.json';
import { bivariateNormalCdf } from '@/lib/stats/bivariate-normal';
import { normalQuantile } from '@/lib/stats/normal';
import { bivariateTJointDefault, tCopulaTailDependence, tDefaultRateCdf, tDefaultRateQuantile } from '@/lib/stats/t-copula-tail';
import { vasicekQuantile } from '@/lib/stats/vasicek';

describe('tail dependence of the t copula', () => {
  it('is about 0.25 at rho 0.5 and nu 4, as the formula and its defining limit give', () => {
    // the hand-check "about 0.25"; the formula 2 t_{nu+1}(-sqrt((nu+1)(1-rho)/(1+rho))) of McNeil, Frey &
    // Embrechts (2015), example 7.39, evaluated by SciPy 1.17 (make_copula.py), and P(U1 <= q, U2 <= q) / q at q = 1e-8
    const lambda = tCopulaTailDependence(0.5, 4);
    expect(Math.abs(lambda - 0.25)).toBeLessThan(0.005);
    for (const c of fx.tailDependence) {
      expect(Math.abs(tCopulaTailDependence(c.rho, c.nu) - c.lambda), `rho=${c.rho} nu=${c.nu}`).toBeLessThan(1e-12);
      // the limit is approached slowly where nu is large: within 10% at q = 1e-8
      expect(Math.abs(c['ratioAt1e-8'] / c.lambda - 1)).toBeLessThan(0.1);
      expect(Math.abs(bivariateTJointDefault(1e-8, 1e-8, c.rho, c.nu) / 1e-8 - c['ratioAt1e-8'])).toBeLessThan(1e-6 * c['ratioAt1e-8']);
    }
  });

  it('is 0 for the Gaussian copula and grows as nu falls', () => {
    // McNeil, Frey & Embrechts (2015), section 7.2.4 (the Gaussian copula is asymptotically independent)
    expect(tCopulaTailDependence(0.5, Number.POSITIVE_INFINITY)).toBe(0);
    expect(tCopulaTailDependence(0.3, 3)).toBeGreaterThan(tCopulaTailDependence(0.3, 10));
    expect(() => tCopulaTailDependence(1, 4)).toThrow(RangeError);
  });
});

describe('joint default under the bivariate t', () => {
  it('matches scipy.stats.multivariate_t.cdf and a quad over V of the bivariate normal', () => {
    // computed with SciPy 1.17 by make_copula.py (multivariate_t.cdf is a randomised QMC with error ~1e-6 relative)
    for (const c of fx.bivariateT) {
      const v = bivariateTJointDefault(c.p1, c.p2, c.rho, c.nu);
      expect(Math.abs(v / c.joint - 1), `p1=${c.p1} rho=${c.rho}`).toBeLessThan(1e-8);
      expect(Math.abs(v / c.multivariateT - 1), `p1=${c.p1} rho=${c.rho}`).toBeLessThan(2e-5);
    }
  });

  it('is the bivariate normal at nu = infinity and symmetric in the two obligors', () => {
    // definition; symmetry
    expect(bivariateTJointDefault(0.01, 0.03, 0.2, Number.POSITIVE_INFINITY)).toBe(bivariateNormalCdf(normalQuantile(0.01), normalQuantile(0.03), 0.2));
    expect(Math.abs(bivariateTJointDefault(0.01, 0.03, 0.2, 5) - bivariateTJointDefault(0.03, 0.01, 0.2, 5))).toBeLessThan(1e-15);
    expect(Math.abs(bivariateTJointDefault(0.01, 0.03, 0.2, 1e7) - bivariateNormalCdf(normalQuantile(0.01), normalQuantile(0.03), 0.2))).toBeLessThan(1e-7);
  });
});

describe('default-rate distribution of a granular pool under the t copula', () => {
  it('has the 99% and 99.9% quantiles that SciPy finds', () => {
    // computed with SciPy 1.17 by make_copula.py (quad over V, brentq)
    for (const c of fx.tQuantiles) {
      expect(Math.abs(tDefaultRateQuantile(0.99, c.p, c.rho, c.nu) / c.q99 - 1)).toBeLessThan(1e-8);
      expect(Math.abs(tDefaultRateQuantile(0.999, c.p, c.rho, c.nu) / c.q999 - 1)).toBeLessThan(1e-8);
    }
  });

  it('reduces to Vasicek\'s quantile as nu grows, has mean p, and a distribution function that runs from 0 to 1', () => {
    // Vasicek (2002); the mean of the conditional PD is p (definition)
    expect(Math.abs(tDefaultRateQuantile(0.999, 0.01, 0.12, 1e7) / vasicekQuantile(0.999, 0.01, 0.12) - 1)).toBeLessThan(1e-5);
    expect(tDefaultRateCdf(0, 0.01, 0.12, 5)).toBe(0);
    expect(tDefaultRateCdf(1, 0.01, 0.12, 5)).toBe(1);
    // E[pi] = Int_0^1 (1 - F(x)) dx
    let mean = 0;
    const N = 4000;
    for (let i = 0; i < N; i++) {
      const x = (i + 0.5) / N;
      mean += (1 - tDefaultRateCdf(x * x, 0.01, 0.12, 5)) * 2 * x / N;
    }
    expect(Math.abs(mean / 0.01 - 1)).toBeLessThan(2e-3);
  });
});

describe('joint default under the bivariate t near nu = 2', () => {
  it('meets its tolerance where the law of the mixing variable reaches far down, and matches SciPy there', () => {
    // computed with SciPy 1.17 by tests/fixtures/copula/make_pair_t.py (quad over log V from log nu - 90;
    // multivariate_t.cdf is a randomised QMC with an absolute error of ~1e-8 to 1e-7 at these small probabilities)
    for (const c of pairFx.jointNearTwo) {
      const v = bivariateTJointDefault(c.p1, c.p2, c.rho, c.nu);
      expect(Math.abs(v / c.joint - 1), `p1=${c.p1} p2=${c.p2} rho=${c.rho} nu=${c.nu}`).toBeLessThan(1e-9);
      expect(Math.abs(v - c.multivariateT), `p1=${c.p1} nu=${c.nu}`).toBeLessThan(1e-7);
    }
  });

  it('gives a value over the whole range the pair explorer takes (nu above 2, PDs 0.0001% to 99.9%, rho 0 to 0.999)', () => {
    // property: a probability in [0, min(p1, p2)] at every corner of the range, never a throw
    for (const nu of [2.001, 2.01, 2.1])
      for (const p1 of [1e-6, 1e-4, 0.5, 0.999])
        for (const p2 of [1e-6, 0.01, 0.999])
          for (const rho of [0, 0.5, 0.999]) {
            const v = bivariateTJointDefault(p1, p2, rho, nu);
            expect(v, `p1=${p1} p2=${p2} rho=${rho} nu=${nu}`).toBeGreaterThan(0);
            expect(v).toBeLessThanOrEqual(Math.min(p1, p2) * (1 + 1e-9));
          }
  });
});
