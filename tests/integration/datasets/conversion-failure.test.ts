/**
 * A loan tape whose conversion job ends without a result (a permanent error, a crash after the last
 * attempt, a worker that stopped responding too often, a cancel) is marked failed in the same
 * transaction that ends the job, with a sentence on its report, and its bytes can be uploaded again.
 * Found in QA: such datasets stayed "processing" in the datasets table for ever.
 * A validation rejection is not a failure: that job succeeds (datasets-api.test.ts).
 */
import { eq, sql } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import type { SessionUser } from '@/lib/auth/guard';

vi.mock('@/lib/auth/session', () => import('../../support/mock-session'));
import { session as h } from '../../support/mock-session';

import { closeDb, getDb } from '@/db/connection';
import { datasetFiles, datasets, jobs, uploadReports } from '@/db/schema';
import { GET as listRoute, POST } from '@/app/api/datasets/route';
import { DELETE as deleteRoute, GET as getRoute } from '@/app/api/datasets/[id]/route';
import { GET as reportRoute } from '@/app/api/datasets/reports/[reportId]/route';
import { cancelJob, claimJob, failJob } from '@/lib/jobs/queue';
import { runJobLoop } from '@/workers/job-loop';
import { makeUser } from '../../support/users';
import { paramsOf, uploadRequest } from './support';

let analyst: SessionUser;
beforeAll(async () => {
  analyst = await makeUser('analyst');
  h.user = analyst;
});
afterAll(async () => {
  await closeDb();
});

let n = 0;
/** A small valid tape; each call's bytes differ so that uploads are not duplicates of each other. */
function tape(): string {
  n += 1;
  return `loan_id,segment,start_date,default_date,exit_date\nF${n}-1,Fail seg,2014-05-01,,\nF${n}-2,Fail seg,2014-06-01,2015-07-01,\nF${n}-3,Fail seg,2015-03-01,,\n`;
}

async function upload(content: string): Promise<{ id: number; jobId: number; reportId: number }> {
  const res = await POST(uploadRequest({ kind: 'loans', name: `Tape ${n}`, asOf: '2016-12-31' }, content));
  const body = await res.json();
  expect(res.status, JSON.stringify(body)).toBe(202);
  return body;
}

async function state(u: { id: number; jobId: number; reportId: number }) {
  const db = getDb();
  const [d] = await db.select().from(datasets).where(eq(datasets.id, u.id));
  const [r] = await db.select().from(uploadReports).where(eq(uploadReports.id, u.reportId));
  const [j] = await db.select().from(jobs).where(eq(jobs.id, u.jobId));
  return { dataset: d, report: r, job: j };
}

/** Claims this upload's job (earlier tests' jobs are finished, so it is the oldest claimable). */
async function claim(u: { jobId: number }, workerId: string) {
  const job = await claimJob(getDb(), workerId, ['convert-loans']);
  expect(job?.id).toBe(u.jobId);
  return job!;
}

describe('a conversion that ends without a result', () => {
  it('a permanent error in the real job loop (the stored file is gone): dataset and report failed, the page data says why, the file can be sent again', async () => {
    const content = tape();
    const u = await upload(content);
    await getDb().delete(datasetFiles).where(eq(datasetFiles.datasetId, u.id));
    const stop = new AbortController();
    const loop = runJobLoop({ db: getDb(), workerId: 'test-worker-a', signal: stop.signal, idleMs: 20, kinds: ['convert-loans'], log: () => undefined });
    for (let i = 0; i < 400; i++) {
      const { job } = await state(u);
      if (job.status !== 'queued' && job.status !== 'running') break;
      await new Promise((r) => setTimeout(r, 25));
    }
    stop.abort();
    await loop;
    const s = await state(u);
    expect(s.job.status).toBe('failed');
    expect(s.dataset.status).toBe('failed');
    expect(s.dataset.dedupeKey).toBeNull();
    expect(s.report.status).toBe('failed');
    expect(s.report.message).toContain('has no stored file');
    expect(s.report.message).toContain('Upload the same file again');

    const detail = await (await getRoute(new Request('http://x'), paramsOf({ id: String(u.id) }))).json();
    expect(detail.dataset.status).toBe('failed');
    expect(detail.dataset.report.status).toBe('failed');
    expect(detail.dataset.report.message).toContain('has no stored file');
    const list = await (await listRoute()).json();
    expect(list.datasets.find((d: { id: number }) => d.id === u.id).status).toBe('failed');
    const rep = await (await reportRoute(new Request('http://x'), paramsOf({ reportId: String(u.reportId) }))).json();
    expect(rep.report.status).toBe('failed');

    // The same bytes again: accepted for conversion as a new dataset (not 409).
    const again = await upload(content);
    expect(again.id).not.toBe(u.id);
    await cancelJob(getDb(), again.jobId); // out of the way of the next tests' claims
  });

  it('a crash on the last attempt fails the dataset; a crash with attempts left leaves it processing for the retry', async () => {
    const u = await upload(tape());
    await claim(u, 'w1');
    expect(await failJob(getDb(), u.jobId, 'w1', 'Error: connection reset', false)).toBe('queued');
    expect((await state(u)).dataset.status).toBe('processing');
    expect((await state(u)).report.status).toBe('processing');

    await getDb().update(jobs).set({ maxAttempts: 2 }).where(eq(jobs.id, u.jobId));
    await claim(u, 'w2');
    expect(await failJob(getDb(), u.jobId, 'w2', 'Error: connection reset again', false)).toBe('failed');
    const s = await state(u);
    expect(s.dataset.status).toBe('failed');
    expect(s.report.status).toBe('failed');
    expect(s.report.message).toContain('connection reset again');
  });

  it('a worker that stopped responding on the last attempt: the next claim fails the job and the dataset together', async () => {
    const u = await upload(tape());
    await claim(u, 'w-dead');
    await getDb()
      .update(jobs)
      .set({ maxAttempts: 1, leaseExpiresAt: sql`CURRENT_TIMESTAMP(3) - INTERVAL 1 SECOND` })
      .where(eq(jobs.id, u.jobId));
    expect(await claimJob(getDb(), 'w-other', ['convert-loans'])).toBeNull();
    const s = await state(u);
    expect(s.job.status).toBe('failed');
    expect(s.dataset.status).toBe('failed');
    expect(s.report.message).toContain('stopped responding');
  });

  it('a cancelled conversion (queued, or running and stopped by its worker) marks the dataset failed with "cancelled"', async () => {
    const u = await upload(tape());
    await cancelJob(getDb(), u.jobId);
    let s = await state(u);
    expect(s.job.status).toBe('cancelled');
    expect(s.dataset.status).toBe('failed');
    expect(s.report.message).toContain('cancelled');

    const v = await upload(tape());
    await claim(v, 'w3');
    await cancelJob(getDb(), v.jobId);
    expect((await state(v)).dataset.status).toBe('processing');
    expect(await failJob(getDb(), v.jobId, 'w3', 'stopped', false)).toBe('cancelled');
    s = await state(v);
    expect(s.dataset.status).toBe('failed');
    expect(s.report.message).toContain('cancelled');
  });

  it('deleting a dataset still waiting for its conversion cancels the job; the report says so', async () => {
    const u = await upload(tape());
    const res = await deleteRoute(new Request('http://x', { method: 'DELETE' }), paramsOf({ id: String(u.id) }));
    expect(res.status).toBe(204);
    const s = await state(u);
    expect(s.dataset).toBeUndefined();
    expect(s.job.status).toBe('cancelled');
    expect(s.report.status).toBe('failed');
    expect(s.report.datasetId).toBeNull();
    expect(s.report.message).toContain('cancelled');
    expect(await claimJob(getDb(), 'w5', ['convert-loans'])).toBeNull();
  });

  it('a ready dataset is never touched by a late failure of its old job', async () => {
    const u = await upload(tape());
    await getDb().update(datasets).set({ status: 'ready' }).where(eq(datasets.id, u.id));
    await claim(u, 'w4');
    expect(await failJob(getDb(), u.jobId, 'w4', 'late', true)).toBe('failed');
    expect((await state(u)).dataset.status).toBe('ready');
  });
});
