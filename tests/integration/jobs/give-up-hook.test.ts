/**
 * The give-up hook of a job kind runs in the transaction that ends the job failed or cancelled,
 * and a hook that throws is rolled back alone (a savepoint) without keeping the job from ending.
 */
import { eq } from 'drizzle-orm';
import { afterAll, describe, expect, it, vi } from 'vitest';
import { closeDb, getDb } from '@/db/connection';
import { jobs, workerHeartbeats } from '@/db/schema';
import { cancelJob, claimJob, enqueueJob, failJob } from '@/lib/jobs/queue';

const ends = vi.hoisted(() => [] as { jobId: number; status: string; error: string | null; payload: unknown }[]);

// Two test-only job kinds with give-up hooks, beside the real ones of lib/jobs/kinds.
vi.mock('@/lib/jobs/kinds', async (importOriginal) => {
  const { z } = await import('zod');
  const { defineJobKind } = await import('@/lib/jobs/job-kind');
  const { workerHeartbeats: beats } = await import('@/db/schema');
  const real = await importOriginal<typeof import('@/lib/jobs/kinds')>();
  const kinds: Record<string, import('@/lib/jobs/job-kind').JobKindSpec> = {
    ...real.jobKinds,
    'test-hooked': defineJobKind('test-hooked', z.object({ tag: z.string() }), {
      onGiveUp: async (tx, end) => {
        ends.push({ jobId: end.jobId, status: end.status, error: end.error, payload: end.payload });
        // A row written by the hook shows that it shares the job's transaction.
        await tx.insert(beats).values({ workerId: `hook-${end.jobId}`, host: 'h', pid: 1, startedAt: new Date(), lastBeatAt: new Date() });
      },
    }),
    'test-hook-throws': defineJobKind('test-hook-throws', z.object({ tag: z.string() }), {
      onGiveUp: async (tx, end) => {
        await tx.insert(beats).values({ workerId: `bad-hook-${end.jobId}`, host: 'h', pid: 1, startedAt: new Date(), lastBeatAt: new Date() });
        throw new Error('the hook is broken');
      },
    }),
  };
  return { ...real, kindSpec: (kind: string) => (Object.hasOwn(kinds, kind) ? kinds[kind] : undefined) };
});

afterAll(async () => {
  await closeDb();
});

const beatOf = async (id: string) => (await getDb().select().from(workerHeartbeats).where(eq(workerHeartbeats.workerId, id))).length;

describe('give-up hooks', () => {
  it('run on a permanent failure and on a cancel, not on a retry', async () => {
    const db = getDb();
    const a = await enqueueJob(db, { kind: 'test-hooked', payload: { tag: 'a' } });
    expect((await claimJob(db, 'hw', ['test-hooked']))?.id).toBe(a);
    expect(await failJob(db, a, 'hw', 'transient', false)).toBe('queued');
    expect(ends).toHaveLength(0);
    expect((await claimJob(db, 'hw', ['test-hooked']))?.id).toBe(a);
    expect(await failJob(db, a, 'hw', 'bad input', true)).toBe('failed');
    expect(ends).toEqual([{ jobId: a, status: 'failed', error: 'bad input', payload: { tag: 'a' } }]);
    expect(await beatOf(`hook-${a}`)).toBe(1);

    const b = await enqueueJob(db, { kind: 'test-hooked', payload: { tag: 'b' } });
    await cancelJob(db, b);
    expect(ends[1]).toEqual({ jobId: b, status: 'cancelled', error: null, payload: { tag: 'b' } });
  });

  it('a hook that throws is rolled back alone and the job still fails', async () => {
    const db = getDb();
    const c = await enqueueJob(db, { kind: 'test-hook-throws', payload: { tag: 'c' } });
    expect((await claimJob(db, 'hw2', ['test-hook-throws']))?.id).toBe(c);
    const quiet = console.error;
    console.error = () => undefined;
    try {
      expect(await failJob(db, c, 'hw2', 'bad input', true)).toBe('failed');
    } finally {
      console.error = quiet;
    }
    const [row] = await db.select().from(jobs).where(eq(jobs.id, c));
    expect(row.status).toBe('failed');
    expect(row.error).toBe('bad input');
    expect(await beatOf(`bad-hook-${c}`)).toBe(0);
  });
});
