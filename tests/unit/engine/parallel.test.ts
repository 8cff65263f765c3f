import { afterAll, describe, expect, it } from 'vitest';
import engine from '@/tests/fixtures/engine/engine-fixtures.json';
import { EnginePool, factorCorrelationMatrixParallel, fitPanelParallel } from '@/lib/engine';
import { factorCorrelationMatrix } from '@/lib/stats/factor-correlation-matrix';
import { splitRange } from '@/lib/engine/tasks';
import { fitPanel, type PanelInput, type TimedSegmentFit } from '@/lib/stats/fit-panel';

const A = engine.panels.A;
const panelA: PanelInput = {
  segment: 'Panel A',
  periods: A.obligors.map((_, t) => String(2001 + t)),
  obligors: A.obligors,
  defaults: A.defaults,
};
const options = { bootstrap: { replications: 16, seed: 7 } };
const withoutTiming = ({ timing, ...rest }: TimedSegmentFit) => {
  expect(timing.ms).toBeGreaterThan(0);
  for (const ms of Object.values(timing.stages)) expect(ms).toBeGreaterThanOrEqual(0);
  return rest;
};

describe('splitRange', () => {
  it('covers [0, total) once, in order', () => {
    expect(splitRange(7, 3)).toEqual([{ from: 0, to: 3 }, { from: 3, to: 6 }, { from: 6, to: 7 }]);
    expect(splitRange(0, 5)).toEqual([]);
    expect(() => splitRange(5, 0)).toThrow(RangeError);
  });
});

describe('fitPanelParallel', () => {
  const pools: EnginePool[] = [];
  afterAll(async () => {
    await Promise.all(pools.map((p) => p.close()));
  });

  it('gives identical numbers with 2 threads, 1 thread, in this thread and in fitPanel', async () => {
    const serial = fitPanel(panelA, options);
    const inThread = withoutTiming(await fitPanelParallel(panelA, options, { threads: 0 }));
    const one = withoutTiming(await fitPanelParallel(panelA, options, { threads: 1 }));
    const pct: number[] = [];
    const two = withoutTiming(await fitPanelParallel(panelA, options, { threads: 2, onProgress: (p) => void pct.push(p) }));
    expect(inThread).toEqual(serial);
    expect(one).toEqual(serial);
    expect(two).toEqual(serial);
    expect(two.estimates.binomialMle.intervals.bootstrap).toMatchObject({ replications: 16, seed: 7 });
    // progress rises to 100
    for (let i = 1; i < pct.length; i++) expect(pct[i]).toBeGreaterThanOrEqual(pct[i - 1]);
    expect(pct.at(-1)).toBe(100);
  });

  it('runs the estimator audit beside the bootstrap with the same numbers as fitPanel', async () => {
    const both = { bootstrap: { replications: 8, seed: 7 }, audit: { replications: 6, seed: 9 } };
    const messages: string[] = [];
    const two = withoutTiming(await fitPanelParallel(panelA, both, { threads: 2, onProgress: (_, m) => void messages.push(m) }));
    expect(two).toEqual(fitPanel(panelA, both));
    expect(two.estimatorAudit!.replications).toBe(6);
    // one stage after the other, each named with its count
    expect(messages).toContain('Bootstrap 8 of 8');
    expect(messages).toContain('Bootstrap of jointDefault 8 of 8');
    expect(messages.at(-1)).toBe('Simulation study 6 of 6');
  });

  it('runs the moment bootstraps, the break test and the audit at the fitted persistence on the threads, as fitPanel does, and times each stage', async () => {
    const E = engine.panels.E;
    const panelE: PanelInput = { segment: 'Panel E', periods: E.obligors.map((_, t) => String(2001 + t)), obligors: E.obligors, defaults: E.defaults };
    const all = { bootstrap: { replications: 6, seed: 7 }, audit: { replications: 2, seed: 9 }, stability: { breakTest: { replications: 4, seed: 5 } } };
    const timed = await fitPanelParallel(panelE, all, { threads: 2 });
    const { timing } = timed;
    expect(withoutTiming(timed)).toEqual(fitPanel(panelE, all));
    expect(timed.stability!.breakTest).toMatchObject({ status: 'ok', replications: 4, seed: 5 });
    expect(timed.estimatorAudit!.truth.phi).toBe(timed.estimates.ar1Mle!.phi);
    // each estimator, each interval method, the diagnostics, the stability and each replication stage
    for (const stage of [
      'binomialMle',
      'binomialMle.profile',
      'binomialMle.wald',
      'binomialMle.bootstrap',
      'vasicekMle.chiSquare',
      'momentVariance.bootstrap',
      'momentVarianceCorrected.bootstrap',
      'momentVarianceAutocorrected.bootstrap',
      'jointDefault.bootstrap',
      'ar1Mle',
      'ar1Mle.profile',
      'diagnostics',
      'stability.jackknife',
      'stability.rolling',
      'stability.breakTest',
      'audit',
    ]) {
      expect(timing.stages[stage], stage).toBeGreaterThan(0);
    }
    // the stages run one after the other inside the segment's wall time
    const replicationStages = ['binomialMle.bootstrap', 'audit'].map((s) => timing.stages[s]);
    expect(replicationStages.reduce((a, b) => a + b)).toBeLessThan(timing.ms);
  });

  it('reuses a started pool across segments', async () => {
    const pool = new EnginePool(2);
    pools.push(pool);
    await pool.start();
    const first = withoutTiming(await fitPanelParallel(panelA, options, { pool }));
    const second = withoutTiming(await fitPanelParallel(panelA, { bootstrap: { replications: 6, seed: 8 } }, { pool }));
    expect(first).toEqual(fitPanel(panelA, options));
    expect(second.estimates.binomialMle.intervals.bootstrap!.seed).toBe(8);
    expect(pool.isClosed).toBe(false);
  });

  it('stops on abort with an AbortError and closes its threads', async () => {
    const controller = new AbortController();
    const pool = new EnginePool(2);
    pools.push(pool);
    const run = fitPanelParallel(panelA, { bootstrap: { replications: 400, seed: 1 } }, {
      pool,
      signal: controller.signal,
      onProgress: (p) => {
        if (p > 2) controller.abort();
      },
    });
    await expect(run).rejects.toMatchObject({ name: 'AbortError' });
    expect(pool.isClosed).toBe(true);
  });

  it('stops when onProgress throws (a cancelled job) and rejects with that error', async () => {
    const stop = new Error('job cancelled');
    const run = fitPanelParallel(panelA, { bootstrap: { replications: 400, seed: 1 } }, {
      threads: 2,
      onProgress: async (p) => {
        if (p > 2) throw stop;
      },
    });
    await expect(run).rejects.toBe(stop);
  });

  it('passes a worker RangeError back as a RangeError', async () => {
    const pool = new EnginePool(1);
    pools.push(pool);
    const bad = { kind: 'bootstrap' as const, spec: { obligors: [100], pd: 2, rho: 0.1, seed: 1 }, from: 0, to: 1 };
    await expect(pool.run([bad])).rejects.toThrow(RangeError);
    await expect(pool.run([bad])).rejects.toThrow(/closed/);
  });

  it('replaces a thread that died between runs', async () => {
    const pool = new EnginePool(1);
    pools.push(pool);
    await pool.start();
    const task = { kind: 'bootstrap' as const, spec: { obligors: A.obligors, pd: 0.0133, rho: 0.037, seed: 3 }, from: 0, to: 2 };
    const before = await pool.run([task]);
    // reach into the pool to kill its only thread, as an out-of-memory exit would
    const slots = (pool as unknown as { slots: { worker: { terminate(): Promise<number> } }[] }).slots;
    await slots[0].worker.terminate();
    await new Promise((r) => setTimeout(r, 50));
    expect(await pool.run([task])).toEqual(before);
  });

  it('refuses bad input before starting threads', async () => {
    await expect(fitPanelParallel({ ...panelA, defaults: [2000, ...A.defaults.slice(1)] }, options, { threads: 2 })).rejects.toThrow(
      /"Panel A", period 2001/,
    );
    expect(() => new EnginePool(0)).toThrow(RangeError);
  });
});

describe('factorCorrelationMatrixParallel', () => {
  it('gives the same matrix on 2 threads, in this thread and in factorCorrelationMatrix, each margin once per window', async () => {
    // the margins are shared by the pairs over one window (a 'margins' task each); the numbers
    // must not depend on where they were computed
    const years = ['2011', '2012', '2013', '2014', '2015', '2016'];
    const seg = (segment: string, obligors: number[], defaults: number[], periods = years) => ({ segment, periods, obligors, defaults });
    const inputs = [
      seg('A', [1000, 1100, 1050, 990, 1200, 1150], [6, 15, 4, 22, 9, 5]),
      seg('B', [2000, 2050, 1980, 2100, 2150, 2000], [52, 30, 25, 70, 22, 38]),
      seg('C', [900, 950, 940, 910, 930], [10, 4, 3, 19, 6], years.slice(1)),
    ];
    const serial = factorCorrelationMatrix(inputs, { level: 0.95 });
    const messages: string[] = [];
    const two = await factorCorrelationMatrixParallel(inputs, { level: 0.95 }, { threads: 2, onProgress: (_, m) => void messages.push(m) });
    const inThread = await factorCorrelationMatrixParallel(inputs, { level: 0.95 }, { threads: 0 });
    expect(two).toEqual(serial);
    expect(inThread).toEqual(serial);
    // A and B over 2011-2016; A, B and C over 2012-2016: five margins before the three pairs
    expect(messages).toContain('Factor correlations: the margins of 5 of 5 segment windows');
    expect(messages.at(-1)).toBe('Factor correlations: 3 of 3 pairs');
  });
});
