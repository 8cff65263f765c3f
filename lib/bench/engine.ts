/**
 * Estimation-engine benchmark (`npm run bench`), on the T = 20 panel with cohorts of 5,000-48,700
 * obligors that is also in the SciPy fixtures (panel E of tests/fixtures/engine/make_fixtures.py).
 * Prints the median wall time (and the median CPU time of the whole process, all threads) of:
 *
 * 1. each moment estimator and the closed form;
 * 2. binomialMle alone, and binomialMle with the profile and Wald intervals (target < 25 ms), and
 *    the same on a simulated T = 20 panel with 10^8 obligors a year;
 * 3. a parametric bootstrap of B = 1000 through lib/engine's worker threads (target < 3 s), and
 *    for comparison the same in this thread;
 * 4. an estimator audit of R = 200 (through the worker threads when lib/engine has an audit task,
 *    otherwise in this thread; the table says which);
 * 5. the SciPy reference (python3 tests/fixtures/engine/reference_mle.py: the same full MLE with the
 *    profile interval, its own timer around the computation only) on the same panel, with the
 *    speed ratio and the differences of the answers (target: >= 20 times faster, same answer);
 * 6. the models over time: ar1Mle with its profile interval of rho (target < 300 ms), the
 *    interval and profile of phi, the chi-square interval of vasicekMle, the moment estimators'
 *    bootstraps (B = 1000 each, this thread), the jackknife of all estimators (target < 500 ms) and
 *    the structural-break test with B = 200 on the worker threads (target < 10 s) and, for
 *    comparison, in this thread;
 * 7. a fit of the demo cohort dataset (lib/demo: 5 segments, 15-25 years) through the engine
 *    (lib/engine's fitPanelParallel on a started pool, as the fit job runs it) with every model,
 *    the bootstraps at B = 1000 and the estimator audit at R = 50 (the new-fit form's default),
 *    the break statistic without its bootstrap (the form's default), target < 30 s; then the
 *    same with the break test's bootstrap at B = 200 (the form's default when asked for). The
 *    slowest stages are printed.
 *
 * The coverage study of the AR(1) model's interval is a separate script (lib/bench/ar1-coverage.ts).
 *
 * Wall times depend on what else runs on the machine: the load average is printed beside them.
 * Options: --runs N (repetitions of the slow items, default 3), --threads N (default: available
 * parallelism), --no-scipy.
 */
import { spawnSync } from 'node:child_process';
import os from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import fixtures from '@/tests/fixtures/engine/engine-fixtures.json';
import { EnginePool, defaultThreads, splitRange, type EngineTask } from '@/lib/engine';
import { estimatorAudit, mergeAudit, type AuditReplication, type AuditSpec, type AuditSummary } from '@/lib/stats/audit';
import { binomialMle, binomialMleWithProfile } from '@/lib/stats/estimators/binomial-mle';
import { jointDefault } from '@/lib/stats/estimators/joint-default';
import { momentVariance } from '@/lib/stats/estimators/moment-variance';
import { momentVarianceCorrected } from '@/lib/stats/estimators/moment-variance-corrected';
import { vasicekMle } from '@/lib/stats/estimators/vasicek-mle';
import { parametricBootstrap, summariseBootstrap, type BootstrapReplication, type BootstrapSpec } from '@/lib/stats/intervals/bootstrap';
import { profileInterval } from '@/lib/stats/intervals/profile';
import { waldInterval } from '@/lib/stats/intervals/wald';
import { createRng, deriveSeed } from '@/lib/stats/random';
import { simulatePanel } from '@/lib/stats/simulate';
import { ar1Mle } from '@/lib/stats/estimators/ar1-mle';
import { momentVarianceAutocorrected } from '@/lib/stats/estimators/moment-variance-autocorrected';
import { ar1PhiInterval, ar1PhiProfileCurve, ar1ProfileInterval } from '@/lib/stats/intervals/ar1-intervals';
import { vasicekChiSquareInterval } from '@/lib/stats/intervals/chi-square';
import { momentBootstrap } from '@/lib/stats/intervals/moment-bootstrap';
import { MOMENT_ESTIMATOR_KEYS } from '@/lib/stats/estimators/moment-target';
import { breakTest, breakTestNullModel, summariseBreakTest, supLrStatistic } from '@/lib/stats/stability/break-test';
import { fitPanelParallel } from '@/lib/engine';
import { panelsFromRows } from '@/lib/cli/fit';
import { fenmoorCohortCsv } from '@/lib/demo';
import { validateCohortText } from '@/lib/ingest';
import type { FitModel } from '@/lib/stats/fit-models';
import { jackknife } from '@/lib/stats/stability/jackknife';
import { rollingWindow } from '@/lib/stats/stability/rolling-window';
import { arg, median, time, type Timing } from './timing';

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..');
const panel = { obligors: fixtures.panels.E.obligors, defaults: fixtures.panels.E.defaults };

const RUNS = Math.max(1, Number(arg('--runs', '3')));
const THREADS = Math.max(1, Number(arg('--threads', String(defaultThreads()))));




const fmt = (ms: number) => (ms < 1 ? `${(ms * 1000).toFixed(1)} us` : ms < 1000 ? `${ms.toFixed(2)} ms` : `${(ms / 1000).toFixed(2)} s`);
const rows: [string, string, string, string, string][] = [];
function row(name: string, t: Timing, note = ''): void {
  rows.push([name, fmt(t.wallMs), fmt(t.bestMs), fmt(t.cpuMs), note]);
}

function fullMle() {
  const { result, profile } = binomialMleWithProfile(panel);
  const p = profileInterval(profile!, result);
  const w = waldInterval(profile!, result);
  return { result, profile: p, wald: w, evaluations: profile!.likelihood.evaluations };
}

async function main(): Promise<void> {
  const load0 = os.loadavg();
  console.log(`Rhobook engine benchmark: T = ${panel.obligors.length}, cohorts ${Math.min(...panel.obligors)}-${Math.max(...panel.obligors)} (fixture panel E)`);
  console.log(`node ${process.version}, ${os.cpus().length} CPUs, load average ${load0.map((x) => x.toFixed(2)).join(' ')}\n`);

  for (const [name, fn] of [
    ['momentVariance', () => momentVariance(panel)],
    ['momentVarianceCorrected', () => momentVarianceCorrected(panel)],
    ['jointDefault', () => jointDefault(panel)],
    ['vasicekMle', () => vasicekMle(panel)],
  ] as const) {
    row(name, await time(fn, 201, 20));
  }
  row('binomialMle', await time(() => binomialMle(panel), 31, 3));
  const full = fullMle();
  const fullTiming = await time(fullMle, 31, 3);
  row('binomialMle + profile + Wald', fullTiming, `${full.evaluations} likelihood evaluations; target < 25 ms`);

  // A T = 20 panel with 10^8 obligors a year (simulated at p = 1%, rho = 0.12, seed 9): the fit
  // with its profile and Wald intervals, where the old mode search aborted at rho = 0.995.
  const huge = simulatePanel({ pd: 0.01, rho: 0.12, obligors: new Array(20).fill(1e8) }, createRng(deriveSeed(9, 1)));
  const hugePanel = { obligors: huge.obligors, defaults: huge.defaults };
  const hugeFit = () => {
    const { result, profile } = binomialMleWithProfile(hugePanel);
    if (!profile || result.status !== 'ok') throw new Error(`the n = 1e8 panel did not fit: ${result.status} ${result.reason ?? ''}`);
    return { result, profile: profileInterval(profile, result), wald: waldInterval(profile, result), evaluations: profile.likelihood.evaluations };
  };
  const hugeResult = hugeFit();
  row(
    'T = 20, n = 1e8 a year: MLE + profile + Wald',
    await time(hugeFit, 11, 1),
    `rho ${hugeResult.result.rho!.toFixed(4)} [${hugeResult.profile.lower.toFixed(4)}, ${hugeResult.profile.upper.toFixed(4)}], Wald ${hugeResult.wald ? 'yes' : 'none'}, ${hugeResult.evaluations} evaluations`,
  );

  const spec: BootstrapSpec = { obligors: panel.obligors, pd: full.result.pd!, rho: full.result.rho!, seed: 7 };
  const B = 1000;
  const pool = new EnginePool(THREADS);
  await pool.start();
  let threaded: ReturnType<typeof summariseBootstrap> | null = null;
  const tasks: EngineTask[] = splitRange(B, 25).map(({ from, to }) => ({ kind: 'bootstrap', spec, from, to }));
  const poolTiming = await time(
    async () => {
      const results = await pool.run(tasks);
      const reps: BootstrapReplication[] = results.flatMap((r) => (r.kind === 'bootstrap' ? r.replications : []));
      threaded = summariseBootstrap(reps, spec);
    },
    RUNS,
    0,
  );
  row(`bootstrap B = ${B}, ${THREADS} worker threads`, poolTiming, 'lib/engine pool (started beforehand); target < 3 s; CPU: whole process, all threads');
  let inProcess: ReturnType<typeof parametricBootstrap> | null = null;
  row(`bootstrap B = ${B}, this thread`, await time(() => (inProcess = parametricBootstrap(spec, B)), 1, 0), 'for comparison');
  const same = JSON.stringify(threaded) === JSON.stringify(inProcess);

  // The audit through the pool when lib/engine knows an 'audit' task (kind checked at run time, so
  // this file does not depend on that task type), otherwise in this thread.
  const auditSpec: AuditSpec = { ...spec, seed: 11 };
  let audit: AuditSummary | null = null;
  let auditNote = 'in this thread';
  const auditTasks = splitRange(200, 10).map(({ from, to }) => ({ kind: 'audit', spec: auditSpec, from, to }) as unknown as EngineTask);
  try {
    const probe = await pool.run(auditTasks.slice(0, 1));
    if ((probe[0] as { kind: string }).kind !== 'audit') throw new Error('no audit task');
    auditNote = `lib/engine pool, ${THREADS} worker threads`;
  } catch {
    auditNote = 'in this thread (lib/engine has no audit task)';
  }
  if (auditNote.startsWith('lib/engine')) {
    row('estimator audit R = 200', await time(async () => {
      const results = await pool.run(auditTasks);
      const parts = results.map((r) => (r as unknown as { replications: AuditReplication[] }).replications);
      audit = mergeAudit(parts, auditSpec);
    }, RUNS, 0), auditNote);
  } else {
    row('estimator audit R = 200', await time(() => (audit = estimatorAudit(auditSpec, 200), 0), RUNS, 0), auditNote);
  }
  await pool.close();

  // 6. Models over time, on the same panel.
  const ar1WithInterval = () => {
    const { result, profile } = ar1Mle(panel);
    const interval = ar1ProfileInterval(profile!, result);
    return { result, profile: profile!, interval };
  };
  const ar1 = ar1WithInterval();
  row('ar1Mle + profile interval of rho', await time(ar1WithInterval, RUNS * 3, 1), `${ar1.profile.likelihood.evaluations} likelihood evaluations; target < 300 ms`);
  let phiInterval: ReturnType<typeof ar1PhiInterval> | null = null;
  row('  + interval and profile of phi (20 points)', await time(() => {
    const { result, profile } = ar1Mle(panel);
    phiInterval = ar1PhiInterval(profile!, result);
    return ar1PhiProfileCurve(profile!, result, 20);
  }, RUNS, 1), 'ar1Mle included');
  row('vasicekMle chi-square interval', await time(() => vasicekChiSquareInterval(panel), 201, 20));
  row('momentVarianceAutocorrected', await time(() => momentVarianceAutocorrected(panel), 201, 20));
  for (const key of MOMENT_ESTIMATOR_KEYS) {
    const est = { momentVariance, momentVarianceCorrected, jointDefault, momentVarianceAutocorrected }[key](panel);
    if (est.rho === null || est.pd === null) continue;
    row(`bootstrap of ${key} B = 1000`, await time(() => momentBootstrap({ estimator: key, obligors: panel.obligors, pd: est.pd!, rho: est.rho!, seed: 7 }, 1000), RUNS, 0), 'this thread');
  }
  const labelled = { ...panel, periods: panel.obligors.map((_, t) => String(2001 + t)) };
  row('jackknife of all estimators', await time(() => jackknife(labelled), RUNS, 1), `${panel.obligors.length} x 5 leave-one-out fits; target < 500 ms`);
  row('rolling window (10 years) with profile intervals', await time(() => rollingWindow(labelled), RUNS, 1));
  let breakResult: ReturnType<typeof breakTest> | null = null;
  // The break test's bootstrap on the worker threads, as the engine runs it (tasks of 25 replications).
  const breakPool = new EnginePool(THREADS);
  await breakPool.start();
  const nullModel = breakTestNullModel(labelled);
  if ('status' in nullModel) throw new Error(`the break test has no null model on panel E: ${nullModel.reason}`);
  const breakSpec = { obligors: panel.obligors, pd: nullModel.pd, rho: nullModel.rho, seed: 9 };
  const breakTasks: EngineTask[] = splitRange(200, 25).map(({ from, to }) => ({ kind: 'break-test', spec: breakSpec, from, to }));
  let threadedBreak: ReturnType<typeof summariseBreakTest> | null = null;
  row(`break test B = 200, ${THREADS} worker threads`, await time(async () => {
    const results = await breakPool.run(breakTasks);
    const reps = results.flatMap((r) => (r.kind === 'break-test' ? r.replications : []));
    threadedBreak = summariseBreakTest(labelled, supLrStatistic(panel), reps);
  }, RUNS, 0), 'lib/engine pool (started beforehand), the observed statistic included; target < 10 s');
  await breakPool.close();
  row('break test B = 200, this thread', await time(() => (breakResult = breakTest(labelled, { replications: 200, seed: 9 })), 1, 0), 'for comparison');
  const breakSame = JSON.stringify(threadedBreak) === JSON.stringify(breakResult);

  // 7. The demo cohort dataset through the engine, every model, as a fit job runs it.
  const demo = panelsFromRows(validateCohortText(fenmoorCohortCsv()).rows, {});
  const demoLabel = `demo cohort dataset (${demo.length} segments, T ${Math.min(...demo.map((d) => d.periods.length))}-${Math.max(...demo.map((d) => d.periods.length))}), every model`;
  const stageTotals: Record<string, number> = {};
  for (const breakReplications of [0, 200]) {
    const demoOptions = {
      models: ['independent', 'ar1'] as FitModel[],
      bootstrap: { replications: 1000, seed: 20260101 },
      stability: { rollingWindow: 10, breakTest: breakReplications > 0 ? { replications: breakReplications, seed: 20260103 } : null },
      audit: { replications: 50, seed: 20260102 },
    };
    const demoPool = new EnginePool(THREADS);
    await demoPool.start();
    const demoTiming = await time(async () => {
      for (const k of Object.keys(stageTotals)) delete stageTotals[k];
      for (const p of demo) {
        const fit = await fitPanelParallel(p, demoOptions, { pool: demoPool });
        for (const [k, ms] of Object.entries(fit.timing.stages)) stageTotals[k] = (stageTotals[k] ?? 0) + ms;
      }
    }, 1, 0);
    await demoPool.close();
    row(
      breakReplications > 0 ? `  + the break test's bootstrap B = ${breakReplications}` : demoLabel,
      demoTiming,
      breakReplications > 0
        ? 'the same fit with the break test\'s p-value'
        : `bootstraps B = 1000, audit R = 50 at the fitted phi, break statistic; ${THREADS} worker threads; target < 30 s`,
    );
  }

  let scipyLine = 'SciPy reference skipped (--no-scipy)';
  let agreement = '';
  if (!process.argv.includes('--no-scipy')) {
    const script = path.join(ROOT, 'tests/fixtures/engine/reference_mle.py');
    const secs: number[] = [];
    let ref: { rho: number; pd: number; logLik: number; profile: { lower: number; upper: number }; scipy: string } | null = null;
    for (let i = 0; i < RUNS; i++) {
      const out = spawnSync('python3', [script, JSON.stringify({ ...panel, level: 0.95 })], { encoding: 'utf8' });
      if (out.status !== 0) throw new Error(`reference_mle.py failed: ${out.stderr}`);
      const parsed = JSON.parse(out.stdout);
      secs.push(parsed.seconds);
      ref = parsed;
    }
    const scipyMs = median(secs) * 1000;
    rows.push([`SciPy ${ref!.scipy} reference (MLE + profile)`, fmt(scipyMs), fmt(Math.min(...secs) * 1000), '', 'its own timer, computation only']);
    scipyLine = `speed ratio SciPy / Rhobook (MLE + profile + Wald, medians): ${(scipyMs / fullTiming.wallMs).toFixed(1)}x (target >= 20x)`;
    const r = full.result;
    agreement = [
      `agreement with SciPy: |d rho| = ${Math.abs(r.rho! - ref!.rho).toExponential(1)}`,
      `|d pd| = ${Math.abs(r.pd! - ref!.pd).toExponential(1)}`,
      `|d logLik| = ${Math.abs(r.logLik! - ref!.logLik).toExponential(1)}`,
      `|d lower| = ${Math.abs(full.profile.lower - ref!.profile.lower).toExponential(1)}`,
      `|d upper| = ${Math.abs(full.profile.upper - ref!.profile.upper).toExponential(1)}`,
    ].join(', ');
  }

  const header: [string, string, string, string, string] = ['item', 'median', 'best', 'median CPU', 'note'];
  const widths = header.map((h, i) => Math.max(h.length, ...rows.map((r) => r[i].length)));
  const line = (r: string[]) => r.map((c, i) => (i === 0 || i === 4 ? c.padEnd(widths[i]) : c.padStart(widths[i]))).join('  ');
  console.log(line(header));
  for (const r of rows) console.log(line(r));
  const b = threaded as ReturnType<typeof summariseBootstrap> | null;
  const a = audit as AuditSummary | null;
  console.log(`\nestimate: rho = ${full.result.rho!.toFixed(6)}, pd = ${full.result.pd!.toFixed(6)}, logLik = ${full.result.logLik!.toFixed(6)}`);
  console.log(`profile 95%: [${full.profile.lower.toFixed(6)}, ${full.profile.upper.toFixed(6)}]; Wald 95%: [${full.wald!.lower.toFixed(6)}, ${full.wald!.upper.toFixed(6)}], se ${full.wald!.se.toFixed(6)}`);
  if (b) console.log(`bootstrap 95%: [${b.lower.toFixed(6)}, ${b.upper.toFixed(6)}], bias ${b.bias.toFixed(6)}, failed ${b.failed}; threads and this thread give the same result: ${same}`);
  if (a) {
    console.log(
      `audit: binomialMle bias ${a.estimators.binomialMle.bias!.toFixed(5)} (mcse ${a.estimators.binomialMle.biasMcse!.toFixed(5)}), RMSE ${a.estimators.binomialMle.rmse!.toFixed(5)}; ` +
        `profile coverage ${a.coverage.profile.coverage!.toFixed(3)}, Wald ${a.coverage.wald.coverage!.toFixed(3)} (mcse ${a.coverage.profile.mcse!.toFixed(3)})`,
    );
  }
  const ar1r = ar1.result;
  console.log(
    `ar1Mle: rho = ${ar1r.rho!.toFixed(6)}, pd = ${ar1r.pd!.toFixed(6)}, phi = ${ar1r.phi!.toFixed(4)}, logLik = ${ar1r.logLik!.toFixed(6)} ` +
      `(independent ${ar1r.logLikIndependent!.toFixed(6)}); profile 95% of rho [${ar1.interval.lower.toFixed(6)}, ${ar1.interval.upper.toFixed(6)}]` +
      (phiInterval ? `; phi 95% [${(phiInterval as { lower: number }).lower.toFixed(4)}, ${(phiInterval as { upper: number }).upper.toFixed(4)}]` : ''),
  );
  const bt = breakResult as ReturnType<typeof breakTest> | null;
  if (bt && bt.status === 'ok') console.log(`break test: sup LR ${bt.statistic.toFixed(3)} at ${bt.splitYear}, p = ${bt.pValue.toFixed(4)} (B = ${bt.replications}); threads and this thread give the same result: ${breakSame}`);
  const slowest = Object.entries(stageTotals).sort((a, b) => b[1] - a[1]).slice(0, 8);
  console.log(`demo dataset with the break test's bootstrap, slowest stages summed over the segments: ${slowest.map(([k, ms]) => `${k} ${fmt(ms)}`).join(', ')}`);
  console.log(scipyLine);
  if (agreement) console.log(agreement);
  console.log(`load average at the end: ${os.loadavg().map((x) => x.toFixed(2)).join(' ')}`);
}

main().catch((err) => {
  console.error(err instanceof Error ? err.message : err);
  process.exit(1);
});
