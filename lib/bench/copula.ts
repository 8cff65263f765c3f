/**
 * Mixing-law benchmark (third part of `npm run bench`): the challenge of the Gaussian copula on
 * seeded simulated panels, T = 20, cohorts 50,000. Prints the median wall time of each item with
 * its target:
 *
 * 1. the t copula by maximum likelihood with the profile intervals of rho and nu (target < 1 s),
 *    and without the intervals;
 * 2. beta and logit-normal mixing by maximum likelihood (target < 50 ms each), and with the
 *    profile interval of their equivalent rho;
 * 3. one replication of the bootstrap test and of the power study (this thread), then the real
 *    figure: the bootstrap test with B = 200 and the power study with R = 200 on a started pool of
 *    worker threads, as the fit job runs them (lib/engine's fitPanelParallel with the t copula, the
 *    stages `modelComparison.lrTest` and `modelComparison.power`); target < 60 s together. It
 *    prints the wall time of each stage, the CPU time of the process's threads meanwhile, and the
 *    test's numbers (statistic, bootstrap p-value, critical value, power), so that a change of
 *    speed that changes them shows.
 *
 * Options: --runs N (repetitions, default 3); --copula-b B and --copula-r R (default 200 each; 0
 * skips the pool run); --threads N (worker threads, default the fit job's: the cores, at most 2).
 */
import { availableParallelism } from 'node:os';
import { EnginePool, fitPanelParallel } from '@/lib/engine';
import { betaMixingMle } from '@/lib/stats/estimators/beta-mixing-mle';
import { logitNormalMle } from '@/lib/stats/estimators/logit-normal-mle';
import { tCopulaMle } from '@/lib/stats/estimators/t-copula-mle';
import { copulaBootstrapRange, copulaPowerRange } from '@/lib/stats/copula-lr-test';
import { createRng } from '@/lib/stats/random';
import { simulatePanel } from '@/lib/stats/simulate';
import { simulateTCopulaPanel } from '@/lib/stats/simulate-t-copula';
import { arg, median } from './timing';

const RUNS = Math.max(1, Number(arg('--runs', '3')));
const B = Math.max(0, Number(arg('--copula-b', '200')));
const R = Math.max(0, Number(arg('--copula-r', '200')));
const THREADS = Math.max(1, Number(arg('--threads', String(Math.min(2, availableParallelism())))));

function time(fn: () => unknown, runs: number): { median: number; cpu: number } {
  const xs: number[] = [];
  const cpu0 = process.cpuUsage();
  for (let i = 0; i < runs; i++) {
    const t0 = performance.now();
    fn();
    xs.push(performance.now() - t0);
  }
  const cpu = process.cpuUsage(cpu0);
  return { median: median(xs), cpu: (cpu.user + cpu.system) / 1000 / runs };
}

const line = (label: string, t: { median: number; cpu?: number }, target: string) =>
  console.log(`${label.padEnd(62)} ${t.median.toFixed(0).padStart(7)} ms${t.cpu === undefined ? '' : ` (CPU ${t.cpu.toFixed(0)} ms)`}  ${target}`);

const obligors = Array.from({ length: 20 }, () => 50000);
const gaussian = simulatePanel({ pd: 0.01, rho: 0.08, obligors }, createRng(1801));
const fat = simulateTCopulaPanel({ pd: 0.01, rho: 0.05, nu: 5, obligors }, createRng(1802));

console.log(`Mixing laws, T = 20, cohorts 50,000 (median of ${RUNS} runs, a fresh evaluator each run)`);
line('t copula MLE + profile intervals of rho and nu (Gaussian panel)', time(() => tCopulaMle(gaussian), RUNS), 'target < 1000 ms');
line('t copula MLE + profile intervals of rho and nu (t panel, nu = 5)', time(() => tCopulaMle(fat), RUNS), 'target < 1000 ms');
line('t copula MLE without intervals (t panel)', time(() => tCopulaMle(fat, { intervals: false }), RUNS), '');
line('beta mixing MLE (no interval)', time(() => betaMixingMle(fat, { intervals: false }), RUNS), 'target < 50 ms');
line('beta mixing MLE + profile interval of the equivalent rho', time(() => betaMixingMle(fat), RUNS), '');
line('logit-normal MLE (no interval)', time(() => logitNormalMle(fat, { intervals: false }), RUNS), 'target < 50 ms');
line('logit-normal MLE + profile interval of the equivalent rho', time(() => logitNormalMle(fat), RUNS), '');
const spec = { obligors, pd: 0.01, rho: 0.08, seed: 7 };
line('one bootstrap replication of the LR test (this thread)', time(() => copulaBootstrapRange(spec, 0, 1), RUNS), 'B = 200 + R = 200: target < 60 s on the threads');
line('one power replication (t, nu = 5; this thread)', time(() => copulaPowerRange({ ...spec, nu: 5 }, 0, 1), RUNS), '');

/** B bootstrap and R power replications of the Gaussian panel's test on a started pool, as the fit job runs them. */
async function onThreads(): Promise<void> {
  const pool = new EnginePool(THREADS);
  await pool.start();
  try {
    const c0 = process.cpuUsage();
    const fit = await fitPanelParallel(
      { segment: 'bench', periods: obligors.map((_, t) => String(2001 + t)), obligors, defaults: gaussian.defaults },
      { models: ['independent'], stability: null, mixingLaws: { models: ['t'], replications: B, powerReplications: R, seed: 7 } },
      { pool },
    );
    const c = process.cpuUsage(c0);
    const stages = fit.timing.stages;
    const boot = stages['modelComparison.lrTest'] ?? 0;
    const power = stages['modelComparison.power'] ?? 0;
    const cpu = (c.user + c.system) / 1000;
    const test = fit.modelComparison?.lrTestGaussianVsT;
    const pw = fit.modelComparison?.power;
    console.log(`LR test bootstrap B = ${B} + power study R = ${R} on ${THREADS} worker threads (the fit job's stages, Gaussian panel):`);
    line(`  bootstrap stage (modelComparison.lrTest)`, { median: boot }, '');
    line(`  power stage (modelComparison.power)`, { median: power }, '');
    line(`  together (CPU: every thread of the process, the whole fit)`, { median: boot + power, cpu }, 'target < 60000 ms');
    if (test) {
      console.log(
        `  statistic ${test.statistic.toFixed(6)}, bootstrap p ${test.pValue}, critical value ${test.criticalValue?.toFixed(6)}, failed ${test.failed}; power ${pw ? `${pw.rejectRate} at nu = ${pw.nu.toPrecision(4)} (failed ${pw.failed})` : 'none'}`,
      );
    }
  } finally {
    await pool.close();
  }
}

if (B > 0) await onThreads();
