/**
 * Upload benchmark (`npm run bench:upload`): the worst files an upload can bring, through the real
 * upload path without the database (lib/http/multipart.ts receiving a streamed multipart request
 * into its temporary file, then lib/ingest/upload.ts validating it), each case in a child process
 * of its own so that each peak memory figure is its own:
 *
 * 1. a 90 MB cohort file whose line breaks were lost after the header (its rows glued into one
 *    line): refused at the line limit;
 * 2. a 95 MB header of 50 million columns (a cohort upload): refused at the column limit;
 * 3. a normal 100 MB loan tape (1.95 million loans, about 100 MB): received and header-checked as at upload;
 * 4. the same tape converted as the convert-loans job does (every row validated and aggregated),
 *    read back from its compressed copy.
 *
 * Printed per case: the outcome (status, rule and line), wall time, CPU time (user + system, less
 * sensitive to other load) and peak RSS (process.resourceUsage().maxRSS) beside the RSS of the
 * child before the case (Node, tsx and the modules). The request bodies are generated while they
 * are sent, so the figures are the upload path's, not the generator's.
 *
 * Options: --only NAME (single-line, wide-header, tape-upload, tape-convert), --mb N (scale the
 * worst cases to N MB), --no-limits (line and column limits off: what they prevent; use a small
 * --mb, the cost grows with the square of the line), --keep (keep the generated tape).
 */
import { fork } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { DEMO_SEED } from '@/lib/demo/fenmoor';
import { generateLoanTape } from '@/lib/demo/loan-tape';
import { withReceivedUpload } from '@/lib/http/multipart';
import type { ReadOptions } from '@/lib/ingest/csv-reader';
import { gunzipSource } from '@/lib/ingest/gzip';
import { DEFAULT_MAX_COLUMNS, DEFAULT_MAX_LINE_CHARS } from '@/lib/ingest/limits';
import { checkLoanTapeHeader, convertLoanTape, validateCohortOrVintage, type Validated } from '@/lib/ingest/upload';
import { createRng } from '@/lib/stats/random';
import { arg } from './timing';

const CASES = ['single-line', 'wide-header', 'tape-upload', 'tape-convert'] as const;
type Case = (typeof CASES)[number];

interface Measure {
  outcome: string;
  ms: number;
  cpuMs: number;
  rssBeforeMb: number;
  maxRssMb: number;
}

const MB = 1024 * 1024;
const PIECE = 256 * 1024;


/** `bytes` of `unit` repeated, in pieces of about 256 KB, never all at once. */
function* repeated(unit: string, bytes: number): Generator<string> {
  const piece = unit.repeat(Math.max(1, Math.floor(PIECE / unit.length)));
  let left = bytes;
  while (left > 0) {
    const part = left >= piece.length ? piece : piece.slice(0, left);
    left -= part.length;
    yield part;
  }
}

/** A header, then `bytes` of rows glued into one line (their line breaks lost). */
function* gluedRows(bytes: number): Generator<string> {
  yield 'segment,period,obligors,defaults\n';
  yield* repeated('SME term loans,2015,1000,12 ', bytes);
}

/** 50 million columns in 95 MB at full scale: 9 named 'c' for every empty one. */
function* wideHeader(bytes: number): Generator<string> {
  yield* repeated('c,c,c,c,c,c,c,c,c,,', bytes);
  yield '\n';
}

function* fileChunks(file: string): Generator<Buffer> {
  const fd = fs.openSync(file, 'r');
  try {
    const buf = Buffer.alloc(PIECE);
    for (;;) {
      const n = fs.readSync(fd, buf, 0, PIECE, null);
      if (n === 0) return;
      yield Buffer.from(buf.subarray(0, n));
    }
  } finally {
    fs.closeSync(fd);
  }
}

/** A multipart upload request whose file part is streamed from `content` as it is sent. */
function uploadRequest(fields: Record<string, string>, fileName: string, content: Iterable<string | Buffer>): Request {
  const boundary = `----rhobook-bench-${process.pid}`;
  const enc = new TextEncoder();
  const head =
    Object.entries(fields)
      .map(([k, v]) => `--${boundary}\r\nContent-Disposition: form-data; name="${k}"\r\n\r\n${v}\r\n`)
      .join('') + `--${boundary}\r\nContent-Disposition: form-data; name="file"; filename="${fileName}"\r\nContent-Type: text/csv\r\n\r\n`;
  const it = content[Symbol.iterator]();
  let phase: 'head' | 'file' | 'done' = 'head';
  const body = new ReadableStream<Uint8Array>({
    pull(controller) {
      if (phase === 'head') {
        controller.enqueue(enc.encode(head));
        phase = 'file';
        return;
      }
      if (phase === 'file') {
        const r = it.next();
        if (!r.done) {
          controller.enqueue(typeof r.value === 'string' ? enc.encode(r.value) : new Uint8Array(r.value));
          return;
        }
        controller.enqueue(enc.encode(`\r\n--${boundary}--\r\n`));
        phase = 'done';
      }
      controller.close();
    },
  });
  return new Request('http://127.0.0.1/api/datasets', {
    method: 'POST',
    headers: { 'content-type': `multipart/form-data; boundary=${boundary}` },
    body,
    duplex: 'half',
  } as RequestInit);
}

function outcomeOf(v: Pick<Validated, 'ok' | 'findings' | 'summary'>, extra = ''): string {
  if (v.ok) return `accepted${extra}`;
  const first = v.findings.find((f) => f.severity === 'error');
  return `refused (422): ${first?.rule ?? '?'} at line ${first?.line ?? '-'}, ${v.summary.errors} error${v.summary.errors === 1 ? '' : 's'}`;
}

async function runCase(name: Case, mb: number, tape: string, limits: ReadOptions): Promise<string> {
  const maxBytes = 100 * MB;
  if (name === 'single-line' || name === 'wide-header') {
    const content = name === 'single-line' ? gluedRows(mb * MB) : wideHeader(mb * MB);
    return withReceivedUpload(uploadRequest({ kind: 'cohort' }, `${name}.csv`, content), maxBytes, async (upload) => {
      const v = await validateCohortOrVintage('cohort', gunzipSource(upload.file!.gzip()), { ...limits, maxBytes });
      return `${outcomeOf(v)}; received ${(upload.file!.sizeBytes / MB).toFixed(1)} MB`;
    });
  }
  return withReceivedUpload(uploadRequest({ kind: 'loans', asOf: '2024-12-31' }, 'tape.csv', fileChunks(tape)), maxBytes, async (upload) => {
    const received = `received ${(upload.file!.sizeBytes / MB).toFixed(1)} MB`;
    if (name === 'tape-upload') {
      const h = await checkLoanTapeHeader(gunzipSource(upload.file!.gzip()), { ...limits, maxBytes });
      return `${outcomeOf(h, ' (header checked, conversion queued)')}; ${received}`;
    }
    // The conversion job: the tape read back from its compressed copy, every row validated.
    const t0 = process.cpuUsage();
    const v = await convertLoanTape(gunzipSource(upload.file!.gzip()), { ...limits, maxBytes: Number.MAX_SAFE_INTEGER, asOf: '2024-12-31' });
    const convertCpu = process.cpuUsage(t0);
    return `${outcomeOf(v, `: ${v.cohortRows.length} cohort rows`)}; ${received}; conversion alone ${((convertCpu.user + convertCpu.system) / 1e6).toFixed(1)} s CPU`;
  });
}

async function childMain(name: Case, mb: number, tape: string, noLimits: boolean): Promise<void> {
  const limits: ReadOptions = noLimits ? { maxLineChars: Number.POSITIVE_INFINITY, maxColumns: Number.POSITIVE_INFINITY } : {};
  const rssBeforeMb = process.memoryUsage().rss / MB;
  const t0 = performance.now();
  const c0 = process.cpuUsage();
  const outcome = await runCase(name, mb, tape, limits);
  const cpu = process.cpuUsage(c0);
  const m: Measure = { outcome, ms: performance.now() - t0, cpuMs: (cpu.user + cpu.system) / 1000, rssBeforeMb, maxRssMb: process.resourceUsage().maxRSS / 1024 };
  process.send!(m);
}

function child(name: Case, mb: number, tape: string, noLimits: boolean): Promise<Measure> {
  const args = ['--case', name, '--mb', String(mb), '--tape', tape, ...(noLimits ? ['--no-limits'] : [])];
  return new Promise((resolve, reject) => {
    const p = fork(fileURLToPath(import.meta.url), args, { stdio: ['ignore', 'inherit', 'inherit', 'ipc'] });
    p.on('message', (m) => resolve(m as Measure));
    p.on('error', reject);
    p.on('exit', (code) => {
      if (code !== 0) reject(new Error(`${name} child exited with ${code}`));
    });
  });
}

async function main(): Promise<void> {
  const noLimits = process.argv.includes('--no-limits');
  const asChild = arg('--case', '');
  if (asChild) return childMain(asChild as Case, Number(arg('--mb', '90')), arg('--tape', ''), noLimits);

  const only = arg('--only', '');
  const cases = only ? CASES.filter((c) => c === only) : [...CASES];
  if (cases.length === 0) throw new Error(`--only takes one of ${CASES.join(', ')}`);
  const scale = arg('--mb', '');
  console.log(`machine: ${os.cpus()[0]?.model ?? 'unknown'} x ${os.cpus().length}, node ${process.version}, load average ${os.loadavg()[0].toFixed(1)}`);
  console.log(
    noLimits
      ? 'line and column limits OFF (what they prevent)'
      : `limits: ${DEFAULT_MAX_LINE_CHARS.toLocaleString('en')} characters a line, ${DEFAULT_MAX_COLUMNS.toLocaleString('en')} columns (UPLOAD_MAX_LINE_CHARS, UPLOAD_MAX_COLUMNS)`,
  );
  let tape = '';
  if (cases.some((c) => c.startsWith('tape'))) {
    tape = path.join(os.tmpdir(), `rhobook-bench-upload-tape-${process.pid}.csv`);
    const fd = fs.openSync(tape, 'w');
    for (const chunk of generateLoanTape(createRng(DEMO_SEED), { loans: 1_950_000 })) fs.writeSync(fd, chunk);
    fs.closeSync(fd);
    console.log(`tape: 1,950,000 loans, ${(fs.statSync(tape).size / 1e6).toFixed(1)} MB (${tape})`);
  }
  try {
    for (const name of cases) {
      const mb = name === 'single-line' ? Number(scale || 90) : name === 'wide-header' ? Number(scale || 95) : 0;
      const m = await child(name, mb, tape, noLimits);
      const label = { 'single-line': `${mb} MB single line after the header`, 'wide-header': `${mb} MB header (${((mb * MB * 10) / 19 / 1e6).toFixed(0)} million columns)`, 'tape-upload': '100 MB loan tape, upload', 'tape-convert': '100 MB loan tape, conversion job' }[name];
      console.log(
        `${label.padEnd(40)} ${(m.ms / 1000).toFixed(2).padStart(7)} s wall ${(m.cpuMs / 1000).toFixed(2).padStart(7)} s CPU  peak RSS ${m.maxRssMb.toFixed(0).padStart(5)} MB (child at start ${m.rssBeforeMb.toFixed(0)} MB)  ${m.outcome}`,
      );
    }
  } finally {
    if (tape && !process.argv.includes('--keep')) fs.rmSync(tape, { force: true });
  }
}

await main();
