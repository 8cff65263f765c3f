import { describe, expect, it } from 'vitest';
import fixtures from '@/tests/fixtures/engine/engine-fixtures.json';
import large from '@/tests/fixtures/engine/large-cohorts.json';
import {
  MixtureLikelihood,
  mixtureLogLikelihood,
  mixturePeriodLogLikelihood,
} from '@/lib/stats/mixture-likelihood';
import { binomialLogPmf, logBinomialCoefficient } from '@/lib/stats/log-binomial';
import { normalLogCdf, normalQuantile } from '@/lib/stats/normal';

/** Brute force: locate the mode on a 0.001 grid over [-40, 40], then composite Simpson with
 *  h = 1e-5 on [mode - 10, mode + 10] (the integrand is below e^-50 outside: g'' <= -1). */
function bruteForce(n: number, d: number, p: number, rho: number): number {
  const k = normalQuantile(p);
  const s1 = Math.sqrt(1 - rho);
  const sr = Math.sqrt(rho);
  const lc = logBinomialCoefficient(n, d);
  const g = (x: number) => {
    const z = (k - sr * x) / s1;
    return lc + d * normalLogCdf(z) + (n - d) * normalLogCdf(-z) - 0.5 * x * x - 0.9189385332046727;
  };
  let best = -Infinity;
  let bx = 0;
  for (let x = -40; x <= 40; x += 0.001) {
    const v = g(x);
    if (v > best) [best, bx] = [v, x];
  }
  const N = 2_000_000;
  const a = bx - 10;
  const h = 20 / N;
  let s = 0;
  for (let i = 0; i <= N; i++) {
    const w = i === 0 || i === N ? 1 : i % 2 ? 4 : 2;
    s += w * Math.exp(g(a + i * h) - best);
  }
  return best + Math.log((s * h) / 3);
}

describe('mixturePeriodLogLikelihood', () => {
  it('matches the worked value of the engine specification (n = 200000, d = 2000, p = 0.01, rho = 0.12)', () => {
    // computed with SciPy 1.17 for the engine specification: -8.590523837 (1e-7); fixed Gauss-Hermite fails this
    expect(Math.abs(mixturePeriodLogLikelihood(200000, 2000, 0.01, 0.12) - -8.590523837)).toBeLessThan(1e-7);
  });

  it('matches SciPy QUADPACK across n, d, p and rho (d = 0, d = n, rho near 0 and 0.95)', () => {
    // computed with SciPy 1.17 scipy.integrate.quad (tests/fixtures/engine/make_fixtures.py)
    for (const c of fixtures.periods) {
      const v = mixturePeriodLogLikelihood(c.n, c.d, c.p, c.rho);
      expect(Math.abs(v - c.logLik), `n=${c.n} d=${c.d} p=${c.p} rho=${c.rho}`).toBeLessThan(1e-10 * Math.max(1, Math.abs(c.logLik)));
    }
  });

  it('matches a brute-force Simpson integral, including the cliff of zero-default periods at high rho', () => {
    // brute force defined above (independent of the rule: fixed grid, no mode bracketing)
    const cases: [number, number, number, number][] = [
      [50, 0, 0.02, 0.9],
      [1_000_000, 0, 1e-5, 0.95],
      [500_000, 0, 0.01, 0.9],
      [500_000, 5000, 0.01, 0.12],
      [50, 50, 0.9, 0.5],
      [1000, 10, 0.01, 1e-6],
    ];
    for (const [n, d, p, rho] of cases) {
      const v = mixturePeriodLogLikelihood(n, d, p, rho);
      expect(Math.abs(v - bruteForce(n, d, p, rho)), `n=${n} d=${d} rho=${rho}`).toBeLessThan(5e-12);
    }
  });

  it('is the binomial log-pmf at rho = 0 and tends to it as rho -> 0', () => {
    // definition: at rho = 0 the integrand does not depend on x (p passes through Phi(Phi^-1(p)))
    expect(Math.abs(mixturePeriodLogLikelihood(2000, 17, 0.01, 0) - binomialLogPmf(17, 2000, 0.01))).toBeLessThan(1e-13);
    expect(Math.abs(mixturePeriodLogLikelihood(2000, 17, 0.01, 1e-12) - binomialLogPmf(17, 2000, 0.01))).toBeLessThan(1e-8);
  });

  it('sums to one over d (a probability distribution of the default count)', () => {
    // probability: sum_d L(d) = Int sum_d C(n,d) P^d (1-P)^(n-d) phi = 1
    for (const [n, p, rho] of [[30, 0.05, 0.3], [200, 0.01, 0.8], [12, 0.4, 0.05]] as const) {
      let s = 0;
      for (let d = 0; d <= n; d++) s += Math.exp(mixturePeriodLogLikelihood(n, d, p, rho));
      expect(Math.abs(s - 1)).toBeLessThan(1e-12);
    }
  });

  it('has the exact k-derivatives it reports (checked by central differences)', () => {
    // calculus: finite differences of the value, step 1e-4
    const L = new MixtureLikelihood({ obligors: [1000, 5000, 50], defaults: [12, 0, 3] });
    const k = normalQuantile(0.01);
    const rho = 0.2;
    const h = 1e-4;
    const r = L.logLikWithDerivatives(k, rho);
    const up = L.logLik(k + h, rho);
    const dn = L.logLik(k - h, rho);
    expect(Math.abs(r.dk - (up - dn) / (2 * h))).toBeLessThan(1e-6 * Math.abs(r.dk));
    expect(Math.abs(r.dkk - (up - 2 * r.value + dn) / (h * h))).toBeLessThan(1e-4 * Math.abs(r.dkk));
  });

  it('has the exact gradient and Hessian in (k, rho) it reports (checked by central differences)', () => {
    // calculus: central differences of the value and of the analytic first derivatives
    const panels = [
      { obligors: [1000, 5000, 50], defaults: [12, 0, 3] },
      { obligors: [200000, 210000, 190000], defaults: [2100, 3900, 1500] },
      { obligors: [48, 52, 50, 55], defaults: [2, 0, 5, 1] },
    ];
    const k = normalQuantile(0.012);
    for (const panel of panels) {
      for (const rho of [1e-4, 0.01, 0.2, 0.9]) {
        const at = (kk: number, rr: number) => new MixtureLikelihood(panel).logLikFull(kk, rr);
        const r = at(k, rho);
        const hk = 1e-3;
        const hr = Math.min(1e-5, rho * 1e-3);
        const ku = at(k + hk, rho);
        const kd = at(k - hk, rho);
        const ru = at(k, rho + hr);
        const rd = at(k, rho - hr);
        const close = (got: number, fd: number, tol: number, what: string) =>
          expect(Math.abs(got - fd), `${what} n=${panel.obligors[0]} rho=${rho}`).toBeLessThan(tol * Math.abs(fd) + 1e-8);
        close(r.dr, (ru.value - rd.value) / (2 * hr), 1e-5, 'dr');
        close(r.dkr, (ru.dk - rd.dk) / (2 * hr), 1e-4, 'dkr');
        close(r.dkr, (ku.dr - kd.dr) / (2 * hk), 1e-4, 'dkr');
        close(r.drr, (ru.dr - rd.dr) / (2 * hr), 1e-4, 'drr');
        close(r.dkk, (ku.dk - kd.dk) / (2 * hk), 1e-5, 'dkk');
        // the k-derivatives agree with the k-only evaluation
        const kOnly = new MixtureLikelihood(panel).logLikWithDerivatives(k, rho);
        expect(Math.abs(kOnly.dk - r.dk)).toBeLessThan(1e-9 * Math.abs(r.dk) + 1e-9);
        expect(Math.abs(kOnly.value - r.value)).toBeLessThan(1e-12 * Math.abs(r.value));
      }
    }
  });

  it('has rho-derivatives at rho = 0 that continue those at small rho (heat equation)', () => {
    // calculus: second-order one-sided differences at rho = 0, h = 1e-7 and 2e-7
    const panel = { obligors: [1000, 5000, 50, 2000], defaults: [12, 40, 3, 31] };
    const k = normalQuantile(0.012);
    const at = (rr: number) => new MixtureLikelihood(panel).logLikFull(k, rr);
    const r0 = at(0);
    const h = 1e-7;
    const a = at(h);
    const b = at(2 * h);
    const fd = (x0: number, x1: number, x2: number) => (4 * x1 - x2 - 3 * x0) / (2 * h);
    expect(Math.abs(r0.dr - fd(r0.value, a.value, b.value))).toBeLessThan(1e-6 * Math.abs(r0.dr));
    expect(Math.abs(r0.dkr - fd(r0.dk, a.dk, b.dk))).toBeLessThan(1e-5 * Math.abs(r0.dkr));
    expect(Math.abs(r0.drr - fd(r0.dr, a.dr, b.dr))).toBeLessThan(1e-5 * Math.abs(r0.drr));
  });

  it('refuses bad parameters and bad counts with a sentence naming the problem', () => {
    expect(() => mixturePeriodLogLikelihood(10, 11, 0.1, 0.1)).toThrow(/defaults = 11/);
    expect(() => mixturePeriodLogLikelihood(10, 1, 0, 0.1)).toThrow(RangeError);
    expect(() => mixturePeriodLogLikelihood(10, 1, 0.1, 1)).toThrow(/rho/);
    expect(() => mixtureLogLikelihood({ obligors: [10, 20], defaults: [1] }, 0.1, 0.1)).toThrow(/periods/);
    expect(() => mixtureLogLikelihood({ obligors: [10, 2.5], defaults: [1, 0] }, 0.1, 0.1)).toThrow(/period 2/);
  });
});

describe('cohorts of 10^7 to 10^9 obligors', () => {
  it('match a 40-digit mpmath integral, from a cold start and after a walk of warm starts up to rho = 0.995', () => {
    // computed with mpmath 1.3 at 40 digits (tests/fixtures/engine/make_large_cohorts.py); the
    // tolerance is the rounding of the n-sized terms of the log-integrand, about 5e-17 n
    for (const c of large.periods) {
      const tol = 5e-17 * c.n + 1e-12;
      expect(Math.abs(mixturePeriodLogLikelihood(c.n, c.d, c.p, c.rho) - c.logLik), `cold n=${c.n} d=${c.d} rho=${c.rho}`).toBeLessThan(tol);
      // The old rule kept the previous call's mode as its start and failed at rho = 0.995 after a
      // walk like this one (the integral was not finite).
      const L = new MixtureLikelihood({ obligors: [c.n], defaults: [c.d] });
      const k = normalQuantile(c.p);
      for (const rho of [0.3, 0.02, 0.9, 1e-4, 0.995, 0.5]) L.logLikFull(k + 0.3, rho);
      expect(Math.abs(L.logLik(k, c.rho) - c.logLik), `warm n=${c.n} d=${c.d} rho=${c.rho}`).toBeLessThan(tol);
      expect(L.report().unconverged).toBe(0);
    }
  });
});
