import { describe, expect, it } from 'vitest';
import fx from '@/tests/fixtures/portfolio/pairs-fixtures.json';
import { logBinomialCoefficient } from '@/lib/stats/log-binomial';
import { MixtureLikelihood } from '@/lib/stats/mixture-likelihood';
import { normalQuantile } from '@/lib/stats/normal';
import { InnerLogIntegralTable } from '@/lib/stats/pair-inner-table';
import { PairLikelihood, TABLE_TOLERANCE } from '@/lib/stats/pair-likelihood';

// One year of segment B at scale a' = a_B sqrt(1 - r^2): a small book, a large one, a year
// without defaults, a nearly deterministic factor (a' small: r near 1) and a year where nearly all default.
const YEARS = [
  { n: 1000, d: 8, scale: 0.3 },
  { n: 150000, d: 1200, scale: 0.25 },
  { n: 5000, d: 0, scale: 0.4 },
  { n: 2000, d: 60, scale: 0.05 },
  { n: 40, d: 39, scale: 0.5 },
];

function table(y: (typeof YEARS)[number]): InnerLogIntegralTable {
  const t = new InnerLogIntegralTable();
  t.setYear(y.n, y.d, logBinomialCoefficient(y.n, y.d));
  t.setScale(y.scale);
  return t;
}

/** The threshold c where B's year has its observed default rate (0.5 defaults when none). */
const centre = (y: (typeof YEARS)[number]) => normalQuantile(Math.max(y.d, 0.5) / y.n) * Math.sqrt(1 + y.scale * y.scale);

/** Largest |interpolated - exact| of Psi, Psi', Psi'' over the cells -4 .. 3 of a table laid at c0 with spacing h. */
function interpolationError(y: (typeof YEARS)[number], h: number): number[] {
  const t = table(y);
  const reference = table(y);
  const c0 = centre(y);
  const out = new Float64Array(3);
  const exact = new Float64Array(3);
  t.exact(c0, out);
  t.start(c0, h, out);
  const err = [0, 0, 0];
  for (let i = -40; i < 40; i++) {
    const c = c0 + ((i + 0.37) * h) / 10;
    t.interpolate(c, out);
    reference.exact(c, exact);
    for (let k = 0; k < 3; k++) err[k] = Math.max(err[k], Math.abs(out[k] - exact[k]));
  }
  return err;
}

describe('InnerLogIntegralTable (the inner log-integral of a pair year on a line)', () => {
  it('is exactly the one-factor mixture log-likelihood of the year at the shifted threshold', () => {
    // algebra of z2 = r z1 + sqrt(1 - r^2) w (module comment of pair-mixing.ts): Psi(c) is B's
    // Vasicek likelihood at Phi^-1(p') = c / sqrt(1 + a'^2) and rho' = a'^2 / (1 + a'^2); the
    // mixture likelihood is checked against SciPy's quad in tests/unit/stats/mixture-likelihood.test.ts
    for (const y of YEARS) {
      const t = table(y);
      const out = new Float64Array(3);
      const M = new MixtureLikelihood({ obligors: [y.n], defaults: [y.d] });
      const rhoPrime = (y.scale * y.scale) / (1 + y.scale * y.scale);
      for (const shift of [-1, 0, 0.7]) {
        const c = centre(y) + shift * y.scale;
        t.exact(c, out);
        expect(Math.abs(out[0] - M.logLik(c / Math.sqrt(1 + y.scale * y.scale), rhoPrime)), `n=${y.n} d=${y.d} c=${c}`).toBeLessThan(1e-11);
      }
    }
  });

  it('interpolates with an error that falls as h^6 (Psi), h^5 (Psi\'), h^4 (Psi\'\') against the exact integral', () => {
    // remainder of quintic Hermite interpolation (Stoer & Bulirsch 2002, Theorem 2.1.5.9): halving
    // the spacing divides the error by 64 (32, 16 for the derivatives); the exact integral is the
    // log-concave integrator's (tolerance near 1e-13), so only errors above 1e-10 are compared
    for (const y of YEARS) {
      for (const h of [0.4, 0.2]) {
        const coarse = interpolationError(y, h);
        const fine = interpolationError(y, h / 2);
        const orders = [6, 5, 4];
        for (let k = 0; k < 3; k++) {
          if (coarse[k] < 1e-10 * (k === 0 ? 1 : 100)) continue;
          const ratio = coarse[k] / fine[k];
          expect(ratio, `n=${y.n} d=${y.d} h=${h} derivative ${k}`).toBeGreaterThan(2 ** orders[k] / 2);
          expect(ratio, `n=${y.n} d=${y.d} h=${h} derivative ${k}`).toBeLessThan(2 ** orders[k] * 2);
        }
      }
    }
  });

  it('reports by checkNear an error that bounds the interpolation error of the two cells it checks, within 1.5 times', () => {
    // the remainder's factor (c - c_j)^3 (c - c_j+1)^3 is largest at the cell's midpoint, where
    // checkNear compares with an exact integral; dense exact integrals across both cells check it
    for (const y of YEARS) {
      for (const h of [0.4, 0.1]) {
        const t = table(y);
        const reference = table(y);
        const c0 = centre(y);
        const out = new Float64Array(3);
        const exact = new Float64Array(3);
        t.exact(c0, out);
        t.start(c0, h, out);
        const at = c0 + 0.7 * h; // cell 0, nearer to cell 1
        const reported = t.checkNear(at);
        let worst = 0;
        for (let i = 1; i < 40; i++) {
          const c = c0 + (i * h) / 20; // cells 0 and 1
          t.interpolate(c, out);
          reference.exact(c, exact);
          worst = Math.max(worst, Math.abs(out[0] - exact[0]));
        }
        if (worst < 1e-12) continue; // at the exact integrator's own precision
        expect(worst, `n=${y.n} d=${y.d} h=${h}`).toBeLessThan(1.5 * reported);
        expect(reported, `n=${y.n} d=${y.d} h=${h}`).toBeLessThan(1.0001 * worst);
      }
    }
  });

  it('keeps every node through refine and halves the spacing', () => {
    const y = YEARS[0];
    const t = table(y);
    const out = new Float64Array(3);
    const c0 = centre(y);
    t.exact(c0, out);
    t.start(c0, 0.4, out);
    t.interpolate(c0 + 0.5, out);
    const before = t.exactIntegrals;
    expect(before).toBe(3); // the anchor's exact integral and the nodes c0 + 0.4, c0 + 0.8
    t.refine();
    expect(t.spacing).toBe(0.2);
    // c0 + 0.3 lies between the new node c0 + 0.2 and the old c0 + 0.4 (now node 2): one new integral
    t.interpolate(c0 + 0.3, out);
    expect(t.exactIntegrals).toBe(before + 1);
    expect(() => t.start(c0, 0, out)).toThrow(RangeError);
  });
});

describe('PairLikelihood with tabulated inner integrals', () => {
  const exactAndTable = (a: { obligors: number[]; defaults: number[] }, b: { obligors: number[]; defaults: number[] }, ma: { pd: number; rho: number }, mb: { pd: number; rho: number }) => [
    new PairLikelihood(a, b, ma, mb, { tabulate: false }),
    new PairLikelihood(a, b, ma, mb),
  ];

  it('agrees with the pair likelihood of exact inner integrals to the table tolerance per year, slope included', () => {
    // the tabulated rule against the same outer rule with every inner integral exact; the
    // tolerance is TABLE_TOLERANCE (1e-10) per year at the outer mode, checked a posteriori
    const panels = [
      { a: { obligors: [1000, 1200, 900, 1100], defaults: [5, 14, 0, 9] }, b: { obligors: [40000, 42000, 39000, 41000], defaults: [300, 610, 150, 420] }, ma: { pd: 0.007, rho: 0.1 }, mb: { pd: 0.011, rho: 0.06 } },
      { a: { obligors: [150000, 148000, 152000], defaults: [900, 2100, 450] }, b: { obligors: [800, 820, 790], defaults: [3, 19, 1] }, ma: { pd: 0.008, rho: 0.05 }, mb: { pd: 0.009, rho: 0.2 } },
      { a: { obligors: [500, 520, 480, 510, 505], defaults: [0, 4, 0, 1, 0] }, b: { obligors: [60, 55, 58, 61, 59], defaults: [50, 30, 58, 41, 45] }, ma: { pd: 0.003, rho: 0.3 }, mb: { pd: 0.8, rho: 0.25 } },
    ];
    for (const P of panels) {
      const [exact, tabulated] = exactAndTable(P.a, P.b, P.ma, P.mb);
      const T = P.a.obligors.length;
      for (const r of [-0.95, -0.4, 0.05, 0.35, 0.7, 0.95, 0.995]) {
        const e = exact.logLikWithSlope(r);
        const q = tabulated.logLikWithSlope(r);
        expect(Math.abs(q.value - e.value), `r=${r}`).toBeLessThan(2 * T * TABLE_TOLERANCE);
        expect(Math.abs(q.slope - e.slope), `r=${r}`).toBeLessThan(1e-7 * Math.max(1, Math.abs(e.slope)));
      }
      expect(tabulated.report().unconverged).toBe(0);
    }
  });

  it('agrees on every year of the SciPy fixture, and both agree with SciPy to 1e-8', () => {
    // computed with NumPy/SciPy 1.17 by tests/fixtures/portfolio/make_pairs.py (2401 x 2401 trapezoid)
    for (const y of fx.years) {
      const [exact, tabulated] = exactAndTable({ obligors: [y.nA], defaults: [y.dA] }, { obligors: [y.nB], defaults: [y.dB] }, { pd: y.pA, rho: y.rhoA }, { pd: y.pB, rho: y.rhoB });
      const a = exact.logLik(y.r);
      const b = tabulated.logLik(y.r);
      expect(Math.abs(a - b), `nA=${y.nA} r=${y.r}`).toBeLessThan(2 * TABLE_TOLERANCE);
      expect(Math.abs(b - y.logLik), `nA=${y.nA} r=${y.r}`).toBeLessThan(1e-8 * Math.max(1, Math.abs(y.logLik)));
    }
  });
});
