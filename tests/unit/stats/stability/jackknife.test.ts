import { describe, expect, it } from 'vitest';
import engine from '@/tests/fixtures/engine/engine-fixtures.json';
import { INDEPENDENT_ESTIMATORS } from '@/lib/stats/estimators';
import { binomialMle } from '@/lib/stats/estimators/binomial-mle';
import { momentVariance } from '@/lib/stats/estimators/moment-variance';
import { jackknife, jackknifeBiasSe, type LabelledPanel } from '@/lib/stats/stability/jackknife';

const labelled = (obligors: number[], defaults: number[], first = 2001): LabelledPanel => ({
  periods: obligors.map((_, t) => String(first + t)),
  obligors,
  defaults,
});
const A = labelled(engine.panels.A.obligors, engine.panels.A.defaults);

describe('jackknifeBiasSe', () => {
  it('gives bias 0 and se = s / sqrt(n) for the mean', () => {
    // Efron & Tibshirani (1993), section 11.2: for the mean the jackknife se is the usual s / sqrt(n)
    const x = [3.1, 4.7, 2.2, 5.9, 4.4, 3.8];
    const n = x.length;
    const mean = x.reduce((a, b) => a + b) / n;
    const loo = x.map((_, i) => (n * mean - x[i]) / (n - 1));
    const s = Math.sqrt(x.reduce((a, v) => a + (v - mean) ** 2, 0) / (n - 1));
    const r = jackknifeBiasSe(loo, mean);
    expect(Math.abs(r.bias)).toBeLessThan(1e-14);
    expect(r.se).toBeCloseTo(s / Math.sqrt(n), 14);
  });

  it('turns the plug-in variance into the unbiased one by its bias correction', () => {
    // Quenouille (1956); Efron & Tibshirani (1993), ch. 10 (jackknife bias): the corrected plug-in
    // variance theta - bias_jack is the unbiased sum (x - mean)^2 / (n - 1)
    const x = [1.5, 2.5, 2.0, 7.0, 3.5];
    const n = x.length;
    const plugin = (v: number[]) => {
      const m = v.reduce((a, b) => a + b) / v.length;
      return v.reduce((a, y) => a + (y - m) ** 2, 0) / v.length;
    };
    const loo = x.map((_, i) => plugin(x.filter((__, j) => j !== i)));
    const r = jackknifeBiasSe(loo, plugin(x));
    expect(plugin(x) - r.bias).toBeCloseTo((plugin(x) * n) / (n - 1), 13);
  });

  it('refuses too few or non-finite values', () => {
    expect(() => jackknifeBiasSe([1], 1)).toThrow(RangeError);
    expect(() => jackknifeBiasSe([1, Number.NaN], 1)).toThrow(RangeError);
  });
});

describe('jackknife of the estimators', () => {
  it('leaves each period out in turn, by the definition (DESIGN.md stability.jackknife)', () => {
    const j = jackknife(A);
    expect(Object.keys(j.estimators)).toEqual(Object.keys(INDEPENDENT_ESTIMATORS)); // the independent model's five (DESIGN.md)
    const T = A.obligors.length;
    for (const i of [0, 4, T - 1]) {
      const without = { obligors: A.obligors.filter((_, t) => t !== i), defaults: A.defaults.filter((_, t) => t !== i) };
      expect(j.estimators.binomialMle.leaveOneOut[i]).toEqual({ period: A.periods[i], rho: binomialMle(without).rho });
      expect(j.estimators.momentVariance.leaveOneOut[i].rho).toBe(momentVariance(without).rho);
    }
    const loo = j.estimators.momentVariance.leaveOneOut.map((e) => e.rho!);
    const mean = loo.reduce((a, b) => a + b) / T;
    const full = momentVariance(A).rho!;
    // DESIGN.md: bias (T - 1)(mean - full), se sqrt((T - 1)/T sum (rho_i - mean)^2)
    expect(j.estimators.momentVariance.bias).toBeCloseTo((T - 1) * (mean - full), 15);
    expect(j.estimators.momentVariance.se).toBeCloseTo(Math.sqrt(((T - 1) / T) * loo.reduce((a, r) => a + (r - mean) ** 2, 0)), 15);
  });

  it('names the period whose removal moves binomialMle most', () => {
    const j = jackknife(A);
    const full = binomialMle(A).rho!;
    const changes = j.estimators.binomialMle.leaveOneOut.map((e) => e.rho! - full);
    const i = changes.reduce((b, c, k) => (Math.abs(c) > Math.abs(changes[b]) ? k : b), 0);
    expect(j.mostInfluential).toEqual({ period: A.periods[i], estimator: 'binomialMle', change: changes[i] });
  });

  it('of a panel repeated twice: leaving out a year or its copy gives the same rho (property)', () => {
    // The estimators treat years as exchangeable, so the two copies of a year are interchangeable
    // and the jackknife of the doubled panel is the same on both halves.
    const doubled = labelled([...A.obligors, ...A.obligors], [...A.defaults, ...A.defaults]);
    const j = jackknife(doubled);
    const T = A.obligors.length;
    for (const [key, e] of Object.entries(j.estimators)) {
      for (let t = 0; t < T; t++) {
        const a = e.leaveOneOut[t].rho;
        const b = e.leaveOneOut[t + T].rho;
        if (a === null || b === null) expect(a, key).toBe(b);
        else expect(Math.abs(a - b), `${key} year ${t}`).toBeLessThan(1e-9);
      }
    }
  });

  it('does not depend on the order of the years (property)', () => {
    const order = [3, 7, 0, 9, 1, 5, 2, 8, 4, 6];
    const shuffled: LabelledPanel = {
      periods: order.map((t) => A.periods[t]),
      obligors: order.map((t) => A.obligors[t]),
      defaults: order.map((t) => A.defaults[t]),
    };
    const a = jackknife(A);
    const b = jackknife(shuffled);
    for (const key of Object.keys(a.estimators)) {
      expect(Math.abs(a.estimators[key].bias! - b.estimators[key].bias!), key).toBeLessThan(1e-8);
      expect(Math.abs(a.estimators[key].se! - b.estimators[key].se!), key).toBeLessThan(1e-8);
    }
    expect(b.mostInfluential!.period).toBe(a.mostInfluential!.period);
  });

  it('says why bias and se are missing when an estimator has no value without some year', () => {
    // a zero-default year: vasicekMle has no value with it, so only leaving it out gives one
    const panel = labelled([1000, 1000, 1000, 1000, 1000], [8, 0, 12, 9, 15]);
    const j = jackknife(panel);
    expect(j.estimators.vasicekMle.bias).toBeNull();
    expect(j.estimators.vasicekMle.reason).toMatch(/no value on the whole panel/);
    // the only defaults in one year: binomialMle has none without it
    const lone = labelled([500, 500, 500, 500], [0, 0, 6, 0]);
    const k = jackknife(lone);
    expect(k.estimators.binomialMle.reason).toMatch(/without period 2003/);
    expect(k.estimators.binomialMle.leaveOneOut[2].rho).toBeNull();
    expect(() => jackknife({ ...panel, periods: ['1', '1', '2', '3', '4'] })).toThrow(/twice/);
    expect(() => jackknife(labelled([10], [1]))).toThrow(/at least 2 periods/);
  });
});
