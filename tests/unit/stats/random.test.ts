import { describe, expect, it } from 'vitest';
import chisquareQuantile from '@stdlib/stats-base-dists-chisquare-quantile';
import { createMt19937, createRng, deriveSeed } from '@/lib/stats/random';
import { binomialLogPmf } from '@/lib/stats/log-binomial';
import fx from '@/tests/fixtures/stats/random.json';

describe('MT19937 stream', () => {
  it('gives the reference outputs for seed 5489 (mt19937ar.c; ISO C++ [rand.predef]: 10000th output 4123659995)', () => {
    const mt = createMt19937(5489);
    expect(mt.nextUint32()).toBe(3499211612);
    for (let i = 2; i < 10000; i++) mt.nextUint32();
    expect(mt.nextUint32()).toBe(4123659995);
  });

  it('uniform() equals NumPy legacy RandomState(seed).random_sample() (computed with NumPy, tests/fixtures/stats/make_fixtures.py)', () => {
    for (const s of fx.randomSample) {
      const rng = createRng(s.seed);
      const got = Array.from({ length: 1000 }, () => rng.uniform());
      expect(got.slice(0, 8)).toEqual(s.first);
      expect(got[999]).toBe(s.at999);
    }
  });

  it('same seed, same stream; another seed, another stream (property)', () => {
    const a = createRng(7);
    const b = createRng(7);
    const c = createRng(8);
    const draw = (r: ReturnType<typeof createRng>) => [r.uniform(), r.normal(), r.binomial(1_000_000, 0.003), r.binomial(50, 0.2)];
    for (let i = 0; i < 100; i++) expect(draw(a)).toEqual(draw(b));
    expect(draw(a)).not.toEqual(draw(c));
    expect(a.seed).toBe(7);
  });

  it('refuses seeds that are not 32-bit unsigned integers', () => {
    expect(() => createRng(-1)).toThrow(/seed must be an integer in \[0, 4294967295\]/);
    expect(() => createRng(1.5)).toThrow(RangeError);
    expect(() => createRng(2 ** 32)).toThrow(RangeError);
  });
});

describe('deriveSeed', () => {
  it('is deterministic, 32-bit, and collision-free over 100,000 indices of one master seed (property)', () => {
    const seen = new Set<number>();
    let bad = 0;
    for (let i = 0; i < 100_000; i++) {
      const s = deriveSeed(7, i);
      if (!(Number.isInteger(s) && s >= 0 && s <= 0xffffffff)) bad++;
      seen.add(s);
    }
    expect(bad).toBe(0);
    expect(seen.size).toBe(100_000); // fmix32 is a bijection: distinct inputs, distinct outputs
    expect(deriveSeed(7, 3)).toBe(deriveSeed(7, 3));
    expect(deriveSeed(7, 3)).not.toBe(deriveSeed(8, 3));
    expect(deriveSeed(7, 2 ** 40)).not.toBe(deriveSeed(7, 0));
    expect(() => deriveSeed(7, -1)).toThrow(/index must be a non-negative integer/);
  });

  it('gives sub-streams whose first uniforms look independent (correlation of adjacent streams within 5 SE)', () => {
    const R = 5_000;
    let sxy = 0;
    let sx = 0;
    let sy = 0;
    let sxx = 0;
    let syy = 0;
    for (let i = 0; i < R; i++) {
      const x = createRng(deriveSeed(11, i)).uniform();
      const y = createRng(deriveSeed(11, i + 1)).uniform();
      sx += x; sy += y; sxy += x * y; sxx += x * x; syy += y * y;
    }
    const cov = sxy / R - (sx / R) * (sy / R);
    const corr = cov / Math.sqrt((sxx / R - (sx / R) ** 2) * (syy / R - (sy / R) ** 2));
    expect(Math.abs(corr)).toBeLessThan(5 / Math.sqrt(R)); // SE of a null correlation: 1/sqrt(R)
  });
});

describe('normal()', () => {
  it('has mean 0, variance 1 and 2.5% below -1.96 within 5 standard errors (N = 400,000)', () => {
    const rng = createRng(2024);
    const N = 400_000;
    let s = 0;
    let ss = 0;
    let below = 0;
    for (let i = 0; i < N; i++) {
      const x = rng.normal();
      s += x;
      ss += x * x;
      if (x < -1.959963984540054) below++;
    }
    const mean = s / N;
    const variance = ss / N - mean * mean;
    expect(Math.abs(mean)).toBeLessThan(5 / Math.sqrt(N)); // SE = 1/sqrt(N)
    expect(Math.abs(variance - 1)).toBeLessThan(5 * Math.sqrt(2 / N)); // SE = sqrt(2/N) for normal data
    expect(Math.abs(below / N - 0.025)).toBeLessThan(5 * Math.sqrt((0.025 * 0.975) / N));
  });
});

describe('binomial()', () => {
  const ns = [10, 1_000, 1_000_000];
  const ps = [1e-4, 1e-3, 0.01, 0.1, 0.5, 0.9];

  it('has mean np and variance np(1-p) within 5 standard errors for n = 10, 1e3, 1e6 and p = 1e-4..0.9', () => {
    const R = 20_000;
    let seed = 100;
    for (const n of ns) {
      for (const p of ps) {
        const rng = createRng(seed++);
        let s = 0;
        let ss = 0;
        let bad = 0;
        for (let i = 0; i < R; i++) {
          const x = rng.binomial(n, p);
          if (!(x >= 0 && x <= n && Number.isInteger(x))) bad++;
          s += x;
          ss += x * x;
        }
        expect(bad).toBe(0);
        const mean = s / R;
        const v = (ss - R * mean * mean) / (R - 1);
        const q = 1 - p;
        const sigma2 = n * p * q;
        // fourth central moment of the binomial: npq (1 + 3 (n - 2) pq) (Johnson, Kemp & Kotz 2005, eq. 3.5)
        const mu4 = sigma2 * (1 + 3 * (n - 2) * p * q);
        const seMean = Math.sqrt(sigma2 / R);
        const seVar = Math.sqrt((mu4 - sigma2 * sigma2) / R);
        expect(Math.abs(mean - n * p), `n=${n} p=${p} mean`).toBeLessThan(5 * seMean);
        expect(Math.abs(v - sigma2), `n=${n} p=${p} variance`).toBeLessThan(5 * seVar + 1e-12);
      }
    }
  });

  it('follows the binomial pmf: chi-square goodness of fit below the 0.9999 quantile in both the BTPE and the inversion regime', () => {
    const cases: [number, number][] = [
      [1000, 0.1], // BTPE (np = 100)
      [5_000_000, 0.0004], // BTPE, n in the millions
      [1_000_000, 1e-5], // inversion (np = 10)
      [40, 0.7], // reflected inversion (n(1-p) = 12)
    ];
    const R = 50_000;
    let seed = 900;
    for (const [n, p] of cases) {
      const rng = createRng(seed++);
      const counts = new Map<number, number>();
      for (let i = 0; i < R; i++) {
        const x = rng.binomial(n, p);
        counts.set(x, (counts.get(x) ?? 0) + 1);
      }
      // cells: single values with expected count >= 20; the rest pooled into the two tails
      const mode = Math.floor((n + 1) * p);
      let lo = mode;
      let hi = mode;
      const e = (x: number) => R * Math.exp(binomialLogPmf(x, n, p));
      while (lo > 0 && e(lo - 1) >= 20) lo--;
      while (hi < n && e(hi + 1) >= 20) hi++;
      let chi2 = 0;
      let cells = 0;
      let eInside = 0;
      let oInside = 0;
      for (let x = lo; x <= hi; x++) {
        const ex = e(x);
        const ob = counts.get(x) ?? 0;
        chi2 += (ob - ex) ** 2 / ex;
        eInside += ex;
        oInside += ob;
        cells++;
      }
      const eTails = R - eInside;
      const oTails = R - oInside;
      if (eTails >= 5) {
        chi2 += (oTails - eTails) ** 2 / eTails;
        cells++;
      }
      // chi-square(cells - 1) 0.9999 quantile: stdlib-js chisquare quantile
      expect(chi2, `n=${n} p=${p}`).toBeLessThan(chisquareQuantile(0.9999, cells - 1));
    }
  });

  it('stays fast for n in the millions: 100,000 draws at n = 1e6 in well under a second (measured)', () => {
    const rng = createRng(5);
    const t0 = performance.now();
    let s = 0;
    for (let i = 0; i < 100_000; i++) s += rng.binomial(1_000_000, 0.02);
    expect(s).toBeGreaterThan(0);
    expect(performance.now() - t0).toBeLessThan(1000);
  });

  it('handles the edges exactly and refuses bad arguments', () => {
    const rng = createRng(1);
    expect(rng.binomial(0, 0.5)).toBe(0);
    expect(rng.binomial(100, 0)).toBe(0);
    expect(rng.binomial(100, 1)).toBe(100);
    expect(() => rng.binomial(-1, 0.5)).toThrow(/n must be a non-negative integer/);
    expect(() => rng.binomial(10.5, 0.5)).toThrow(RangeError);
    expect(() => rng.binomial(10, 1.5)).toThrow(/p must be a probability/);
    expect(() => rng.binomial(10, Number.NaN)).toThrow(RangeError);
  });
});
