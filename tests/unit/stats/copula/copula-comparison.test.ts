import { describe, expect, it } from 'vitest';
import fx from '@/tests/fixtures/copula/copula-fixtures.json';
import { compareMixingLaws } from '@/lib/stats/copula-comparison';
import { vasicekQuantile } from '@/lib/stats/vasicek';

describe('compareMixingLaws', () => {
  it('puts each law\'s fit, tail quantiles, joint default and tail dependence side by side', () => {
    // AIC = 2k - 2l (Akaike 1974), BIC = k log T - 2l with T the years (Schwarz 1978); quantiles: Vasicek (2002) and the
    // t quantiles computed with SciPy 1.17 by make_copula.py; joint default under the t by SciPy's quad (make_copula.py)
    const q = fx.tQuantiles[0];
    const rows = compareMixingLaws(
      [
        { law: 'gaussian', logLik: -50, pd: q.p, rho: q.rho },
        { law: 't', logLik: -48, pd: q.p, rho: q.rho, nu: q.nu },
        { law: 'beta', logLik: -49.5, pd: q.p, equivalentRho: q.rho },
        { law: 'logitNormal', logLik: -49, mu: -4.5, sigma: 0.5 },
      ],
      20,
    );
    const [g, t, beta, logit] = rows;
    expect(g.aic).toBeCloseTo(104, 12);
    expect(t.aic).toBeCloseTo(102, 12);
    expect(t.bic).toBeCloseTo(3 * Math.log(20) + 96, 12);
    expect(g.quantile999).toBeCloseTo(vasicekQuantile(0.999, q.p, q.rho), 14);
    expect(g.quantile999Ratio).toBe(1);
    expect(Math.abs(t.quantile999 / q.q999 - 1)).toBeLessThan(1e-8);
    expect(Math.abs(t.quantile99 / q.q99 - 1)).toBeLessThan(1e-8);
    expect(t.quantile999Ratio).toBeCloseTo(q.q999 / vasicekQuantile(0.999, q.p, q.rho), 7);
    expect(g.tailDependence).toBe(0);
    expect(t.tailDependence!).toBeGreaterThan(0);
    expect(beta.tailDependence).toBeNull();
    // the beta law matched to the Gaussian law's p and rho has the Gaussian joint default and default correlation (definition)
    expect(Math.abs(beta.jointDefault / g.jointDefault - 1)).toBeLessThan(1e-12);
    expect(Math.abs(beta.defaultCorrelation / g.defaultCorrelation - 1)).toBeLessThan(1e-10);
    const ln = fx.logitNormal[0];
    expect(Math.abs(logit.jointDefault / ln.second - 1)).toBeLessThan(1e-10);
    expect(() => compareMixingLaws([{ law: 't', logLik: -1, pd: 0.01, rho: 0.1, nu: 5 }], 10)).toThrow(/Gaussian law is needed/);
  });
});
