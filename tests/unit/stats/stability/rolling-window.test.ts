import { describe, expect, it } from 'vitest';
import engine from '@/tests/fixtures/engine/engine-fixtures.json';
import { binomialMleWithProfile } from '@/lib/stats/estimators/binomial-mle';
import { profileInterval } from '@/lib/stats/intervals/profile';
import { rollingWindow, type RollingWindow } from '@/lib/stats/stability/rolling-window';

const E = engine.panels.E;
const periods = E.obligors.map((_, t) => String(2001 + t));

describe('rollingWindow', () => {
  it('fits binomialMle with its profile interval on every window (DESIGN.md stability.rolling)', () => {
    const r = rollingWindow({ periods, obligors: E.obligors, defaults: E.defaults }, { window: 10 }) as RollingWindow;
    expect(r.status).toBe('ok');
    expect(r.window).toBe(10);
    expect(r.entries).toHaveLength(11);
    expect(r.entries[0]).toMatchObject({ from: '2001', to: '2010' });
    expect(r.entries[10]).toMatchObject({ from: '2011', to: '2020' });
    for (const i of [0, 5, 10]) {
      const part = { obligors: E.obligors.slice(i, i + 10), defaults: E.defaults.slice(i, i + 10) };
      const { result, profile } = binomialMleWithProfile(part);
      const iv = profileInterval(profile!, result);
      expect(r.entries[i]).toMatchObject({ rho: result.rho, lower: iv.lower, upper: iv.upper, status: result.status });
      expect(r.entries[i].lower!).toBeLessThanOrEqual(r.entries[i].rho!);
      expect(r.entries[i].upper!).toBeGreaterThanOrEqual(r.entries[i].rho!);
    }
  });

  it('matches the whole-panel fit of SciPy when the window is the whole panel', () => {
    const r = rollingWindow({ periods, obligors: E.obligors, defaults: E.defaults }, { window: 20 }) as RollingWindow;
    expect(r.entries).toHaveLength(1);
    // computed with SciPy 1.17 (tests/fixtures/engine/make_fixtures.py, panel E)
    expect(Math.abs(r.entries[0].rho! - E.binomialMle.rho)).toBeLessThan(1e-6);
    expect(Math.abs(r.entries[0].lower! - E.binomialMle.profile95[0])).toBeLessThan(1e-6);
    expect(Math.abs(r.entries[0].upper! - E.binomialMle.profile95[1])).toBeLessThan(1e-6);
  });

  it('gives a status and a sentence for a short panel or a window without defaults', () => {
    expect(rollingWindow({ periods: periods.slice(0, 8), obligors: E.obligors.slice(0, 8), defaults: E.defaults.slice(0, 8) })).toMatchObject({
      status: 'undefined',
      window: 10,
      reason: expect.stringMatching(/needs at least 10; this panel has 8/),
    });
    const r = rollingWindow({ periods: ['a', 'b', 'c', 'd'], obligors: [100, 100, 100, 100], defaults: [0, 0, 0, 4] }, { window: 3 }) as RollingWindow;
    expect(r.entries[0]).toMatchObject({ from: 'a', to: 'c', rho: null, lower: null, upper: null, status: 'undefined', reason: expect.stringMatching(/No period has a default/) });
    expect(r.entries[1].rho).not.toBeNull();
    expect(() => rollingWindow({ periods, obligors: E.obligors, defaults: E.defaults }, { window: 1 })).toThrow(/window/);
  });
});
