import { describe, expect, it } from 'vitest';
import engine from '@/tests/fixtures/engine/engine-fixtures.json';
import ref from '@/tests/fixtures/time/ar1-mle-fixtures.json';
import { ar1Mle, AR1_PHI_LIMIT } from '@/lib/stats/estimators/ar1-mle';
import { binomialMle } from '@/lib/stats/estimators/binomial-mle';
import { normalCdf, normalQuantile } from '@/lib/stats/normal';
import { createRng, deriveSeed } from '@/lib/stats/random';
import { simulatePanel } from '@/lib/stats/simulate';

type EnginePanel = { obligors: number[]; defaults: number[] };
const panels = engine.panels as unknown as Record<string, EnginePanel>;

describe('ar1Mle', () => {
  it.each(ref.cases.map((c) => [c.panel, c] as const))('panel %s: the maximum found by SciPy (Nelder-Mead on a brute-force recursion)', (_name, c) => {
    const { result } = ar1Mle({ obligors: c.obligors, defaults: c.defaults });
    expect(result.status).toBe('ok');
    // computed with SciPy 1.17 (tests/fixtures/time/make_ar1_mle.py); the reference's grid is
    // exact to its recorded finer-grid difference
    expect(Math.abs(c.ar1.logLik - c.ar1.logLikFinerGrid)).toBeLessThan(1e-9);
    // Newton converges tighter than Nelder-Mead: never below SciPy's maximum, at most 1e-8 above it
    expect(result.logLik! - c.ar1.logLik).toBeGreaterThan(-1e-8);
    expect(result.logLik! - c.ar1.logLik).toBeLessThan(1e-6);
    expect(Math.abs(result.rho! - c.ar1.rho)).toBeLessThan(1e-4);
    expect(Math.abs(result.phi! - c.ar1.phi)).toBeLessThan(1e-3);
    expect(Math.abs(result.pd! - c.ar1.pd)).toBeLessThan(1e-5);
    // the independent model's maximum (phi = 0): binomialMle's, which SciPy's phi = 0 search also finds
    expect(Math.abs(result.logLikIndependent! - c.independent.logLik)).toBeLessThan(1e-7);
  });

  it('is a maximum: no nearby (p, rho, phi) has a higher likelihood (property)', () => {
    for (const name of ['A', 'C', 'E']) {
      const { result, profile } = ar1Mle(panels[name]);
      const L = profile!.likelihood;
      const k = normalQuantile(result.pd!);
      for (const [dk, dr, dp] of [[0.01, 0, 0], [-0.01, 0, 0], [0, 0.002, 0], [0, -0.002, 0], [0, 0, 0.02], [0, 0, -0.02], [0.01, 0.002, 0.02], [-0.01, 0.002, -0.02]]) {
        expect(L.logLik(k + dk, result.rho! + dr, result.phi! + dp), `${name} ${dk} ${dr} ${dp}`).toBeLessThan(result.logLik! + 1e-9);
      }
    }
  });

  it("profiled at phi = 0 it is binomialMle's maximum (the nested independent model)", () => {
    for (const name of ['A', 'D', 'E']) {
      const { profile } = ar1Mle(panels[name]);
      const independent = binomialMle(panels[name]);
      const at0 = profile!.atPhi(0);
      expect(Math.abs(at0.logLik - independent.logLik!), name).toBeLessThan(1e-7);
      expect(Math.abs(at0.rho - independent.rho!), name).toBeLessThan(1e-5);
    }
  });

  it('recovers a persistent factor from a long simulated panel (T = 60, phi = 0.6)', () => {
    // asymptotic sd of phi-hat ~ sqrt((1 - phi^2) / T) = 0.10 for an observed AR(1) (Box & Jenkins
    // 1976, 7.2); the latent factor is observed with noise, so allow 4 of those
    const sim = simulatePanel({ pd: 0.01, rho: 0.1, obligors: new Array(60).fill(20_000), phi: 0.6 }, createRng(deriveSeed(606, 0)));
    const { result } = ar1Mle(sim);
    expect(result.status).toBe('ok');
    expect(Math.abs(result.phi! - 0.6)).toBeLessThan(0.4);
    expect(result.phi!).toBeGreaterThan(0.2);
    expect(Math.abs(result.rho! - 0.1)).toBeLessThan(0.06);
    expect(result.logLik!).toBeGreaterThan(result.logLikIndependent!);
  });

  it('gives a status and a sentence for T < 6, no defaults, rho at 0 and phi at the edge', () => {
    const short = ar1Mle({ obligors: new Array(5).fill(1000), defaults: [5, 9, 12, 7, 10] }).result;
    expect(short).toMatchObject({ status: 'undefined', rho: null, phi: null, reason: expect.stringMatching(/at least 6 periods.*has 5/) });
    const none = ar1Mle({ obligors: new Array(8).fill(1000), defaults: new Array(8).fill(0) }).result;
    expect(none).toMatchObject({ status: 'undefined', reason: expect.stringMatching(/No period has a default/) });
    // panel F: no overdispersion, the maximum is at rho = 0 where phi has no effect
    const F = ar1Mle(panels.F).result;
    expect(F).toMatchObject({ rho: 0, phi: null, atBoundary: true, status: 'ok', reason: expect.stringMatching(/phi is not identified/) });
    expect(F.converged).toBe(true);
    // a default rate drifting smoothly upwards over 20 years (probit -3 + 0.05 t, cohorts of 10^6):
    // the factor looks like a random walk
    const obligors = new Array(20).fill(1_000_000);
    const drift = { obligors, defaults: obligors.map((n, t) => Math.round(n * normalCdf(-3 + 0.05 * t))) };
    const edge = ar1Mle(drift).result;
    expect(edge).toMatchObject({ status: 'clipped', phiAtEdge: true, phi: AR1_PHI_LIMIT, reason: expect.stringMatching(/random walk/) });
    expect(() => ar1Mle({ obligors: new Array(6).fill(10), defaults: [1, 2, 3, 4, 5, 11] })).toThrow(/period 6/);
  });
});
