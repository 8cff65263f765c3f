import { describe, expect, it } from 'vitest';
import fx from '@/tests/fixtures/portfolio/pairs-fixtures.json';
import { factorCorrelation, impliedFactorSeries } from '@/lib/stats/factor-correlation';
import { assembleFactorCorrelationMatrix, factorCorrelationMatrix } from '@/lib/stats/factor-correlation-matrix';
import { mixtureLogLikelihood } from '@/lib/stats/mixture-likelihood';
import { PairLikelihood } from '@/lib/stats/pair-likelihood';
import { createRng } from '@/lib/stats/random';
import { conditionalPd } from '@/lib/stats/vasicek';

const seg = (segment: string, p: { obligors: number[]; defaults: number[] }, from = 2001) => ({
  segment,
  periods: p.obligors.map((_, t) => String(from + t)),
  obligors: p.obligors,
  defaults: p.defaults,
});

describe('pair likelihood (two segments with correlated factors)', () => {
  it('matches a fine two-dimensional product rule, cohorts up to 1.5e5, r from -1 to 1', () => {
    // computed with NumPy/SciPy 1.17 by tests/fixtures/portfolio/make_pairs.py (2401 x 2401 trapezoid; quad at r = +-1)
    for (const y of fx.years) {
      const L = new PairLikelihood({ obligors: [y.nA], defaults: [y.dA] }, { obligors: [y.nB], defaults: [y.dB] }, { pd: y.pA, rho: y.rhoA }, { pd: y.pB, rho: y.rhoB });
      expect(Math.abs(L.logLik(y.r) - y.logLik), `nA=${y.nA} r=${y.r}`).toBeLessThan(1e-8 * Math.max(1, Math.abs(y.logLik)));
    }
  });

  it('is the sum of the two segments\' own log-likelihoods at r = 0, and its slope is the derivative', () => {
    // definition (independent factors) and calculus (central differences)
    const a = { obligors: [1000, 1200, 900, 1100], defaults: [5, 14, 0, 9] };
    const b = { obligors: [40000, 42000, 39000, 41000], defaults: [300, 610, 150, 420] };
    const L = new PairLikelihood(a, b, { pd: 0.007, rho: 0.1 }, { pd: 0.011, rho: 0.06 });
    expect(Math.abs(L.logLik(0) - (mixtureLogLikelihood(a, 0.007, 0.1) + mixtureLogLikelihood(b, 0.011, 0.06)))).toBeLessThan(1e-9);
    for (const r of [-0.6, 0.2, 0.8, 0.99]) {
      const h = 1e-5;
      const fd = (L.logLik(r + h) - L.logLik(r - h)) / (2 * h);
      expect(Math.abs(L.logLikWithSlope(r).slope - fd), `r=${r}`).toBeLessThan(1e-5 * Math.max(1, Math.abs(fd)));
    }
  });
});

describe('factorCorrelation', () => {
  it('matches SciPy\'s maximum and 95% likelihood-ratio interval on a small panel (margins fixed)', () => {
    // computed with SciPy 1.17 by tests/fixtures/portfolio/make_pairs.py (brentq on the 2-D rule)
    const P = fx.panel;
    const r = factorCorrelation(seg('A', P.a), seg('B', P.b), { margins: P.margins });
    expect(r.status).toBe('ok');
    expect(Math.abs(r.r! - P.r)).toBeLessThan(1e-5);
    expect(Math.abs(r.logLik! - P.logLikMax)).toBeLessThan(1e-7);
    expect(Math.abs(r.lower! - P.interval95[0])).toBeLessThan(1e-5);
    expect(Math.abs(r.upper! - P.interval95[1])).toBeLessThan(1e-5);
  });

  it('with two copies of one segment maximises at the boundary r = 1', () => {
    // property required by the design: identical histories are most likely under identical factors
    const a = seg('A', { obligors: [1000, 1050, 1100, 980, 1020, 1200, 1150, 1080], defaults: [8, 12, 25, 30, 9, 5, 14, 20] });
    const r = factorCorrelation(a, { ...a, segment: 'A copy' });
    expect(r.r).toBe(1);
    expect(r.upper).toBe(1);
    expect(r.status).toBe('clipped');
    expect(r.reason).toMatch(/bound r = 1/);
  });

  it('gives the moment version as the correlation of the implied factor series', () => {
    // definition (DESIGN.md implied factor), Pearson correlation by hand
    const a = { obligors: [1000, 1000, 1000, 1000], defaults: [5, 10, 20, 8] };
    const s = impliedFactorSeries(a, 0.01, 0.1);
    expect('values' in s && s.values.length).toBe(4);
    expect(impliedFactorSeries({ obligors: [10, 10], defaults: [0, 1] }, 0.05, 0.1)).toMatchObject({ reason: expect.stringMatching(/year 1/) });
  });

  it('gives a segment without defaults in the pair a status and a sentence, never NaN', () => {
    const a = seg('A', { obligors: [1000, 1050, 1100, 980], defaults: [8, 12, 25, 30] });
    const z = seg('Z', { obligors: [500, 500, 500, 500], defaults: [0, 0, 0, 0] });
    const r = factorCorrelation(a, z);
    expect(r.status).toBe('undefined');
    expect(r.reason).toMatch(/Z has no likelihood estimate/);
    expect(r.r).toBeNull();
    const short = factorCorrelation(a, seg('B', { obligors: [10, 10], defaults: [1, 1] }, 2003));
    expect(short.reason).toMatch(/2 years in common/);
  });

  it('recovers a known factor correlation from simulated segments within its sampling error (seeded)', () => {
    // simulation from the model: three segments, T = 40, every factor pair with correlation 0.5
    // (one common component sqrt(0.5) Y + sqrt(0.5) e); tolerance 3 standard errors from the interval width
    const rng = createRng(4242);
    const specs = [
      { pd: 0.01, rho: 0.12, n: 4000 },
      { pd: 0.02, rho: 0.08, n: 6000 },
      { pd: 0.005, rho: 0.15, n: 8000 },
    ];
    const panels = specs.map(() => ({ obligors: [] as number[], defaults: [] as number[] }));
    for (let t = 0; t < 40; t++) {
      const y = rng.normal();
      specs.forEach((s, i) => {
        const z = Math.SQRT1_2 * y + Math.SQRT1_2 * rng.normal();
        panels[i].obligors.push(s.n);
        panels[i].defaults.push(rng.binomial(s.n, conditionalPd(s.pd, s.rho, z)));
      });
    }
    const m = factorCorrelationMatrix(panels.map((p, i) => seg(`S${i + 1}`, p)));
    for (const e of m.entries) {
      expect(e.status).toBe('ok');
      const se = (e.upper! - e.lower!) / (2 * 1.96);
      expect(Math.abs(e.r! - 0.5), `${e.a}-${e.b}`).toBeLessThan(3 * se);
      expect(e.obligors!.jointDefault).toBeGreaterThan(e.margins.a!.pd * e.margins.b!.pd);
    }
    expect(m.matrix[0][0]).toBe(1);
    expect(m.matrix[0][1]).toBe(m.matrix[1][0]);
  });

  it('puts the nearest correlation matrix beside a pairwise matrix that is not positive semi-definite, naming the largest change', () => {
    // Higham (2002), section 4 example as pairwise estimates
    const base = { status: 'ok' as const, periods: [], lower: 0, upper: 1, level: 0.95, moment: null, logLik: 0, margins: { a: null, b: null } };
    const m = assembleFactorCorrelationMatrix(['A', 'B', 'C'], [
      { ...base, a: 'A', b: 'B', r: 1 },
      { ...base, a: 'B', b: 'C', r: 1 },
      { ...base, a: 'A', b: 'C', r: 0 },
    ]);
    expect(m.nearest).not.toBeNull();
    expect(m.largestChange).toMatchObject({ a: 'A', b: 'B' });
    expect(m.nearestNote).toMatch(/moves A-B most/);
    const incomplete = assembleFactorCorrelationMatrix(['A', 'B'], [{ ...base, a: 'A', b: 'B', r: null }]);
    expect(incomplete.nearest).toBeNull();
    expect(incomplete.nearestNote).toMatch(/incomplete/);
  });
});
