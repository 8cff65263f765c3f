import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { and, eq, inArray } from 'drizzle-orm';
import { closeDb, getDb } from '@/db/connection';
import { evidenceBacktests, jobs, mailOutbox } from '@/db/schema';
import { addDays, todayIso } from '@/lib/assumptions/dates';
import { createDraft, getVersionPage, listLibrary, runScheduledTransitions, transition } from '@/lib/dal/assumptions';
import { createToken } from '@/lib/dal/tokens';
import { runJobHere } from '@/workers/run-job-here';
import * as uploadRoute from '@/app/api/datasets/route';
import * as inForceRoute from '@/app/api/v1/assumptions/route';
import { makeUser } from '../../support/users';
import { call, draftBody, makeFitRun, type SessionUser } from '../../support/assumptions';
import { uploadRequest } from '../datasets/support';

vi.mock('@/lib/auth/session', () => import('../../support/mock-session'));
import { session } from '../../support/mock-session';

// Evidence that ages: a value drawn from a dataset that is superseded, or whose segment has later
// years in a newer dataset, is flagged on the version page, the library, the consumer API and by
// e-mail, and the worker backtests it on the new years.
let analyst: SessionUser;
let validator: SessionUser;
let token: string;
const tag = Date.now().toString(36);
const SEG = `Aged evidence ${tag}`;
const OTHER = `Newer years ${tag}`;

const rows = (seg: string, from: number, to: number, bad: number[] = []) =>
  Array.from({ length: to - from + 1 }, (_, i) => from + i)
    .map((y) => `${seg},${y},4000,${bad.includes(y) ? 400 : 50 + ((y * 13) % 30)}`)
    .join('\n');

async function upload(name: string, csv: string, fields: Record<string, string> = {}) {
  session.user = analyst;
  try {
    const res = await uploadRoute.POST(uploadRequest({ kind: 'cohort', name, ...fields }, `segment,period,obligors,defaults\n${csv}\n`, `${name}.csv`));
    const body = (await res.json()) as { id: number; sha256: string };
    expect(res.status, JSON.stringify(body)).toBe(201);
    return body;
  } finally {
    session.user = null;
  }
}

async function publishFrom(dataset: { id: number; sha256: string }, segment: string) {
  const periods = Array.from({ length: 10 }, (_, i) => String(2010 + i));
  const { fitId } = await makeFitRun(analyst.id, segment, { rho: 0.08, pd: 0.016, profile: { level: 0.95, lower: 0.03, upper: 0.2 } }, { dataset, periods });
  const at = new Date(`${addDays(todayIso(), -30)}T10:00:00Z`);
  const v = await createDraft(analyst, draftBody(fitId, segment, { effectiveDate: addDays(todayIso(), -30) }) as never, at);
  await transition(analyst, v.id, { action: 'submit' }, at);
  await transition(validator, v.id, { action: 'start-review' }, at);
  await transition(validator, v.id, { action: 'approve', comment: 'Checked.' }, at);
  await transition(validator, v.id, { action: 'publish' }, at);
  return v;
}

/** Runs every queued monitor-backtest job here, as the worker would. */
async function runBacktests() {
  for (;;) {
    const [job] = await getDb().select({ id: jobs.id }).from(jobs).where(and(eq(jobs.kind, 'monitor-backtest'), eq(jobs.status, 'queued'))).orderBy(jobs.id).limit(1);
    if (!job) return;
    await runJobHere(getDb(), job.id, 'monitor-backtest');
  }
}

const api = (segment: string) =>
  call(inForceRoute.GET, { url: `http://127.0.0.1/api/v1/assumptions?segment=${encodeURIComponent(segment)}`, headers: { authorization: `Bearer ${token}` } });

beforeAll(async () => {
  analyst = await makeUser('analyst');
  validator = await makeUser('validator');
  token = (await createToken(await makeUser('admin'), { name: 'Evidence test', scopes: ['assumptions:read'] })).token;
});
afterAll(async () => {
  await closeDb();
});

describe('a superseded dataset flags every value drawn from it, through to the API, with a backtest on the new years', () => {
  it('flag, e-mail once, backtest by the worker, shown in the API and the library', async () => {
    const older = await upload(`Aged ${tag} A`, rows(SEG, 2010, 2019));
    const v = await publishFrom(older, SEG);
    let api0 = await api(SEG);
    expect((api0.body.assumption as { evidence: unknown }).evidence).toEqual({ superseded: false, newerDatasetId: null, newPeriods: [], backtest: null });

    // The corrected and extended file supersedes the first; 2021 is a bad year.
    const newer = await upload(`Aged ${tag} B`, rows(SEG, 2010, 2021, [2021]), { supersedes: String(older.id) });
    api0 = await api(SEG);
    const a = api0.body.assumption as { evidence: { superseded: boolean; newerDatasetId: number; newPeriods: string[] }; cautions: string[] };
    expect(a.evidence).toMatchObject({ superseded: true, newerDatasetId: newer.id, newPeriods: ['2020', '2021'] });
    expect(a.cautions.some((c) => c.startsWith(`The dataset this value was drawn from has been superseded by dataset ${newer.id}`))).toBe(true);
    const page = await getVersionPage(analyst, v.id);
    expect(page.evidence.flagged).toBe(true);
    const lib = (await listLibrary(analyst)).find((e) => e.segment === SEG)!;
    expect(lib.evidence).toMatchObject({ superseded: true, newPeriods: ['2020', '2021'] });

    // The scheduler tells the author and the validator once, and queues one backtest.
    const r1 = await runScheduledTransitions(new Date());
    await runScheduledTransitions(new Date());
    expect(r1.evidence.flagged).toBeGreaterThanOrEqual(1);
    const mails = await getDb().select().from(mailOutbox).where(and(eq(mailOutbox.versionId, v.id), eq(mailOutbox.kind, 'evidence-aged')));
    expect(mails.map((m) => m.toAddress).sort()).toEqual([analyst.email, validator.email].sort());
    expect(mails[0].subject).toBe(`Evidence has aged: ${SEG} v1`);
    const tests = await getDb().select().from(evidenceBacktests).where(eq(evidenceBacktests.versionId, v.id));
    expect(tests).toHaveLength(1);
    expect(tests[0]).toMatchObject({ datasetId: newer.id, status: 'queued', periods: ['2020', '2021'] });

    await runBacktests();
    const after = await api(SEG);
    const e = (after.body.assumption as { evidence: { backtest: { verdict: string; periods: string[]; exceedances: { above99: number } } } }).evidence;
    expect(e.backtest.periods).toEqual(['2020', '2021']);
    // 400 defaults of 4,000 (10%) against a published PD of 1.6% at rho about 0.11: far above the 99% quantile.
    expect(e.backtest.exceedances.above99).toBe(1);
    expect(e.backtest.verdict).toBe('breach');
    const stored = (await getVersionPage(analyst, v.id)).evidence.backtest!;
    expect(stored.status).toBe('done');
    expect(stored.result).toMatchObject({ p: v.pd, rho: v.finalValue, periods: ['2020', '2021'] });
    expect(stored.years[1]).toMatch(/^2021: 400 defaults of 4,000 \(10\.00%\)/);
  });

  it('a newer dataset with later years of the segment flags it too, without supersession', async () => {
    const first = await upload(`Years ${tag} A`, rows(OTHER, 2010, 2019));
    const v = await publishFrom(first, OTHER);
    await upload(`Years ${tag} B`, rows(OTHER, 2020, 2020));
    const res = await api(OTHER);
    const ev = (res.body.assumption as { evidence: { superseded: boolean; newPeriods: string[] } }).evidence;
    expect(ev).toMatchObject({ superseded: false, newPeriods: ['2020'] });
    const page = await getVersionPage(validator, v.id);
    expect(page.evidence.flagged).toBe(true);
    // Clean up the queued jobs of this file for the tests after it.
    await runScheduledTransitions(new Date());
    await runBacktests();
    const t = await getDb().select().from(evidenceBacktests).where(inArray(evidenceBacktests.versionId, [v.id]));
    expect(t[0].status).toBe('done');
  });
});
