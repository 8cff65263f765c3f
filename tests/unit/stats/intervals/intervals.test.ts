import { describe, expect, it } from 'vitest';
import fixtures from '@/tests/fixtures/engine/engine-fixtures.json';
import { binomialMleWithProfile } from '@/lib/stats/estimators/binomial-mle';
import { chiSquare1Quantile, profileInterval } from '@/lib/stats/intervals/profile';
import { waldInterval } from '@/lib/stats/intervals/wald';

const A = { obligors: [1000, 1050, 1100, 980, 1020, 1200, 1150, 1080, 990, 1010], defaults: [8, 12, 25, 30, 9, 5, 14, 20, 11, 6] };
const B = { obligors: [500, 520, 540, 510, 530, 560, 580, 600, 590, 610], defaults: [0, 2, 1, 0, 5, 3, 0, 1, 2, 0] };
type PanelName = keyof typeof fixtures.panels;
const names = Object.keys(fixtures.panels) as PanelName[];

describe('chiSquare1Quantile', () => {
  it('gives the textbook 95% and 90% points', () => {
    expect(chiSquare1Quantile(0.95) / 2).toBeCloseTo(1.9207294, 6); // A&S Table 26.8 / DESIGN.md: drop 1.9207
    expect(chiSquare1Quantile(0.9)).toBeCloseTo(2.7055435, 6); // A&S Table 26.8 (chi2_1 upper 10%)
    expect(() => chiSquare1Quantile(1)).toThrow(RangeError);
  });
});

describe('profile interval', () => {
  it('matches the worked values of the engine specification', () => {
    const a = binomialMleWithProfile(A);
    const ia = profileInterval(a.profile!, a.result);
    expect(Math.abs(ia.lower - 0.01177)).toBeLessThan(2e-3); // engine specification, computed with SciPy 1.17
    expect(Math.abs(ia.upper - 0.1147)).toBeLessThan(2e-3); // engine specification, computed with SciPy 1.17
    const b = binomialMleWithProfile(B);
    const ib = profileInterval(b.profile!, b.result);
    expect(ib.lower).toBe(0); // DESIGN.md: the lower end may be 0
    expect(Math.abs(ib.upper - 0.344)).toBeLessThan(2e-3); // engine specification, computed with SciPy 1.17
  });

  it.each(names)('panel %s matches SciPy at levels 0.95 and 0.90', (name) => {
    const f = fixtures.panels[name];
    const { result, profile } = binomialMleWithProfile(f);
    for (const [level, ref] of [[0.95, f.binomialMle.profile95], [0.9, f.binomialMle.profile90]] as const) {
      const iv = profileInterval(profile!, result, level);
      // computed with SciPy 1.17 (tests/fixtures/engine/make_fixtures.py)
      expect(Math.abs(iv.lower - ref[0])).toBeLessThan(1e-6);
      expect(Math.abs(iv.upper - ref[1])).toBeLessThan(1e-6);
      expect(iv.converged).toBe(true);
    }
  });
});

describe('Wald interval on the logit scale', () => {
  it.each(names)('panel %s: se of rho matches a SciPy central-difference Hessian', (name) => {
    const f = fixtures.panels[name];
    const { result, profile } = binomialMleWithProfile(f);
    const w = waldInterval(profile!, result);
    if (!('se' in f.binomialMle)) {
      expect(w).toBeNull(); // at the boundary: no Wald interval (DESIGN.md intervals)
      return;
    }
    const ref = f.binomialMle as { se: number; seStepSensitivity: number };
    expect(w).not.toBeNull();
    // computed with SciPy 1.17; tolerance: the reference's own step sensitivity plus 1e-4
    expect(Math.abs(w!.se / ref.se - 1)).toBeLessThan(1e-4 + 2 * ref.seStepSensitivity);
    // definition: expit(logit(rho) -+ z se / (rho (1 - rho)))
    const rho = result.rho!;
    const seEta = w!.se / (rho * (1 - rho));
    const eta = Math.log(rho / (1 - rho));
    expect(w!.lower).toBeCloseTo(1 / (1 + Math.exp(-(eta - 1.959963984540054 * seEta))), 12); // z_0.975 (A&S Table 26.1)
    expect(w!.lower).toBeLessThan(rho);
    expect(w!.upper).toBeGreaterThan(rho);
  });
});
