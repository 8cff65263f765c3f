/**
 * A fit of many segments is one job per segment: two worker processes against one database share
 * it through the queue, each segment is computed exactly once, the run's progress is the mean over
 * its jobs, and the results are assembled once, when the last segment finishes, in the order of
 * the segments and equal to computing the whole run in one process.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import path from 'node:path';
import { eq, inArray } from 'drizzle-orm';
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { closeDb, getDb } from '@/db/connection';
import { fitRunSegments, fitRuns, jobs } from '@/db/schema';
import type { SessionUser } from '@/lib/auth/guard';
import { loadFitJob, storeSegmentOutcome } from '@/lib/dal/fit-runs';
import { cancelFit, createFit, getFit } from '@/lib/dal/fits';
import { computeFitRun } from '@/lib/fits/run';
import type { SegmentOutcome } from '@/lib/fits/results';
import { makeCohortDataset, PANEL_A } from '../../support/fit-data';
import { makeUser } from '../../support/users';

const root = path.resolve(import.meta.dirname, '../../..');
const children: ChildProcess[] = [];
let analyst: SessionUser;

// Eight segments: Panel A with its defaults shifted year by year (invented panels; only the run's
// mechanics are under test here, the numbers are checked against the single-process run).
const PANELS = Array.from({ length: 8 }, (_, s) => ({
  obligors: PANEL_A.obligors.map((n, t) => n + 37 * s + t),
  defaults: PANEL_A.defaults.map((_, t) => PANEL_A.defaults[(t + s) % PANEL_A.defaults.length]),
}));

beforeAll(async () => {
  analyst = await makeUser('analyst');
});
afterEach(() => {
  for (const c of children.splice(0)) if (c.exitCode === null && c.signalCode === null) c.kill('SIGKILL');
});
afterAll(async () => {
  await closeDb();
});

function startWorker(id: string): Promise<{ proc: ChildProcess; output: () => string }> {
  let out = '';
  const proc = spawn(process.execPath, ['--conditions=react-server', '--import', 'tsx', 'tests/support/fit-worker.ts'], {
    cwd: root,
    env: { ...process.env, WORKER_ID: id, LEASE_MS: '30000', FIT_THREADS: '0' },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  children.push(proc);
  proc.stdout!.on('data', (b) => (out += b.toString()));
  proc.stderr!.on('data', (b) => (out += b.toString()));
  return new Promise((resolve, reject) => {
    const t = setInterval(() => {
      if (out.includes(`ready ${id}`)) {
        clearInterval(t);
        resolve({ proc, output: () => out });
      } else if (proc.exitCode !== null) {
        clearInterval(t);
        reject(new Error(`worker ${id} exited: ${out}`));
      }
    }, 50);
  });
}

const withoutTiming = (x: unknown) => JSON.parse(JSON.stringify(x, (k, v) => (k === 'timing' ? undefined : v)));

describe('a fit split into one job per segment', () => {
  it('two worker processes share it: every segment computed once, progress summed over its jobs, results assembled once and equal to one process', async () => {
    const dataset = await makeCohortDataset(analyst.id, PANELS);
    const request = { datasetId: dataset.id, bootstrap: { replications: 60, seed: 17 } };
    const { id } = await createFit(analyst, request);
    const { jobIds } = await getFit(analyst, id);
    expect(jobIds).toHaveLength(8);

    const workers = await Promise.all([startWorker('split-1'), startWorker('split-2')]);
    const seen: number[] = [];
    const deadline = Date.now() + 240_000;
    for (;;) {
      const fit = await getFit(analyst, id);
      seen.push(fit.progress);
      if (fit.status === 'succeeded') break;
      expect(fit.status, fit.error ?? '').not.toMatch(/failed|cancelled/);
      if (Date.now() > deadline) throw new Error(`the fit did not finish: ${workers.map((w) => w.output()).join('\n')}`);
      await new Promise((r) => setTimeout(r, 100));
    }
    for (const w of workers) {
      const exited = new Promise((r) => w.proc.once('exit', r));
      w.proc.kill('SIGTERM');
      await exited;
    }

    // Each segment's job succeeded once, on one worker; both workers took a share.
    const successes = workers.map((w) => [...w.output().matchAll(/job (\d+) \(fit\) succeeded/g)].map((m) => Number(m[1])));
    expect([...successes[0], ...successes[1]].sort((a, b) => a - b)).toEqual([...jobIds].sort((a, b) => a - b));
    expect(successes[0].length).toBeGreaterThan(0);
    expect(successes[1].length).toBeGreaterThan(0);
    const rows = await getDb().select().from(jobs).where(inArray(jobs.id, jobIds));
    expect(rows.every((r) => r.status === 'succeeded' && r.attempts === 1)).toBe(true);
    // Assembled exactly once: by the job that stored the last segment.
    const assembled = rows.filter((r) => (r.result as { assembled?: boolean }).assembled === true);
    expect(assembled).toHaveLength(1);
    expect(assembled[0].finishedAt!.getTime()).toBe(Math.max(...rows.map((r) => r.finishedAt!.getTime())));

    // Progress was the mean over the jobs: it passed through values between 0 and 100 and never went back.
    expect(seen.some((p) => p > 0 && p < 100)).toBe(true);
    for (let i = 1; i < seen.length; i++) expect(seen[i]).toBeGreaterThanOrEqual(seen[i - 1] - 1);

    // The assembled results: the dataset's segments in order, equal to the whole run computed in one process.
    const fit = await getFit(analyst, id);
    expect(fit.results!.segments.map((s) => s.segment)).toEqual(dataset.segments);
    const { request: stored, panels } = await loadFitJob(getDb(), { fitRunId: id, datasetId: dataset.id, datasetSha256: dataset.sha256 });
    const single = await computeFitRun(panels, stored, { threads: 0 });
    expect(withoutTiming(fit.results)).toEqual(withoutTiming(single));
  }, 300_000);

  it('concurrent completions of a run\'s last segments assemble it exactly once (the run\'s row is locked)', async () => {
    const dataset = await makeCohortDataset(analyst.id, PANELS.slice(0, 2));
    for (let round = 0; round < 8; round++) {
      const { id } = await createFit(analyst, { datasetId: dataset.id });
      const failed = (position: number): SegmentOutcome => ({
        kind: 'failed',
        failure: { segment: dataset.segments[position], position, reason: 'test', message: 'An invented failure for the race.' } as never,
      });
      const results = await Promise.all([0, 1].map((p) => getDb().transaction((tx) => storeSegmentOutcome(tx, id, p, failed(p)))));
      expect(results.filter((r) => r.assembled)).toHaveLength(1);
      const [run] = await getDb().select().from(fitRuns).where(eq(fitRuns.id, id));
      expect(run.status).toBe('succeeded');
      expect((run.results as { failures: { position: number }[] }).failures.map((f) => f.position)).toEqual([0, 1]);
      await getDb().update(jobs).set({ status: 'cancelled' }).where(inArray(jobs.id, (await getFit(analyst, id)).jobIds));
    }
  });

  it('cancelling a split fit cancels every segment\'s job; one segment failing for good stops the others', async () => {
    const dataset = await makeCohortDataset(analyst.id, PANELS.slice(0, 3));
    const { id } = await createFit(analyst, { datasetId: dataset.id });
    await cancelFit(analyst, id);
    const { jobIds, status } = await getFit(analyst, id);
    expect(status).toBe('cancelled');
    const rows = await getDb().select().from(jobs).where(inArray(jobs.id, jobIds));
    expect(rows.map((r) => r.status)).toEqual(['cancelled', 'cancelled', 'cancelled']);

    const second = await createFit(analyst, { datasetId: dataset.id });
    const ids = (await getFit(analyst, second.id)).jobIds;
    // The first segment's job fails for good (as with a dataset that changed since the request).
    const { failJob, claimJob } = await import('@/lib/jobs/queue');
    const claimed = await claimJob(getDb(), 'split-test', ['fit']);
    expect(claimed!.id).toBe(ids[0]);
    await failJob(getDb(), ids[0], 'split-test', 'Dataset 1 is not the file this fit was requested on (hash differs); start a new fit.', true);
    const after = await getFit(analyst, second.id);
    expect(after.status).toBe('failed');
    expect(after.error).toMatch(/hash differs/);
    const others = await getDb().select().from(jobs).where(inArray(jobs.id, ids.slice(1)));
    expect(others.map((r) => r.status)).toEqual(['cancelled', 'cancelled']);
    const segs = await getDb().select().from(fitRunSegments).where(eq(fitRunSegments.fitRunId, second.id));
    expect(segs.every((s) => s.outcome === null)).toBe(true);
  });

  it('a run with blocks that need every segment together (pairs) is one job that computes it whole, with the pairs', async () => {
    const dataset = await makeCohortDataset(analyst.id, PANELS.slice(0, 2));
    const { id } = await createFit(analyst, { datasetId: dataset.id, pairs: true });
    const { jobIds } = await getFit(analyst, id);
    expect(jobIds).toHaveLength(1);
    expect(await getDb().select().from(fitRunSegments).where(eq(fitRunSegments.fitRunId, id))).toEqual([]);
    const [job] = await getDb().select().from(jobs).where(eq(jobs.id, jobIds[0]));
    expect(job.payload).toEqual({ fitRunId: id, datasetId: dataset.id, datasetSha256: dataset.sha256 });
    const w = await startWorker('whole-1');
    const deadline = Date.now() + 180_000;
    while ((await getFit(analyst, id)).status !== 'succeeded') {
      if (Date.now() > deadline) throw new Error(`the fit did not finish: ${w.output()}`);
      await new Promise((r) => setTimeout(r, 200));
    }
    const fit = await getFit(analyst, id);
    expect(fit.results!.segments.map((s) => s.segment)).toEqual(dataset.segments);
    expect(fit.results!.pairs).toBeDefined();
  }, 240_000);
});
