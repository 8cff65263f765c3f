import { afterAll, beforeEach, describe, expect, it, vi } from 'vitest';
import { drizzle } from 'drizzle-orm/mysql2';
import mysql from 'mysql2/promise';
import { eq, inArray } from 'drizzle-orm';
import { closeDb, getDb, type Db } from '@/db/connection';
import * as schema from '@/db/schema';
import { jobs, workerHeartbeats } from '@/db/schema';
import { env } from '@/lib/env';
import { AppError } from '@/lib/errors';
import { cancelJob, claimJob, completeJob, enqueueJob, getJob, reportProgress } from '@/lib/jobs/queue';
import type { JobHandlers } from '@/workers/handlers';
import type { JobHandler } from '@/workers/job-handler';
import { runJobLoop } from '@/workers/job-loop';

// Test-only job kinds: the static map of lib/jobs/kinds with four more entries.
vi.mock('@/lib/jobs/kinds', async (importOriginal) => {
  const { z } = await import('zod');
  const { defineJobKind } = await import('@/lib/jobs/job-kind');
  const real = await importOriginal<typeof import('@/lib/jobs/kinds')>();
  const kinds: Record<string, import('@/lib/jobs/job-kind').JobKindSpec> = {
    ...real.jobKinds,
    'test-count': defineJobKind('test-count', z.object({ n: z.number().int() })),
    'test-flaky': defineJobKind('test-flaky', z.object({ failTimes: z.number().int(), permanent: z.boolean().default(false) })),
    'test-slow': defineJobKind('test-slow', z.object({ steps: z.number().int() })),
    'test-write-fails': defineJobKind('test-write-fails', z.object({ marker: z.string() })),
  };
  return { ...real, kindSpec: (kind: string) => (Object.hasOwn(kinds, kind) ? kinds[kind] : undefined) };
});

const runs = new Map<number, number>();
const flakyTries = new Map<number, number>();

const testCount: JobHandler<{ n: number }> = async (ctx) => {
  runs.set(ctx.jobId, (runs.get(ctx.jobId) ?? 0) + 1);
  await new Promise((r) => setTimeout(r, 5));
  return async () => ({ doubled: ctx.payload.n * 2 });
};
const testFlaky: JobHandler<{ failTimes: number; permanent: boolean }> = async (ctx) => {
  const tries = (flakyTries.get(ctx.jobId) ?? 0) + 1;
  flakyTries.set(ctx.jobId, tries);
  if (ctx.payload.permanent) throw new AppError('invalid:test', 'This input can never work.');
  if (tries <= ctx.payload.failTimes) throw new Error(`transient failure ${tries}`);
  return async () => ({ tries });
};
const testSlow: JobHandler<{ steps: number }> = async (ctx) => {
  for (let i = 0; i < ctx.payload.steps; i++) {
    await new Promise((r) => setTimeout(r, 50));
    await ctx.progress((100 * (i + 1)) / ctx.payload.steps, `step ${i + 1}`);
  }
  return async () => ({ steps: ctx.payload.steps });
};
const testWriteFails: JobHandler<{ marker: string }> = async (ctx) => {
  return async (tx) => {
    await tx.insert(workerHeartbeats).values({ workerId: ctx.payload.marker, host: 'x', pid: 1, startedAt: new Date(), lastBeatAt: new Date() });
    throw new Error('the writer failed half way');
  };
};
const handlers: JobHandlers = { 'test-count': testCount, 'test-flaky': testFlaky, 'test-slow': testSlow, 'test-write-fails': testWriteFails };

const extraPools: mysql.Pool[] = [];
function secondDb(): Db {
  const e = env();
  const pool = mysql.createPool({ host: e.DB_HOST, port: e.DB_PORT, user: e.DB_USER, password: e.DB_PASSWORD, database: e.DB_NAME, connectionLimit: 5, timezone: 'Z' });
  extraPools.push(pool);
  return drizzle(pool, { schema, mode: 'default' });
}

async function waitFor(pred: () => Promise<boolean>, timeoutMs = 20_000) {
  const t0 = Date.now();
  while (Date.now() - t0 < timeoutMs) {
    if (await pred()) return;
    await new Promise((r) => setTimeout(r, 50));
  }
  throw new Error('timed out waiting');
}

beforeEach(async () => {
  await getDb().delete(jobs);
});
afterAll(async () => {
  await Promise.all(extraPools.map((p) => p.end()));
  await closeDb();
});

describe('enqueue', () => {
  it('refuses an unknown kind and an invalid payload, storing nothing', async () => {
    await expect(enqueueJob(getDb(), { kind: 'no-such-kind', payload: {} })).rejects.toMatchObject({ code: 'bad_request:job-kind' });
    await expect(enqueueJob(getDb(), { kind: 'test-count', payload: { n: 'x' } })).rejects.toMatchObject({ code: 'invalid:job-payload' });
    expect(await getDb().select().from(jobs)).toHaveLength(0);
  });
});

describe('claiming', () => {
  it('two workers never run the same job: 50 jobs across 2 workers, each run exactly once', async () => {
    runs.clear();
    const ids: number[] = [];
    for (let i = 0; i < 50; i++) ids.push(await enqueueJob(getDb(), { kind: 'test-count', payload: { n: i } }));
    const stop = new AbortController();
    const loops = [
      runJobLoop({ db: getDb(), workerId: 'w-a', signal: stop.signal, idleMs: 20, kinds: ['test-count'], log: () => {}, handlers }),
      runJobLoop({ db: secondDb(), workerId: 'w-b', signal: stop.signal, idleMs: 20, kinds: ['test-count'], log: () => {}, handlers }),
    ];
    await waitFor(async () => (await getDb().select().from(jobs).where(eq(jobs.status, 'succeeded'))).length === 50, 60_000);
    stop.abort();
    await Promise.all(loops);
    const rows = await getDb().select().from(jobs).where(inArray(jobs.id, ids));
    expect(rows.every((r) => r.status === 'succeeded' && r.attempts === 1)).toBe(true);
    expect(ids.every((id) => runs.get(id) === 1)).toBe(true);
    const byWorker = new Set(rows.map((r) => r.workerId));
    expect(byWorker.size).toBe(2); // both workers took part
    expect(rows.find((r) => r.id === ids[7])!.result).toEqual({ doubled: 14 });
  });

  it('a job whose worker died (lease expired) is claimed again, and the dead worker cannot complete it', async () => {
    const id = await enqueueJob(getDb(), { kind: 'test-count', payload: { n: 1 } });
    const first = await claimJob(getDb(), 'w-dead', ['test-count'], 200);
    expect(first?.id).toBe(id);
    expect(await claimJob(getDb(), 'w-live', ['test-count'], 200)).toBeNull(); // still leased
    await new Promise((r) => setTimeout(r, 350));
    const second = await claimJob(getDb(), 'w-live', ['test-count'], 5000);
    expect(second).toMatchObject({ id, attempt: 2 });
    // The "dead" worker wakes up: its completion is refused and writes nothing.
    expect(await completeJob(getDb(), id, 'w-dead', async () => ({ from: 'dead' }))).toBe(false);
    expect(await reportProgress(getDb(), id, 'w-dead', 50, 'x')).toBe('lost');
    expect(await completeJob(getDb(), id, 'w-live', async () => ({ from: 'live' }))).toBe(true);
    const job = await getJob(getDb(), id);
    expect(job).toMatchObject({ status: 'succeeded', attempts: 2, result: { from: 'live' } });
  });

  it('fails a job whose workers keep dying once its attempts are used up, keeping the reason', async () => {
    const id = await enqueueJob(getDb(), { kind: 'test-count', payload: { n: 1 }, maxAttempts: 2 });
    await claimJob(getDb(), 'w1', ['test-count'], 100);
    await new Promise((r) => setTimeout(r, 200));
    await claimJob(getDb(), 'w2', ['test-count'], 100);
    await new Promise((r) => setTimeout(r, 200));
    expect(await claimJob(getDb(), 'w3', ['test-count'], 100)).toBeNull();
    const job = await getJob(getDb(), id);
    expect(job?.status).toBe('failed');
    expect(job?.error).toMatch(/stopped responding 2 times/);
  });
});

describe('running', () => {
  it('retries a transient failure and fails a permanent one at once, with the error kept', async () => {
    const flaky = await enqueueJob(getDb(), { kind: 'test-flaky', payload: { failTimes: 1 } });
    const permanent = await enqueueJob(getDb(), { kind: 'test-flaky', payload: { failTimes: 0, permanent: true } });
    const stop = new AbortController();
    const loop = runJobLoop({ db: getDb(), workerId: 'w', signal: stop.signal, idleMs: 20, kinds: ['test-flaky'], log: () => {}, handlers });
    await waitFor(async () => {
      const [a, b] = [await getJob(getDb(), flaky), await getJob(getDb(), permanent)];
      return a?.status === 'succeeded' && b?.status === 'failed';
    });
    stop.abort();
    await loop;
    expect(await getJob(getDb(), flaky)).toMatchObject({ status: 'succeeded', attempts: 2, result: { tries: 2 } });
    expect(await getJob(getDb(), permanent)).toMatchObject({ status: 'failed', attempts: 1, error: 'This input can never work.' });
  });

  it('writes results in the same transaction that marks success: a failing writer leaves nothing', async () => {
    const marker = `marker-${Date.now()}`;
    const id = await enqueueJob(getDb(), { kind: 'test-write-fails', payload: { marker }, maxAttempts: 1 });
    const stop = new AbortController();
    const loop = runJobLoop({ db: getDb(), workerId: 'w', signal: stop.signal, idleMs: 20, kinds: ['test-write-fails'], log: () => {}, handlers });
    await waitFor(async () => (await getJob(getDb(), id))?.status === 'failed');
    stop.abort();
    await loop;
    expect(await getDb().select().from(workerHeartbeats).where(eq(workerHeartbeats.workerId, marker))).toHaveLength(0);
    expect((await getJob(getDb(), id))?.error).toMatch(/writer failed half way/);
  });

  it('cancels a queued job at once and a running one at its next progress report', async () => {
    const queued = await enqueueJob(getDb(), { kind: 'test-slow', payload: { steps: 3 } });
    expect((await cancelJob(getDb(), queued)).status).toBe('cancelled');

    const running = await enqueueJob(getDb(), { kind: 'test-slow', payload: { steps: 200 } });
    const stop = new AbortController();
    const loop = runJobLoop({ db: getDb(), workerId: 'w', signal: stop.signal, idleMs: 20, kinds: ['test-slow'], log: () => {}, handlers });
    await waitFor(async () => ((await getJob(getDb(), running))?.progress ?? 0) > 0);
    const flagged = await cancelJob(getDb(), running);
    expect(flagged.cancelRequested).toBe(true);
    await waitFor(async () => (await getJob(getDb(), running))?.status === 'cancelled');
    stop.abort();
    await loop;
    await expect(cancelJob(getDb(), running)).rejects.toMatchObject({ code: 'conflict:job-finished' });
  });

  it('a worker shutting down releases its job for another worker without using up an attempt', async () => {
    const id = await enqueueJob(getDb(), { kind: 'test-slow', payload: { steps: 40 } });
    const stopA = new AbortController();
    const a = runJobLoop({ db: getDb(), workerId: 'w-a', signal: stopA.signal, idleMs: 20, kinds: ['test-slow'], log: () => {}, handlers });
    await waitFor(async () => ((await getJob(getDb(), id))?.progress ?? 0) > 0);
    stopA.abort();
    await a;
    expect(await getJob(getDb(), id)).toMatchObject({ status: 'queued', attempts: 0 });
    const stopB = new AbortController();
    const b = runJobLoop({ db: secondDb(), workerId: 'w-b', signal: stopB.signal, idleMs: 20, kinds: ['test-slow'], log: () => {}, handlers });
    await waitFor(async () => (await getJob(getDb(), id))?.status === 'succeeded');
    stopB.abort();
    await b;
    expect(await getJob(getDb(), id)).toMatchObject({ status: 'succeeded', attempts: 1, progress: 100 });
  });
});
