/**
 * Ingest benchmark (`npm run bench:ingest`): a 1,000,000-loan tape of the demo lender is written to
 * a temporary file, then measured in separate child processes so that each peak memory figure is
 * its own:
 *
 * 1. papaparse alone, streaming the file with a chunk callback that only counts rows (the floor);
 * 2. validateLoanTapeStream: decoding, every row validated, duplicate ids, aggregation to cohorts.
 *
 * Each is run --runs times; the median and best wall time, the median CPU time and the peak RSS
 * (process.resourceUsage().maxRSS) are printed. Target for step 2: < 2 s and < 400 MB.
 * Options: --loans N (default 1000000), --runs N (default 3), --keep (keep the temp file).
 */
import { fork } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import Papa from 'papaparse';
import { createRng } from '@/lib/stats/random';
import { generateLoanTape } from '@/lib/demo/loan-tape';
import { DEMO_SEED } from '@/lib/demo/fenmoor';
import { validateLoanTapeStream } from '@/lib/ingest/loan-tape';
import { arg } from './timing';

type Phase = 'papaparse' | 'validate';
interface Measure {
  ms: number;
  /** user + system CPU time of the phase (less sensitive to other load on the machine) */
  cpuMs: number;
  maxRssMb: number;
  rows: number;
  detail?: string;
}


async function runPhase(phase: Phase, file: string): Promise<Measure> {
  const t0 = performance.now();
  const c0 = process.cpuUsage();
  let rows = 0;
  let detail: string | undefined;
  if (phase === 'papaparse') {
    await new Promise<void>((resolve, reject) => {
      Papa.parse<string[]>(fs.createReadStream(file, { encoding: 'utf8' }) as unknown as File, {
        chunk: (r) => {
          rows += r.data.length;
        },
        complete: () => resolve(),
        error: (e: Error) => reject(e),
      });
    });
  } else {
    const r = await validateLoanTapeStream(fs.createReadStream(file));
    rows = r.counts.rows;
    detail = `ok=${r.ok} loans=${r.counts.loans} defaults=${r.counts.defaults} exits=${r.counts.exits} cohorts=${r.cohortRows.length} errors=${r.summary.errors} warnings=${r.summary.warnings}`;
  }
  const ms = performance.now() - t0;
  const cpu = process.cpuUsage(c0);
  return { ms, cpuMs: (cpu.user + cpu.system) / 1000, maxRssMb: process.resourceUsage().maxRSS / 1024, rows, detail };
}

function child(phase: Phase, file: string): Promise<Measure> {
  return new Promise((resolve, reject) => {
    const p = fork(fileURLToPath(import.meta.url), ['--phase', phase, '--file', file], { stdio: ['ignore', 'inherit', 'inherit', 'ipc'] });
    p.on('message', (m) => resolve(m as Measure));
    p.on('error', reject);
    p.on('exit', (code) => {
      if (code !== 0) reject(new Error(`${phase} child exited with ${code}`));
    });
  });
}

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)];
}

async function main(): Promise<void> {
  const phase = arg('--phase', '');
  if (phase) {
    const m = await runPhase(phase as Phase, arg('--file', ''));
    process.send!(m);
    return;
  }
  const loans = Number(arg('--loans', '1000000'));
  const runs = Number(arg('--runs', '3'));
  const file = path.join(os.tmpdir(), `rhobook-bench-tape-${process.pid}.csv`);
  const g0 = performance.now();
  const fd = fs.openSync(file, 'w');
  for (const chunk of generateLoanTape(createRng(DEMO_SEED), { loans })) fs.writeSync(fd, chunk);
  fs.closeSync(fd);
  const size = fs.statSync(file).size;
  console.log(`tape: ${loans.toLocaleString('en')} loans, ${(size / 1e6).toFixed(1)} MB, generated in ${((performance.now() - g0) / 1000).toFixed(1)} s (${file})`);
  console.log(`machine: ${os.cpus()[0]?.model ?? 'unknown'} x ${os.cpus().length}, node ${process.version}`);
  try {
    for (const p of ['papaparse', 'validate'] as Phase[]) {
      const ms: number[] = [];
      const cpu: number[] = [];
      const rss: number[] = [];
      let last: Measure | null = null;
      for (let i = 0; i < runs; i++) {
        last = await child(p, file);
        ms.push(last.ms);
        cpu.push(last.cpuMs);
        rss.push(last.maxRssMb);
      }
      const label = p === 'papaparse' ? 'papaparse alone (floor)' : 'validate + aggregate   ';
      console.log(
        `${label}: median ${(median(ms) / 1000).toFixed(2)} s, best ${(Math.min(...ms) / 1000).toFixed(2)} s, CPU median ${(median(cpu) / 1000).toFixed(2)} s, peak RSS ${Math.max(...rss).toFixed(0)} MB, rows ${last!.rows.toLocaleString('en')}${last!.detail ? ` (${last!.detail})` : ''}`,
      );
    }
    console.log(`target for validate + aggregate: < 2 s and < 400 MB (load average now ${os.loadavg()[0].toFixed(1)} on ${os.cpus().length} CPUs)`);
  } finally {
    if (!process.argv.includes('--keep')) fs.rmSync(file, { force: true });
  }
}

await main();
