import { describe, expect, it } from 'vitest';
import engine from '@/tests/fixtures/engine/engine-fixtures.json';
import ref from '@/tests/fixtures/time/ar1-likelihood-fixtures.json';
import { Ar1Likelihood, ar1LogLikelihood } from '@/lib/stats/ar1-likelihood';
import { binomialMle } from '@/lib/stats/estimators/binomial-mle';
import { binomialLogPmf } from '@/lib/stats/log-binomial';
import { mixtureLogLikelihood } from '@/lib/stats/mixture-likelihood';
import { normalQuantile } from '@/lib/stats/normal';
import { createRng, deriveSeed } from '@/lib/stats/random';
import { simulatePanel } from '@/lib/stats/simulate';

type EnginePanel = { obligors: number[]; defaults: number[] };
const enginePanels = engine.panels as unknown as Record<string, EnginePanel>;

describe('AR(1)-factor log-likelihood', () => {
  it.each(ref.cases.map((c) => [c.panel, c.pd, c.rho, c.phi, c] as const))(
    'panel %s at p = %s, rho = %s, phi = %s matches an independent SciPy recursion on a fine grid',
    (_name, pd, rho, phi, c) => {
      // computed with SciPy 1.17 (tests/fixtures/time/make_ar1_likelihood.py: one uniform grid of
      // spacing 0.001; its value at spacing 0.002 differs by ~1e-11)
      expect(Math.abs(c.logLik - c.logLikCoarse)).toBeLessThan(1e-10);
      const value = ar1LogLikelihood({ obligors: c.obligors, defaults: c.defaults }, pd, rho, phi);
      expect(Math.abs(value - c.logLik)).toBeLessThan(1e-9);
    },
  );

  it('with phi = 0 equals the binomial-mixture likelihood (the independent model) to 1e-9', () => {
    for (const [name, panel] of Object.entries(enginePanels)) {
      for (const [p, rho] of [[0.01, 0.02], [0.015, 0.12], [0.005, 0.4], [0.02, 0.8], [0.01, 0.95]]) {
        // mixture-likelihood.ts is itself checked against QUADPACK (engine fixtures)
        const diff = ar1LogLikelihood(panel, p, rho, 0) - mixtureLogLikelihood(panel, p, rho);
        expect(Math.abs(diff), `panel ${name} p=${p} rho=${rho}`).toBeLessThan(1e-9);
      }
    }
  });

  it("with phi = 0 at binomialMle's estimate equals binomialMle's log-likelihood to 1e-6 (the model's nesting: phi = 0 is the independent factor)", () => {
    for (const [name, panel] of Object.entries(enginePanels)) {
      const mle = binomialMle(panel);
      if (mle.rho === null || mle.pd === null) continue;
      expect(Math.abs(ar1LogLikelihood(panel, mle.pd, mle.rho, 0) - mle.logLik!), name).toBeLessThan(1e-6);
    }
  });

  it('moves by less than 1e-9 when the node spacing is halved, at n = 500,000 (T = 20)', () => {
    // The nesting is asked to hold to 1e-6. Panels simulated with persistent, alternating and independent factors;
    // spacing halved twice (nodesPerScale 2 -> 4 -> 8).
    for (const phi of [0.6, 0.95, -0.5, 0]) {
      const sim = simulatePanel({ pd: 0.01, rho: 0.12, obligors: new Array(20).fill(500_000), phi }, createRng(deriveSeed(500, Math.round(phi * 100) + 100)));
      const k = normalQuantile(0.01);
      const [a, b, c] = [2, 4, 8].map((nodesPerScale) => {
        const L = new Ar1Likelihood(sim, { nodesPerScale });
        const v = L.logLik(k, 0.12, phi);
        expect(L.coarse).toBe(0);
        return v;
      });
      expect(Math.abs(a - b), `phi=${phi}`).toBeLessThan(1e-9);
      expect(Math.abs(b - c), `phi=${phi}`).toBeLessThan(1e-9);
    }
  });

  it('converges under refinement for small cohorts with zero-default years at high rho (the cliff)', () => {
    const C = enginePanels.C;
    for (const rho of [0.5, 0.8, 0.95]) {
      const values = [2, 4, 8].map((nodesPerScale) => new Ar1Likelihood(C, { nodesPerScale }).logLik(normalQuantile(0.04), rho, 0.7));
      expect(Math.abs(values[0] - values[2]), `rho=${rho}`).toBeLessThan(1e-9);
    }
  });

  it('is the binomial likelihood at rho = 0 whatever phi', () => {
    const A = enginePanels.A;
    const expected = A.obligors.reduce((s, n, t) => s + binomialLogPmf(A.defaults[t], n, 0.013), 0);
    // the same binomial sum (Phi(Phi^-1(p)) differs from p in the last digit, hence 1e-12)
    for (const phi of [-0.9, 0, 0.7]) expect(Math.abs(ar1LogLikelihood(A, 0.013, 0, phi) - expected)).toBeLessThan(1e-12);
  });

  it('is the same for the panel read backwards: a stationary Gaussian AR(1) is time-reversible (property)', () => {
    // Weiss, G. (1975), "Time-reversibility of linear stochastic processes", J. Appl. Prob. 12:831-836
    const E = enginePanels.E;
    const back = { obligors: [...E.obligors].reverse(), defaults: [...E.defaults].reverse() };
    for (const phi of [0.8, -0.6]) {
      expect(Math.abs(ar1LogLikelihood(E, 0.015, 0.05, phi) - ar1LogLikelihood(back, 0.015, 0.05, phi))).toBeLessThan(1e-9);
    }
  });

  it('gives the gradient and Hessian in (k, rho, phi) of central differences of itself (relative 1e-5)', () => {
    for (const name of ['A', 'C', 'D']) {
      const L = new Ar1Likelihood(enginePanels[name]);
      const x = [normalQuantile(0.012), 0.08, 0.5];
      const h = [1e-4, 1e-5, 1e-4];
      const full = L.logLikFull(x[0], x[1], x[2]);
      for (let i = 0; i < 3; i++) {
        const up = [...x];
        const down = [...x];
        up[i] += h[i];
        down[i] -= h[i];
        const fd = (L.logLik(up[0], up[1], up[2]) - L.logLik(down[0], down[1], down[2])) / (2 * h[i]);
        expect(Math.abs(full.gradient[i] - fd), `${name} gradient ${i}`).toBeLessThan(1e-5 * (1 + Math.abs(fd)));
        const gUp = L.logLikFull(up[0], up[1], up[2]).gradient;
        const gDown = L.logLikFull(down[0], down[1], down[2]).gradient;
        for (let j = 0; j < 3; j++) {
          const fdH = (gUp[j] - gDown[j]) / (2 * h[i]);
          expect(Math.abs(full.hessian[i][j] - fdH), `${name} hessian ${i},${j}`).toBeLessThan(1e-5 * (1 + Math.abs(fdH)));
        }
      }
      expect(full.hessian[0][2]).toBe(full.hessian[2][0]);
    }
  });

  it('refuses parameters outside the model and invalid counts', () => {
    const A = enginePanels.A;
    expect(() => ar1LogLikelihood(A, 0.01, 0.1, 1)).toThrow(/phi/);
    expect(() => ar1LogLikelihood(A, 0.01, 1, 0.5)).toThrow(/rho/);
    expect(() => ar1LogLikelihood(A, 0, 0.1, 0.5)).toThrow(/probability of default/);
    expect(() => new Ar1Likelihood(A).logLikFull(-2, 0, 0.5)).toThrow(/rho > 0/);
    expect(() => ar1LogLikelihood({ obligors: [10, 10], defaults: [1, 11] }, 0.01, 0.1, 0.5)).toThrow(/period 2/);
  });
});
