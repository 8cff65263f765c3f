import { describe, expect, it } from 'vitest';
import fixtures from '@/tests/fixtures/engine/engine-fixtures.json';
import { binomialMleWithProfile, ProfileLikelihood } from '@/lib/stats/estimators/binomial-mle';
import { mixtureLogLikelihood } from '@/lib/stats/mixture-likelihood';
import { profileInterval } from '@/lib/stats/intervals/profile';
import { createRng, deriveSeed } from '@/lib/stats/random';
import { simulatePanel } from '@/lib/stats/simulate';
import { waldInterval } from '@/lib/stats/intervals/wald';

type PanelName = keyof typeof fixtures.panels;
const names = Object.keys(fixtures.panels) as PanelName[];

describe('ProfileLikelihood', () => {
  it('reports the slope and curvature of the profile (envelope and implicit function theorems)', () => {
    // calculus: central differences of independently solved profile values and slopes
    for (const name of ['A', 'C', 'D', 'E'] as const) {
      const f = fixtures.panels[name];
      for (const rho of [0.01, 0.05, 0.3]) {
        const h = rho * 1e-3;
        const q = new ProfileLikelihood(f).at(rho);
        const up = new ProfileLikelihood(f).at(rho + h);
        const dn = new ProfileLikelihood(f).at(rho - h);
        expect(q.converged).toBe(true);
        const slopeFd = (up.logLik - dn.logLik) / (2 * h);
        const curvFd = (up.slope - dn.slope) / (2 * h);
        expect(Math.abs(q.slope - slopeFd), `${name} rho=${rho}`).toBeLessThan(1e-5 * Math.abs(q.curvature) * rho + 1e-6);
        expect(Math.abs(q.curvature - curvFd), `${name} rho=${rho}`).toBeLessThan(1e-4 * Math.abs(q.curvature));
      }
    }
  });

  it('maximises over p: no p on a fine grid beats the profile value', () => {
    // property: l*(rho) = max_p l(p, rho)
    const f = fixtures.panels.A;
    for (const rho of [0, 0.02, 0.2]) {
      const q = new ProfileLikelihood(f).at(rho);
      for (let j = -20; j <= 20; j++) {
        const p = q.pd * Math.exp(j * 0.002);
        expect(mixtureLogLikelihood(f, p, rho)).toBeLessThanOrEqual(q.logLik + 1e-10);
      }
    }
  });

  it('gives the same value from a cold start as after a walk of warm starts', () => {
    // property: the warm start changes the cost, not the answer (to the rule's accuracy)
    const f = fixtures.panels.E;
    const warm = new ProfileLikelihood(f);
    for (const rho of [0, 0.02, 0.05, 0.1, 0.2, 0.4, 0.8]) warm.at(rho);
    for (const rho of [0.03, 0.6]) {
      const cold = new ProfileLikelihood(f).at(rho);
      expect(Math.abs(warm.at(rho).logLik - cold.logLik)).toBeLessThan(1e-9 * Math.abs(cold.logLik));
    }
  });
});

describe('binomialMle search', () => {
  it.each(names)('panel %s: the estimate is a stationary point or the boundary, found in few evaluations', (name) => {
    const f = fixtures.panels[name];
    const { result, profile } = binomialMleWithProfile(f);
    const top = result.profilePoints.find((q) => q.rho === result.rho)!;
    if (result.atBoundary) expect(top.slope).toBeLessThanOrEqual(0); // Kuhn-Tucker at rho = 0
    else expect(Math.abs(top.slope / top.curvature)).toBeLessThan(1e-8); // Newton step to the root
    const mleEvaluations = profile!.likelihood.evaluations;
    profileInterval(profile!, result);
    waldInterval(profile!, result);
    // design budget (the engine's speed target): 8 grid points, 2 bracket ends, a few Newton steps,
    // and about 5 per interval end; the previous value grid with Brent's search used ~110 + ~45
    expect(mleEvaluations).toBeLessThanOrEqual(30);
    expect(profile!.likelihood.evaluations).toBeLessThanOrEqual(50);
  });

  it('finds the global maximum and exact interval ends on 40 varied simulated panels', () => {
    // property: no rho of a fine grid (41 points, denser near 0) beats the estimate, and each
    // profile end solves l*(rho) = l*(rho_hat) - 1.9207 (chi2_1 0.95 / 2, A&S Table 26.8) to 1e-8
    // in rho. Panels: T 3-27, cohorts 20-200,000, p 0.05%-30%, rho 0-0.6 (seeded).
    for (let i = 0; i < 40; i++) {
      const rng = createRng(deriveSeed(5, i));
      const T = 3 + Math.floor(rng.uniform() * 25);
      const nmax = Math.exp(Math.log(20) + rng.uniform() * Math.log(1e4));
      const p = Math.exp(Math.log(0.0005) + rng.uniform() * Math.log(600));
      const rho = rng.uniform() < 0.2 ? 0 : rng.uniform() * 0.6;
      const obligors = Array.from({ length: T }, () => Math.max(1, Math.round(nmax * (0.3 + 0.7 * rng.uniform()))));
      const sim = simulatePanel({ pd: p, rho, obligors }, rng);
      const { result, profile } = binomialMleWithProfile(sim);
      if (result.rho === null) continue;
      expect(result.status, `panel ${i}`).not.toBe('not-converged');
      const check = new ProfileLikelihood(sim);
      for (let j = 0; j <= 40; j++) {
        const r = 0.995 * (j / 40) ** 2;
        expect(check.at(r).logLik, `panel ${i} rho ${r}`).toBeLessThanOrEqual(result.logLik! + 1e-7);
      }
      const iv = profileInterval(profile!, result);
      expect(iv.converged).toBe(true);
      const cut = result.logLik! - 1.9207294103470195;
      for (const end of [iv.lower, iv.upper]) {
        if (end === 0 || end === 0.995) continue;
        const q = check.at(end);
        expect(Math.abs((q.logLik - cut) / q.slope), `panel ${i} end ${end}`).toBeLessThan(1e-8);
      }
    }
  });

  it('walks the bracket when a one-step grid estimate has the wrong slope sign', () => {
    // Panel E: the grid estimate at 0.02 has a negative slope, the solved slope is positive; the
    // maximum (computed with SciPy 1.17, tests/fixtures/engine/make_fixtures.py) lies in (0.02, 0.05)
    const f = fixtures.panels.E;
    const p = new ProfileLikelihood(f);
    p.estimate(0);
    expect(p.estimate(0.02).slope).toBeLessThan(0);
    const mle = binomialMleWithProfile(f).result;
    expect(Math.abs(mle.rho! - f.binomialMle.rho)).toBeLessThan(2e-6);
  });

  it('reports a clipped estimate when the likelihood increases up to the search limit', () => {
    // Invented panel of all-or-nothing years: the profile rises all the way to rho -> 1
    const f = { obligors: [100, 100, 100, 100, 100, 100], defaults: [0, 0, 100, 0, 0, 100] };
    const mle = binomialMleWithProfile(f).result;
    expect(mle.status).toBe('clipped');
    expect(mle.rho).toBeCloseTo(0.995, 9);
  });
});
