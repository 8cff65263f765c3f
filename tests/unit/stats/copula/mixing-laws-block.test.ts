import { describe, expect, it } from 'vitest';
import { copulaBootstrapRange, copulaPowerRange } from '@/lib/stats/copula-lr-test';
import { panelMidPit } from '@/lib/stats/count-pit';
import { binomialMle } from '@/lib/stats/estimators/binomial-mle';
import { completeMixingLaws, mixingLawCautions, prepareMixingLaws, type ModelComparison } from '@/lib/stats/mixing-laws-block';

const row = (law: 'gaussian' | 't' | 'beta' | 'logitNormal', aic: number, q999: number, joint: number) => ({
  law,
  logLik: -aic / 2,
  parameters: 2,
  aic,
  bic: aic,
  quantile99: q999 / 2,
  quantile999: q999,
  quantile99Ratio: 1,
  quantile999Ratio: 1,
  jointDefault: joint,
  defaultCorrelation: 0.01,
  tailDependence: null,
});

describe('the mixing-law block of a segment', () => {
  it('runs the laws, the test and the power study in two stages, each slice of replications seeded', () => {
    // the two-stage shape of a segment fit (DEVELOPERS.md); the numbers are the stats modules' own, checked in their tests
    const panel = { obligors: [400, 450, 420, 480, 500, 460], defaults: [3, 12, 1, 9, 20, 4] };
    const g = binomialMle(panel);
    const prepared = prepareMixingLaws(panel, g, { models: ['t', 'beta', 'logitNormal'], replications: 3, powerReplications: 2, seed: 5 });
    expect(prepared.estimates.tCopula?.status).toBeDefined();
    expect(prepared.estimates.betaMixing?.equivalentRho).not.toBeNull();
    expect(prepared.comparison.laws.map((l) => l.law)).toEqual(['gaussian', 't', 'beta', 'logitNormal']);
    expect(prepared.bootstrap!.replications).toBe(3);
    const boot = copulaBootstrapRange(prepared.bootstrap!.spec, 0, 3);
    const power = copulaPowerRange(prepared.power!.spec, 0, 2);
    const done = completeMixingLaws(prepared, boot, power);
    const test = done.modelComparison.lrTestGaussianVsT!;
    expect(test.replications).toBe(3);
    expect(test.pValue).toBeGreaterThanOrEqual(0.25);
    expect(done.modelComparison.power!.replications).toBe(2);
    expect(Array.isArray(done.modelComparison.cautions)).toBe(true);
    // each law carries its granular PIT (law-count-pit.ts, checked against SciPy there); the
    // Gaussian row's is the diagnostics' mid-PIT (count-pit.ts, checked against make_pit.py)
    for (const l of done.modelComparison.laws) {
      expect(l.pit?.values, l.law).toHaveLength(6);
      expect(l.pit?.uniformity.seed, l.law).toBe(5);
      expect(l.pit!.uniformity.pValue, l.law).toBeGreaterThan(0);
    }
    const gaussianPit = panelMidPit(panel, g.pd!, g.rho!);
    done.modelComparison.laws[0].pit!.values.forEach((u, t) => expect(Math.abs(u - gaussianPit[t])).toBeLessThan(1e-9));
  });

  it('cautions where another law fits materially better, in the direction the numbers go, and where the power is low', () => {
    // the cautions; DESIGN.md "Cautions the product shows"
    const comparison: ModelComparison = {
      laws: [row('gaussian', 100, 0.2, 4e-4), row('t', 98, 0.3, 5e-4), row('beta', 95, 0.1, 3e-4), row('logitNormal', 99.5, 0.25, 4.5e-4)],
      lrTestGaussianVsT: { statistic: 5, pValue: 0.02, pValueAsymptotic: 0.013, replications: 200, criticalValue: 2.4, failed: 0 },
      power: { replications: 200, rejectRate: 0.3, failed: 0, nu: 5 },
      cautions: [],
    };
    const c = mixingLawCautions(comparison);
    expect(c).toHaveLength(3);
    expect(c[0]).toMatch(/^The t copula fits these data materially better.*p = 0.020.*20.0% against 30.0% \(1.50 times lower\)/);
    expect(c[1]).toMatch(/^Beta mixing .* 20.0% against 10.0% \(2.00 times as high\)/);
    expect(c[2]).toMatch(/only 30.0% of the time: this history cannot distinguish the laws, so the Gaussian choice is a convention, not a finding/);
    expect(mixingLawCautions({ ...comparison, lrTestGaussianVsT: { ...comparison.lrTestGaussianVsT!, pValue: 0.2 }, power: { ...comparison.power!, rejectRate: 0.8 }, laws: comparison.laws.slice(0, 2) })).toEqual([]);
  });
});
