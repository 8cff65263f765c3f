/**
 * Pair explorer benchmark (fourth part of `npm run bench`): what one change of an input costs in
 * the browser with the Student t copula chosen, i.e. pairTMetrics at the inputs plus the t joint
 * default at the seven reference correlations of "the same pair at other correlations", over a
 * grid that spans the explorer's whole range (PDs 0.0001% to 99.9%, rho 0 to 0.999, nu 2.01 to
 * 1000). Prints the median and the slowest change; the target is < 100 ms per change (interactive).
 * V8 runs the same code in Node and in chromium, so the figures carry over up to the machine.
 */
import { pairTMetrics } from '@/lib/fits/pair-t';
import { median } from './timing';

const REFERENCE_RHOS = [0, 0.04, 0.12, 0.15, 0.24, 0.3, 0.5];
const pds = [1e-6, 1e-4, 0.01, 0.05, 0.3, 0.999];
const rhos = [0, 0.12, 0.3, 0.7, 0.999];
const nus = [2.01, 3, 4, 10, 100, 1000];

const times: number[] = [];
let slowest = { ms: 0, at: '' };
for (const p1 of pds)
  for (const p2 of [p1, 0.02])
    for (const rho of rhos)
      for (const nu of nus) {
        const t0 = performance.now();
        pairTMetrics(p1, p2, rho, nu);
        for (const r of REFERENCE_RHOS) pairTMetrics(p1, p2, r, nu);
        const ms = performance.now() - t0;
        times.push(ms);
        if (ms > slowest.ms) slowest = { ms, at: `p1 ${p1}, p2 ${p2}, rho ${rho}, nu ${nu}` };
      }

console.log(`Pair explorer, t copula: one change (the inputs and 7 reference correlations), ${times.length} points of the input range`);
console.log(`${'median change'.padEnd(62)} ${median(times).toFixed(1).padStart(7)} ms  target < 100 ms`);
console.log(`${'slowest change'.padEnd(62)} ${slowest.ms.toFixed(1).padStart(7)} ms  (${slowest.at})`);
