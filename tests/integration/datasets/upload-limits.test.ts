/**
 * The row and header limits are settings (UPLOAD_MAX_LINE_CHARS, UPLOAD_MAX_COLUMNS), applied at
 * upload and again by the loan-tape conversion, which reads a tape's rows for the first time.
 */
import { eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import type { SessionUser } from '@/lib/auth/guard';

vi.hoisted(() => {
  process.env.UPLOAD_MAX_LINE_CHARS = '2048';
  process.env.UPLOAD_MAX_COLUMNS = '20';
});
vi.mock('@/lib/auth/session', () => import('../../support/mock-session'));
import { session as h } from '../../support/mock-session';

import { closeDb, getDb } from '@/db/connection';
import { datasets, jobs } from '@/db/schema';
import { POST } from '@/app/api/datasets/route';
import { GET as reportRoute } from '@/app/api/datasets/reports/[reportId]/route';
import { convertLoansPayloadSchema } from '@/lib/jobs/kinds/convert-loans';
import { convertLoansHandler } from '@/workers/handlers/convert-loans';
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

type Issue = { row: number | null; rule: string; severity: string; message: string };

describe('limits set lower than their defaults', () => {
  it('a row of 3,000 characters is refused at UPLOAD_MAX_LINE_CHARS = 2048, naming its line', async () => {
    const note = 'n'.repeat(3000);
    const res = await POST(uploadRequest({ kind: 'cohort' }, `segment,period,obligors,defaults,note\nLimit A,2015,100,2,short\nLimit A,2016,100,2,${note}\n`));
    const body = await res.json();
    expect(res.status).toBe(422);
    const hit = (body.issues as Issue[]).find((i) => i.rule === 'line-too-long');
    expect(hit?.row).toBe(3);
    expect(hit?.message).toMatch(/longer than 2,048 characters/);
  });

  it('a header of 25 columns is refused at UPLOAD_MAX_COLUMNS = 20', async () => {
    const header = ['segment', 'period', 'obligors', 'defaults', ...Array.from({ length: 21 }, (_, i) => `x${i}`)].join(',');
    const res = await POST(uploadRequest({ kind: 'cohort' }, `${header}\nLimit B,2015,100,2\n`));
    const body = await res.json();
    expect(res.status).toBe(422);
    const hit = (body.issues as Issue[]).find((i) => i.rule === 'too-many-columns');
    expect(hit?.row).toBe(1);
    expect(hit?.message).toMatch(/more than 20 columns/);
  });

  it('a loan tape with a long row past its first is accepted at upload and refused by its conversion, naming the line', async () => {
    let tape = 'loan_id,segment,start_date,default_date,exit_date\n';
    // The upload reads the header and first row only; the long row comes well after what it reads ahead.
    for (let i = 1; i <= 40_000; i++) tape += `LL${i},Limit tape,2014-05-01,,\n`;
    tape += `LL40001,${'s'.repeat(2100)},2014-05-01,,\n`;
    const res = await POST(uploadRequest({ kind: 'loans', asOf: '2016-12-31' }, tape));
    const body = await res.json();
    expect(res.status, JSON.stringify(body)).toBe(202);
    const [job] = await getDb().select().from(jobs).where(eq(jobs.id, body.jobId));
    const writer = await convertLoansHandler({
      jobId: job.id,
      payload: convertLoansPayloadSchema.parse(job.payload),
      db: getDb(),
      attempt: 1,
      signal: new AbortController().signal,
      progress: async () => undefined,
    });
    const outcome = (await getDb().transaction((tx) => writer(tx))) as { status: string };
    expect(outcome.status).toBe('rejected');
    const report = (await (await reportRoute(new Request('http://127.0.0.1/x'), paramsOf({ reportId: String(body.reportId) }))).json()).report;
    const hit = (report.issues as Issue[]).find((i) => i.rule === 'line-too-long');
    expect(hit?.row).toBe(40_002);
    expect(await getDb().select().from(datasets).where(eq(datasets.id, body.id))).toEqual([]);
    // The job was run here, not claimed: mark it done so that no later test's worker claims it.
    await getDb().update(jobs).set({ status: 'succeeded' }).where(eq(jobs.id, job.id));
  });
});
