/**
 * Coverage study of the persistent-factor model (`npm run bench:ar1-coverage`): R panels simulated
 * with an AR(1) factor at p = 1%, rho = 0.12, n = 1000, T = 20, phi = 0.6 (the design of the persistent
 * model's coverage goal), each fitted by ar1Mle with its profile interval of rho and by the independent-factor
 * model (binomialMle with its profile and Wald intervals), through the estimator audit
 * (lib/stats/audit.ts, `persistent`) on lib/engine's worker threads. Prints the coverage of each
 * interval with its Monte Carlo standard error, the mean widths, the bias of each estimator and
 * of phi-hat, and the wall time.
 *
 * Options: --replications R (default 500), --seed S (default 2026), --threads N, --phi, --rho,
 * --pd, --n, --T (defaults as above), --level (default 0.95).
 */
import os from 'node:os';
import { EnginePool, defaultThreads, splitRange, type EngineTask } from '@/lib/engine';
import { mergeAudit, type AuditReplication, type AuditSpec, type CoverageAudit, type EstimatorAudit } from '@/lib/stats/audit';
import { arg } from './timing';


const R = Number(arg('--replications', '500'));
const THREADS = Math.max(1, Number(arg('--threads', String(defaultThreads()))));
const spec: AuditSpec = {
  obligors: new Array(Number(arg('--T', '20'))).fill(Number(arg('--n', '1000'))),
  pd: Number(arg('--pd', '0.01')),
  rho: Number(arg('--rho', '0.12')),
  phi: Number(arg('--phi', '0.6')),
  seed: Number(arg('--seed', '2026')),
  level: Number(arg('--level', '0.95')),
  persistent: true,
};

const pct = (x: number | null) => (x === null ? 'n/a' : `${(100 * x).toFixed(1)}%`);
function coverageLine(name: string, c: CoverageAudit): string {
  return `${name.padEnd(44)} ${pct(c.coverage).padStart(6)} +- ${pct(c.mcse)}  (${c.covered}/${c.available + c.missing}${c.missing > 0 ? `, no interval in ${c.missing}, counted as misses` : ''}), mean width ${c.meanWidth?.toFixed(4) ?? 'n/a'}`;
}
function biasLine(name: string, e: EstimatorAudit, truth: number): string {
  return `${name.padEnd(44)} mean ${e.mean?.toFixed(4) ?? 'n/a'} (truth ${truth}), bias ${e.bias?.toFixed(4) ?? 'n/a'} +- ${e.biasMcse?.toFixed(4) ?? 'n/a'}, RMSE ${e.rmse?.toFixed(4) ?? 'n/a'}, defined ${e.defined}`;
}

async function main(): Promise<void> {
  console.log(
    `AR(1) coverage study: R = ${R}, p = ${spec.pd}, rho = ${spec.rho}, phi = ${spec.phi}, n = ${spec.obligors[0]}, T = ${spec.obligors.length}, level ${spec.level}, seed ${spec.seed}`,
  );
  console.log(`node ${process.version}, ${os.cpus().length} CPUs, ${THREADS} worker threads, load average ${os.loadavg().map((x) => x.toFixed(2)).join(' ')}\n`);
  const pool = new EnginePool(THREADS);
  await pool.start();
  const t0 = performance.now();
  const tasks = splitRange(R, 5).map(({ from, to }) => ({ kind: 'audit', spec, from, to }) as unknown as EngineTask);
  const results = await pool.run(tasks);
  await pool.close();
  const seconds = (performance.now() - t0) / 1000;
  const audit = mergeAudit(
    results.map((r) => (r as unknown as { replications: AuditReplication[] }).replications),
    spec,
  );
  const p = audit.persistent!;
  console.log(coverageLine('ar1Mle profile interval of rho', p.ar1Profile));
  console.log(coverageLine('independent model: binomialMle profile', audit.coverage.profile));
  console.log(coverageLine('independent model: binomialMle Wald (logit)', audit.coverage.wald));
  console.log('');
  console.log(biasLine('ar1Mle rho', p.ar1Mle, spec.rho));
  console.log(biasLine('ar1Mle phi', p.phi, spec.phi!));
  console.log(biasLine('binomialMle rho', audit.estimators.binomialMle, spec.rho));
  console.log(biasLine('momentVariance rho', audit.estimators.momentVariance, spec.rho));
  console.log(biasLine('momentVarianceAutocorrected rho', p.momentVarianceAutocorrected, spec.rho));
  console.log(`\nar1Mle statuses: ${JSON.stringify(p.ar1Mle.statusCounts)}`);
  console.log(`wall time ${seconds.toFixed(1)} s; load average at the end ${os.loadavg().map((x) => x.toFixed(2)).join(' ')}`);
}

main().catch((err) => {
  console.error(err instanceof Error ? err.message : err);
  process.exit(1);
});
