import { describe, expect, it } from 'vitest';
import fixtures from '@/tests/fixtures/engine/engine-fixtures.json';
import { binomialMle } from '@/lib/stats/estimators/binomial-mle';
import { jointDefault } from '@/lib/stats/estimators/joint-default';
import { momentVariance, sampleVariance } from '@/lib/stats/estimators/moment-variance';
import { momentVarianceCorrected } from '@/lib/stats/estimators/moment-variance-corrected';
import { vasicekMle } from '@/lib/stats/estimators/vasicek-mle';
import { bivariateNormalExcess } from '@/lib/stats/bivariate-normal';
import { mixtureLogLikelihood } from '@/lib/stats/mixture-likelihood';
import { normalQuantile } from '@/lib/stats/normal';

const A = { obligors: [1000, 1050, 1100, 980, 1020, 1200, 1150, 1080, 990, 1010], defaults: [8, 12, 25, 30, 9, 5, 14, 20, 11, 6] };
const B = { obligors: [500, 520, 540, 510, 530, 560, 580, 600, 590, 610], defaults: [0, 2, 1, 0, 5, 3, 0, 1, 2, 0] };
type PanelName = keyof typeof fixtures.panels;
const names = Object.keys(fixtures.panels) as PanelName[];

describe('worked values of the engine specification (computed with SciPy 1.17 on invented panels)', () => {
  it('panel A', () => {
    const mle = binomialMle(A);
    expect(mle.status).toBe('ok');
    expect(Math.abs(mle.rho! - 0.037091)).toBeLessThan(1e-5); // engine specification, computed with SciPy 1.17
    expect(Math.abs(mle.pd! - 0.013307)).toBeLessThan(1e-5); // engine specification, computed with SciPy 1.17
    expect(Math.abs(mle.logLik! - -33.785195)).toBeLessThan(1e-5); // engine specification, computed with SciPy 1.17
    expect(Math.abs(momentVariance(A).rho! - 0.05111)).toBeLessThan(1e-6); // engine specification, computed with SciPy 1.17
    expect(Math.abs(jointDefault(A).rho! - 0.037745)).toBeLessThan(1e-6); // engine specification, computed with SciPy 1.17
  });

  it('panel B', () => {
    const closed = vasicekMle(B);
    expect(closed.status).toBe('undefined'); // DESIGN.md: undefined with zero-default years
    expect(closed.rho).toBeNull();
    expect(closed.reason).toMatch(/Period 1/);
    const mle = binomialMle(B);
    expect(Math.abs(mle.rho! - 0.06262)).toBeLessThan(1e-5); // engine specification, computed with SciPy 1.17
    expect(Math.abs(mle.pd! - 0.002561)).toBeLessThan(1e-6); // engine specification, computed with SciPy 1.17
    expect(Math.abs(jointDefault(B).rho! - 0.050346)).toBeLessThan(1e-6); // engine specification, computed with SciPy 1.17
  });
});

describe('estimators against SciPy fixtures (tests/fixtures/engine/make_fixtures.py, SciPy 1.17)', () => {
  it.each(names)('panel %s: binomialMle', (name) => {
    const f = fixtures.panels[name];
    const mle = binomialMle(f);
    const ref = f.binomialMle;
    expect(Math.abs(mle.rho! - ref.rho)).toBeLessThan(2e-6); // computed with SciPy 1.17
    expect(Math.abs(mle.pd! - ref.pd)).toBeLessThan(1e-6 * Math.max(1, ref.pd * 100));
    expect(Math.abs(mle.logLik! - ref.logLik)).toBeLessThan(1e-8 * Math.max(1, Math.abs(ref.logLik)));
    expect(mle.atBoundary).toBe(ref.rho === 0);
  });

  it.each(names)('panel %s: moment estimators and the closed form', (name) => {
    const f = fixtures.panels[name];
    const check = (got: { rho: number | null; pd: number | null }, ref: { rho: number | null; pd: number } | null) => {
      if (ref === null || ref.rho === null) {
        expect(got.rho).toBeNull();
        return;
      }
      expect(Math.abs(got.rho! - ref.rho)).toBeLessThan(1e-10 + 1e-9 * ref.rho); // computed with SciPy 1.17
      expect(Math.abs(got.pd! - ref.pd)).toBeLessThan(1e-15);
    };
    check(momentVariance(f), f.momentVariance);
    check(momentVarianceCorrected(f), f.momentVarianceCorrected);
    check(jointDefault(f), f.jointDefault);
    check(vasicekMle(f), f.vasicekMle);
  });
});

describe('moment estimators solve their own equations', () => {
  it('to 1e-12 relative', () => {
    // definition (DESIGN.md): Phi2(k,k;rho) - p^2 = s2, = V, = p2 - p^2
    for (const name of names) {
      const f = fixtures.panels[name];
      const dr = f.obligors.map((n, t) => f.defaults[t] / n);
      const p = dr.reduce((a, b) => a + b, 0) / dr.length;
      const k = normalQuantile(p);
      const s2 = sampleVariance(dr);
      const mv = momentVariance(f);
      if (mv.rho !== null) expect(Math.abs(bivariateNormalExcess(k, k, mv.rho) / s2 - 1)).toBeLessThan(1e-12);
      const p2 = f.obligors.reduce((a, n, t) => a + (f.defaults[t] * (f.defaults[t] - 1)) / (n * (n - 1)), 0) / dr.length;
      const jd = jointDefault(f);
      if (jd.rho !== null) expect(Math.abs(bivariateNormalExcess(k, k, jd.rho) / (p2 - p * p) - 1)).toBeLessThan(1e-12);
      const h = f.obligors.reduce((a, n) => a + 1 / n, 0) / dr.length;
      const v = (s2 - p * (1 - p) * h) / (1 - h);
      const mc = momentVarianceCorrected(f);
      if (mc.status === 'ok') expect(Math.abs(bivariateNormalExcess(k, k, mc.rho!) / v - 1)).toBeLessThan(1e-12);
    }
  });
});

describe('undefined and clipped cases', () => {
  it('the closed form refuses a zero-default year and a year where all default', () => {
    expect(vasicekMle({ obligors: [100, 100], defaults: [0, 3] }).status).toBe('undefined');
    expect(vasicekMle({ obligors: [100, 100], defaults: [100, 3] }).reason).toMatch(/Period 1 .* 1/);
  });

  it('an all-zero segment leaves every estimator undefined with a reason', () => {
    const zero = { obligors: [100, 200, 300], defaults: [0, 0, 0] };
    for (const r of [binomialMle(zero), momentVariance(zero), momentVarianceCorrected(zero), jointDefault(zero), vasicekMle(zero)]) {
      expect(r.status).toBe('undefined');
      expect(r.rho).toBeNull();
      expect(r.reason!.length).toBeGreaterThan(10);
    }
  });

  it('moment targets at or below zero: null, or 0 clipped where the definition clips', () => {
    const flat = { obligors: [1000, 1000, 1000], defaults: [10, 10, 10] };
    expect(momentVariance(flat).status).toBe('undefined'); // s2 = 0
    expect(momentVarianceCorrected(flat)).toMatchObject({ rho: 0, status: 'clipped' }); // V clipped at 0
    expect(jointDefault(flat).status).toBe('undefined'); // p2 < p^2
  });

  it('binomialMle reports a maximum at rho = 0 as atBoundary', () => {
    const f = fixtures.panels.F; // computed with SciPy 1.17: maximum at rho = 0
    const mle = binomialMle(f);
    expect(f.binomialMle.rho).toBe(0);
    expect(mle).toMatchObject({ rho: 0, atBoundary: true, status: 'ok' });
    expect(mle.pd).toBeCloseTo(61 / 6000, 15); // pooled rate: binomial MLE
  });
});

describe('binomialMle is a maximum', () => {
  it('the log-likelihood at the estimate is not beaten by any point of a fine grid', () => {
    for (const panel of [A, B, fixtures.panels.C]) {
      const mle = binomialMle(panel);
      for (let i = 1; i <= 60; i++) {
        const rho = (i / 61) * 0.6;
        for (let j = -10; j <= 10; j++) {
          const p = mle.pd! * Math.exp(j * 0.03);
          // property: no grid point beats the reported maximum (beyond integration accuracy)
          expect(mixtureLogLikelihood(panel, p, rho)).toBeLessThanOrEqual(mle.logLik! + 1e-9);
        }
      }
    }
  });
});

describe('estimator boundaries reported as such', () => {
  it('jointDefault: years that are all 0 or all n reach the largest target p(1 - p): rho = 1, clipped, with a reason', () => {
    // definition (DESIGN.md, jointDefault): all-or-nothing years give p2 = mean(DR) = p, so
    // p2 - p^2 = p(1 - p) = Phi2(k, k; 1) - p^2, the boundary rho = 1 (Vasicek 2002)
    for (const panel of [
      { obligors: [100, 100, 100, 100], defaults: [0, 100, 0, 0] },
      { obligors: [37, 41, 53, 29, 61], defaults: [37, 0, 0, 29, 0] },
    ]) {
      const e = jointDefault(panel);
      expect(e.status).toBe('clipped');
      expect(e.rho).toBe(1);
      expect(e.reason).toMatch(/boundary rho = 1/);
    }
  });

  it('vasicekMle: a single period identifies no variance, so T = 1 is undefined with a sentence', () => {
    // definition: s2 = (1/T) sum (x_t - mu)^2 is 0 by construction at T = 1 (DESIGN.md, vasicekMle)
    const e = vasicekMle({ obligors: [1000], defaults: [12] });
    expect(e).toMatchObject({ rho: null, pd: null, status: 'undefined' });
    expect(e.reason).toMatch(/single period/);
  });

  it('momentVariance: a default rate the same in every period is undefined, not rho = 0 from a rounding', () => {
    // ten rates of 10/1000 = 0.01 average to 0.009999999999999998 in floating point (common
    // practice), which left a sample variance of ~3e-36 and an "ok" rho of 0
    const flat = { obligors: new Array(10).fill(1000), defaults: new Array(10).fill(10) };
    expect(sampleVariance(flat.defaults.map((d, t) => d / flat.obligors[t]))).toBe(0);
    expect(momentVariance(flat)).toMatchObject({ rho: null, status: 'undefined', reason: expect.stringMatching(/same in every period/) });
  });
});
