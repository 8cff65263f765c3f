import { describe, expect, it } from 'vitest';
import fx from '@/tests/fixtures/portfolio/grades-fixtures.json';
import engine from '@/tests/fixtures/engine/engine-fixtures.json';
import { binomialMle } from '@/lib/stats/estimators/binomial-mle';
import { fitGrades, pdMonotonicity, type GradeInput } from '@/lib/stats/grade-fit';
import { GradeLikelihood } from '@/lib/stats/grade-likelihood';
import { aOfRho, CommonRhoGradeModel } from '@/lib/stats/grade-model';
import { createRng } from '@/lib/stats/random';
import { conditionalPd } from '@/lib/stats/vasicek';

const years = (T: number, from = 2001) => Array.from({ length: T }, (_, t) => String(from + t));
const asInputs = (panels: { obligors: number[]; defaults: number[] }[]): GradeInput[] =>
  panels.map((p, g) => ({ segment: `G${g + 1}`, periods: years(p.obligors.length), obligors: p.obligors, defaults: p.defaults }));

describe('grade likelihood (grades sharing one factor)', () => {
  it('matches a brute-force SciPy integral for 1 to 4 grades, zero and full default counts, rho = 0', () => {
    // computed with SciPy 1.17 by tests/fixtures/portfolio/make_grades.py (quad, epsrel 1e-13)
    for (const c of fx.likelihood) {
      const L = new GradeLikelihood(c.n.map((n, g) => ({ obligors: [n], defaults: [c.d[g]] })));
      const v = L.evaluate(c.c, c.a, false).value;
      expect(Math.abs(v - c.logLik), `n=${c.n} d=${c.d}`).toBeLessThan(1e-10 * Math.max(1, Math.abs(c.logLik)));
    }
  });

  it('has the gradient and Hessian it reports (central differences)', () => {
    // calculus: central differences of the value and of the analytic gradient
    const panels = [
      { obligors: [1000, 1200, 900], defaults: [5, 14, 0] },
      { obligors: [400, 420, 380], defaults: [9, 20, 3] },
    ];
    const L = new GradeLikelihood(panels);
    const theta = [-2.4, 0.3, -1.9, 0.5];
    const at = (t: number[]) => L.evaluate([t[0], t[2]], [t[1], t[3]], true);
    const r = at(theta);
    const h = 1e-5;
    for (let i = 0; i < 4; i++) {
      const up = theta.slice();
      const dn = theta.slice();
      up[i] += h;
      dn[i] -= h;
      const fu = at(up);
      const fd = at(dn);
      expect(Math.abs(r.gradient[i] - (fu.value - fd.value) / (2 * h))).toBeLessThan(1e-6 * Math.max(1, Math.abs(r.gradient[i])));
      for (let j = 0; j < 4; j++) {
        const num = (fu.gradient[j] - fd.gradient[j]) / (2 * h);
        expect(Math.abs(r.hessian[i * 4 + j] - num), `H[${i}][${j}]`).toBeLessThan(1e-5 * Math.max(1, Math.abs(num)));
      }
    }
  });
});

describe('common-rho grade model', () => {
  it('with one grade is binomialMle: the same log-likelihood to 1e-8 (panels A-F)', () => {
    // property required by the design: one grade reduces to the single-segment model
    for (const [name, panel] of Object.entries(engine.panels)) {
      const mle = binomialMle({ obligors: panel.obligors, defaults: panel.defaults });
      if (mle.logLik === null) continue;
      const fit = new CommonRhoGradeModel([{ obligors: panel.obligors, defaults: panel.defaults }]).maximise();
      expect(Math.abs(fit.logLik - mle.logLik), `panel ${name}`).toBeLessThan(1e-8);
      expect(Math.abs(fit.rho - mle.rho!)).toBeLessThan(1e-5);
    }
  });

  it('matches SciPy on invented groups: rho, PDs, log-likelihood, the 95% profile interval of rho and of a PD, the grade-specific maximum', () => {
    // computed with SciPy 1.17 by tests/fixtures/portfolio/make_grades.py (BFGS and brentq on the quad likelihood)
    for (const g of fx.groups) {
      const fit = fitGrades(asInputs(g.panels));
      expect(fit.status, g.name).toBe('ok');
      const c = fit.commonRho!;
      expect(Math.abs(c.logLik - g.logLik)).toBeLessThan(1e-7 * Math.abs(g.logLik));
      expect(Math.abs(c.rho - g.commonRho)).toBeLessThan(2e-5);
      Object.values(fit.pds!).forEach((p, i) => expect(Math.abs(p.pd - g.pds[i]) / g.pds[i]).toBeLessThan(1e-4));
      expect(Math.abs(c.interval.lower - g.interval95[0])).toBeLessThan(2e-5);
      expect(Math.abs(c.interval.upper - g.interval95[1])).toBeLessThan(2e-5);
      const pd2 = Object.values(fit.pds!)[1];
      expect(Math.abs(pd2.lower! - g.pdInterval95Grade2[0]) / g.pdInterval95Grade2[0]).toBeLessThan(1e-4);
      expect(Math.abs(pd2.upper! - g.pdInterval95Grade2[1]) / g.pdInterval95Grade2[1]).toBeLessThan(1e-4);
      // the grade-specific maximum is at least SciPy's (BFGS may stop a little short)
      expect(fit.gradeSpecific!.logLik).toBeGreaterThan(g.specificLogLik - 1e-6);
      expect(Math.abs(fit.gradeSpecific!.logLik - g.specificLogLik)).toBeLessThan(1e-4);
      expect(fit.lrTest!.df).toBe(2);
      expect(fit.lrTest!.statistic).toBeGreaterThanOrEqual(0);
    }
  });

  it('finds a maximum: no nearby point of (PDs, rho) is higher, and the interval ends sit on the cut-off', () => {
    // property: a maximum is a maximum; definition of the profile interval (chi2_1(0.95) / 2 = 1.9207)
    const g = fx.groups[0];
    const model = new CommonRhoGradeModel(g.panels);
    const fit = model.maximise();
    const theta = [...fit.k, aOfRho(fit.rho)];
    for (let i = 0; i < theta.length; i++) {
      for (const h of [-1e-3, 1e-3]) {
        const t = theta.slice();
        t[i] += h;
        expect(model.evaluate(t).value).toBeLessThan(fit.logLik);
      }
    }
    const iv = model.rhoInterval(fit, 0.95);
    expect(Math.abs(model.profileAt(iv.lower).logLik - (fit.logLik - 1.920729410347062))).toBeLessThan(1e-6);
    expect(Math.abs(model.profileAt(iv.upper).logLik - (fit.logLik - 1.920729410347062))).toBeLessThan(1e-6);
  });

  it('warns where the fitted PDs do not increase in the order given', () => {
    // the order-break group has its middle grade below the first (invented data)
    const g = fx.groups.find((x) => x.name === 'order-break')!;
    const fit = fitGrades(asInputs(g.panels), { pdIntervals: false });
    expect(fit.monotonicity!.increasing).toBe(false);
    expect(fit.monotonicity!.breaks[0]).toMatchObject({ from: 'G1', to: 'G2' });
    expect(fit.warnings.map((w) => w.code)).toContain('grade-order');
    expect(pdMonotonicity(['A', 'B', 'C'], [0.001, 0.002, 0.004]).increasing).toBe(true);
  });

  it('compares with each grade fitted alone', () => {
    // the single fits are binomialMle on each grade's own panel (definition)
    const g = fx.groups[0];
    const fit = fitGrades(asInputs(g.panels), { pdIntervals: false });
    expect(fit.single.G1.rho).toBe(binomialMle(g.panels[0]).rho);
  });

  it('recovers a common rho from a long simulated group within its interval (seeded)', () => {
    // simulation from the model itself: 4 grades, T = 30, rho = 0.1, shared factor each year
    const rng = createRng(20260);
    const pds = [0.004, 0.01, 0.025, 0.06];
    const panels = pds.map(() => ({ obligors: [] as number[], defaults: [] as number[] }));
    for (let t = 0; t < 30; t++) {
      const x = rng.normal();
      pds.forEach((p, g) => {
        panels[g].obligors.push(3000);
        panels[g].defaults.push(rng.binomial(3000, conditionalPd(p, 0.1, x)));
      });
    }
    const fit = fitGrades(asInputs(panels), { pdIntervals: false });
    expect(fit.status).toBe('ok');
    expect(fit.commonRho!.interval.lower).toBeLessThan(0.1);
    expect(fit.commonRho!.interval.upper).toBeGreaterThan(0.1);
  });
});

describe('grade model: bad inputs give a status and a sentence, never NaN', () => {
  it('refuses grades with different years, naming the missing ones, and fits the common window on request', () => {
    const a = { segment: 'A', periods: ['2001', '2002', '2003', '2004'], obligors: [900, 950, 1000, 980], defaults: [3, 9, 5, 12] };
    const b = { segment: 'B', periods: ['2002', '2003', '2004', '2005'], obligors: [500, 520, 510, 530], defaults: [8, 12, 9, 20] };
    const refused = fitGrades([a, b]);
    expect(refused.status).toBe('undefined');
    expect(refused.reason).toMatch(/A has no data for 2005/);
    expect(refused.reason).toMatch(/B has no data for 2001/);
    expect(refused.commonRho).toBeNull();
    const common = fitGrades([a, b], { commonWindow: true, pdIntervals: false });
    expect(common.periods).toEqual(['2002', '2003', '2004']);
    expect(Number.isFinite(common.commonRho!.rho)).toBe(true);
  });

  it('refuses a grade without defaults, a single grade and a repeated grade', () => {
    const a = { segment: 'A', periods: years(3), obligors: [900, 950, 1000], defaults: [0, 0, 0] };
    const b = { segment: 'B', periods: years(3), obligors: [500, 520, 510], defaults: [8, 12, 9] };
    expect(fitGrades([a, b]).reason).toMatch(/Grade "A" has no defaults/);
    expect(fitGrades([b]).reason).toMatch(/at least two grades/);
    expect(fitGrades([b, b]).reason).toMatch(/given twice/);
  });
});
