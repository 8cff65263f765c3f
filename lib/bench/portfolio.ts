/**
 * Portfolio benchmark (second part of `npm run bench`): the grade model, the factor correlation
 * between segments and the grid posterior, on seeded simulated data. Prints the median wall time
 * of each item with its target:
 *
 * 1. the grade model with 8 grades, T = 20 (cohorts 2,000-5,500): common rho with its profile
 *    interval (target < 300 ms), the full group block with the grade-specific model and the LR
 *    test, and with the PD profile intervals of all grades;
 * 2. the factor correlation of one pair, T = 20 (cohorts 5,000 and 20,000), with its interval
 *    (target < 200 ms), and a 10-segment matrix (45 pairs) on the worker threads (target < 10 s);
 * 3. the grid posterior of rho and p on a low-default panel, T = 20 (target < 100 ms).
 *
 * Beside the median wall time of each item are the best wall time and the CPU time of the process
 * (all threads): on a shared machine the wall time grows with the load average, the CPU time does
 * not (the targets are wall times on a quiet machine).
 *
 * Options: --runs N (repetitions, default 3), --threads N (default: available parallelism).
 */
import os from 'node:os';
import { EnginePool, defaultThreads, factorCorrelationMatrixParallel } from '@/lib/engine';
import { fitGrades, type GradeInput } from '@/lib/stats/grade-fit';
import { CommonRhoGradeModel } from '@/lib/stats/grade-model';
import { factorCorrelation } from '@/lib/stats/factor-correlation';
import { createRng } from '@/lib/stats/random';
import { rhoPosterior } from '@/lib/stats/rho-posterior';
import { conditionalPd } from '@/lib/stats/vasicek';
import { arg, time, type Timing } from './timing';

const RUNS = Math.max(1, Number(arg('--runs', '3')));
const THREADS = Math.max(1, Number(arg('--threads', String(defaultThreads()))));




const years = Array.from({ length: 20 }, (_, t) => String(2005 + t));

/** Segments sharing one factor per year (grades), seeded. */
function gradeGroup(): GradeInput[] {
  const rng = createRng(8020);
  const pds = [0.002, 0.004, 0.007, 0.012, 0.02, 0.035, 0.06, 0.1];
  const out = pds.map((_, g) => ({ segment: `grade ${g + 1}`, periods: years, obligors: [] as number[], defaults: [] as number[] }));
  for (let t = 0; t < 20; t++) {
    const x = rng.normal();
    pds.forEach((p, g) => {
      const n = 2000 + 500 * g;
      out[g].obligors.push(n);
      out[g].defaults.push(rng.binomial(n, conditionalPd(p, 0.12, x)));
    });
  }
  return out;
}

/** Ten segments whose factors are equicorrelated at 0.5, seeded. */
function segments(count: number): GradeInput[] {
  const rng = createRng(1010);
  const out = Array.from({ length: count }, (_, i) => ({ segment: `segment ${i + 1}`, periods: years, obligors: [] as number[], defaults: [] as number[] }));
  for (let t = 0; t < 20; t++) {
    const y = rng.normal();
    out.forEach((s, i) => {
      const z = Math.SQRT1_2 * y + Math.SQRT1_2 * rng.normal();
      const n = 5000 + 1500 * i;
      s.obligors.push(n);
      s.defaults.push(rng.binomial(n, conditionalPd(0.005 + 0.002 * i, 0.08 + 0.01 * i, z)));
    });
  }
  return out;
}

function row(name: string, t: Timing, target: number | null): void {
  const ms = t.wallMs;
  const verdict = target === null ? '' : ms < target ? `  target < ${target} ms: met` : `  target < ${target} ms: NOT met`;
  console.log(`${name.padEnd(58)} ${ms.toFixed(1).padStart(9)} ${t.bestMs.toFixed(1).padStart(9)} ${t.cpuMs.toFixed(1).padStart(9)}${verdict}`);
}

async function main(): Promise<void> {
  console.log(`\nRhobook portfolio benchmark: node ${process.version}, ${os.cpus().length} CPUs, load average ${os.loadavg().map((x) => x.toFixed(2)).join(' ')}`);
  console.log(`${'item'.padEnd(58)} ${'wall ms'.padStart(9)} ${'best ms'.padStart(9)} ${'CPU ms'.padStart(9)}  (wall: median of the runs; CPU: all threads)`);
  const group = gradeGroup();
  const panels = group.map((g) => ({ obligors: g.obligors, defaults: g.defaults }));
  row('grades: 8 grades, T = 20, common rho with profile interval', await time(() => {
    const m = new CommonRhoGradeModel(panels);
    m.rhoInterval(m.maximise(), 0.95);
  }, RUNS), 300);
  row('grades: group block without PD intervals (+ grade-specific, LR)', await time(() => fitGrades(group, { pdIntervals: false }), RUNS), null);
  row('grades: group block with the 8 PD profile intervals', await time(() => fitGrades(group), 1), null);

  const segs = segments(10);
  row('pairs: one pair, T = 20, r with its interval', await time(() => factorCorrelation(segs[0], segs[3]), RUNS), 200);
  const pool = new EnginePool(THREADS);
  await pool.start();
  let matrixDone: Awaited<ReturnType<typeof factorCorrelationMatrixParallel>> | null = null;
  row(`pairs: 10 segments, 45 pairs on ${THREADS} worker threads`, await time(async () => {
    matrixDone = await factorCorrelationMatrixParallel(segs, { level: 0.95 }, { pool });
  }, 1, 0), 10_000);
  await pool.close();

  const low = { obligors: Array(20).fill(800), defaults: [0, 1, 0, 0, 2, 0, 0, 1, 0, 0, 3, 0, 0, 0, 1, 0, 0, 0, 2, 0] };
  row('posterior: grid posterior of rho and p, T = 20, 11 defaults', await time(() => rhoPosterior(low, { prior: { a: 1, b: 1, label: 'flat' } }), RUNS), 100);

  const fit = fitGrades(group, { pdIntervals: false });
  console.log(`\ngrades: common rho ${fit.commonRho!.rho.toFixed(4)} [${fit.commonRho!.interval.lower.toFixed(4)}, ${fit.commonRho!.interval.upper.toFixed(4)}], LR ${fit.lrTest!.statistic.toFixed(3)} (df ${fit.lrTest!.df}, p ${fit.lrTest!.pValue.toFixed(3)}); simulated at rho 0.12`);
  const m = matrixDone as unknown as Awaited<ReturnType<typeof factorCorrelationMatrixParallel>> | null;
  if (m) {
    const rs = m.entries.map((e) => e.r).filter((r): r is number => r !== null);
    console.log(`pairs: 45 factor correlations, mean ${(rs.reduce((s, v) => s + v, 0) / rs.length).toFixed(3)} (simulated at 0.5); ${m.nearestNote}`);
  }
  console.log(`load average at the end: ${os.loadavg().map((x) => x.toFixed(2)).join(' ')}`);
}

main().catch((err) => {
  console.error(err);
  process.exitCode = 1;
});
