/**
 * Accepted uploads and what can be done with a dataset, through the route handlers: roles, the
 * 201 answer, what is stored (hash, compressed file, rows) in one go, the same bytes twice,
 * vintage and loan-tape conversions checked against counts worked out by hand, the cohorts CSV,
 * waivers, supersede and delete (409 while something refers to the dataset).
 */
import { createHash } from 'node:crypto';
import { gunzipSync } from 'node:zlib';
import { eq, sql } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import type { SessionUser } from '@/lib/auth/guard';

vi.mock('@/lib/auth/session', () => import('../../support/mock-session'));
import { session as h } from '../../support/mock-session';

import { closeDb, getDb } from '@/db/connection';
import { cohortRows, datasetFiles, datasets, jobs, uploadReports } from '@/db/schema';
import { GET as listRoute, POST } from '@/app/api/datasets/route';
import { DELETE as deleteRoute, GET as getRoute } from '@/app/api/datasets/[id]/route';
import { GET as cohortsCsv } from '@/app/api/datasets/[id]/cohorts.csv/route';
import { POST as waiveRoute } from '@/app/api/datasets/[id]/waivers/route';
import { POST as supersedeRoute } from '@/app/api/datasets/[id]/supersede/route';
import { GET as reportRoute } from '@/app/api/datasets/reports/[reportId]/route';
import { convertLoansHandler } from '@/workers/handlers/convert-loans';
import { convertLoansPayloadSchema } from '@/lib/jobs/kinds/convert-loans';
import { makeUser } from '../../support/users';
import { paramsOf, tableCounts, uploadRequest } from './support';

let analyst: SessionUser;
let otherAnalyst: SessionUser;

beforeAll(async () => {
  analyst = await makeUser('analyst');
  otherAnalyst = await makeUser('analyst');
  h.user = analyst;
});
afterAll(async () => {
  await closeDb();
});

const COHORT = 'segment,period,obligors,defaults\nRetail A,2015,1000,12\nRetail A,2016,1040,20\nRetail A,2017,1100,9\nCorp B,2016,25,0\nCorp B,2017,28,1\n';

async function json(res: Response) {
  return { status: res.status, body: await res.json() };
}

/** Runs the conversion job of a queued loan tape as the worker would, writer included. */
async function runConversion(jobId: number) {
  const [job] = await getDb().select().from(jobs).where(eq(jobs.id, jobId));
  const payload = convertLoansPayloadSchema.parse(job.payload);
  const writer = await convertLoansHandler({
    jobId,
    payload,
    db: getDb(),
    attempt: 1,
    signal: new AbortController().signal,
    progress: async () => undefined,
  });
  return getDb().transaction((tx) => writer(tx as never));
}

describe('who may upload', () => {
  it('viewers and validators are refused with 403 and nothing is read or stored', async () => {
    for (const role of ['viewer', 'validator'] as const) {
      h.user = await makeUser(role);
      const before = await tableCounts();
      const { status, body } = await json(await POST(uploadRequest({ kind: 'cohort', name: 'x' }, COHORT)));
      expect(status).toBe(403);
      expect(body.code).toBe('forbidden:datasets:upload');
      expect(await tableCounts()).toEqual(before);
    }
    h.user = analyst;
  });
  it('an anonymous request gets 401', async () => {
    h.user = null;
    const res = await POST(uploadRequest({ kind: 'cohort' }, COHORT));
    expect(res.status).toBe(401);
    h.user = analyst;
  });
});

describe('an accepted cohort file', () => {
  let id: number;
  it('answers 201 with id, kind, segments, rows, sha256 and warnings, and stores file, hash and rows together', async () => {
    const before = await tableCounts();
    const { status, body } = await json(await POST(uploadRequest({ kind: 'cohort', name: 'Cohorts 2015-2017', description: 'test' }, COHORT, 'cohorts.csv')));
    expect(status, JSON.stringify(body)).toBe(201);
    id = body.id;
    expect(body.kind).toBe('cohort');
    expect(body.segments).toEqual(['Corp B', 'Retail A']);
    expect(body.rows).toBe(5);
    // SHA-256 of the bytes sent, computed here with node:crypto.
    expect(body.sha256).toBe(createHash('sha256').update(COHORT).digest('hex'));
    // Corp B has 25 and 28 obligors: below the tiny-cohort threshold of 30 (lines 5 and 6).
    const tiny = body.warnings.filter((w: { rule: string }) => w.rule === 'tiny-cohort').map((w: { row: number }) => w.row);
    expect(tiny).toEqual([5, 6]);
    const after = await tableCounts();
    expect(after.datasets).toBe(before.datasets + 1);
    expect(after.cohortRows).toBe(before.cohortRows + 5);
    expect(after.reports).toBe(before.reports + 1);
    const pieces = await getDb().select().from(datasetFiles).where(eq(datasetFiles.datasetId, id)).orderBy(datasetFiles.seq);
    expect(gunzipSync(Buffer.concat(pieces.map((p) => p.data))).toString('utf8')).toBe(COHORT);
    const rows = await getDb().select().from(cohortRows).where(eq(cohortRows.datasetId, id));
    const retail2016 = rows.find((r) => r.period === 2016 && r.sourceLine === 3);
    expect(retail2016).toMatchObject({ obligors: 1040, defaults: 20 });
  });

  it('the same bytes again are refused with 409 naming the existing dataset, and nothing is stored', async () => {
    const before = await tableCounts();
    const { status, body } = await json(await POST(uploadRequest({ kind: 'cohort', name: 'again' }, COHORT)));
    expect(status).toBe(409);
    expect(body.code).toBe('conflict:duplicate-upload');
    expect(body.datasetId).toBe(id);
    expect(body.message).toContain(`dataset ${id}`);
    expect(await tableCounts()).toEqual(before);
  });

  it('is listed and readable, with its segment histories', async () => {
    const list = await json(await listRoute());
    expect(list.body.datasets.some((d: { id: number }) => d.id === id)).toBe(true);
    const { body } = await json(await getRoute(new Request('http://x'), paramsOf({ id: String(id) })));
    const retail = body.dataset.segments.find((s: { name: string }) => s.name === 'Retail A');
    expect(retail.rows.map((r: { period: number; defaults: number }) => [r.period, r.defaults])).toEqual([
      [2015, 12],
      [2016, 20],
      [2017, 9],
    ]);
    expect(JSON.stringify(body)).not.toContain('password');
  });

  it('an unknown or malformed id is a 404', async () => {
    expect((await getRoute(new Request('http://x'), paramsOf({ id: '999999' }))).status).toBe(404);
    expect((await getRoute(new Request('http://x'), paramsOf({ id: 'abc' }))).status).toBe(404);
  });

  it('downloads as segment,period,obligors,defaults with the conventions in comment lines', async () => {
    const text = await (await cohortsCsv(new Request('http://x/cohorts.csv'), paramsOf({ id: String(id) }))).text();
    const lines = text.split('\r\n');
    expect(lines.filter((l) => l.startsWith('# ')).some((l) => l.includes('Conventions: Cohort counts as uploaded'))).toBe(true);
    const data = lines.filter((l) => l && !l.startsWith('#'));
    expect(data[0]).toBe('segment,period,obligors,defaults');
    expect(data).toContain('Retail A,2016,1040,20');
    expect(data).toHaveLength(6);
    const plain = await (await cohortsCsv(new Request('http://x/cohorts.csv?comments=0'), paramsOf({ id: String(id) }))).text();
    expect(plain.startsWith('segment,period,obligors,defaults\r\n')).toBe(true);
  });

  it('downloads one segment\'s rows (the table of its history), and names a segment it does not have', async () => {
    const res = await cohortsCsv(new Request('http://x/cohorts.csv?comments=0&segment=Retail%20A'), paramsOf({ id: String(id) }));
    expect(res.headers.get('content-disposition')).toContain(`dataset-${id}-cohorts-Retail_A.csv`);
    expect((await res.text()).trim().split('\r\n')).toEqual(['segment,period,obligors,defaults', 'Retail A,2015,1000,12', 'Retail A,2016,1040,20', 'Retail A,2017,1100,9']);
    const missing = await cohortsCsv(new Request('http://x/cohorts.csv?segment=Nowhere'), paramsOf({ id: String(id) }));
    expect(missing.status).toBe(404);
    expect((await missing.json()).message).toBe(`Dataset ${id} has no segment “Nowhere”.`);
  });

  it('warnings can be waived with a reason; errors and unknown rules cannot, and a short reason is refused', async () => {
    const waive = (body: unknown) => waiveRoute(new Request('http://x', { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify(body) }), paramsOf({ id: String(id) }));
    expect((await waive({ rule: 'tiny-cohort', reason: 'ok' })).status).toBe(422);
    const bad = await json(await waive({ rule: 'defaults-exceed-obligors', reason: 'not a warning of this dataset' }));
    expect(bad.status).toBe(422);
    expect(bad.body.code).toBe('invalid:waiver');
    const good = await json(await waive({ rule: 'tiny-cohort', reason: 'Corporate B is a small pilot book; kept for completeness.' }));
    expect(good.status).toBe(201);
    expect(good.body.waivers).toEqual([expect.objectContaining({ rule: 'tiny-cohort', by: analyst.name })]);
    expect((await waive({ rule: 'tiny-cohort', reason: 'a second time for the same rule' })).status).toBe(409);
    h.user = await makeUser('viewer');
    expect((await waive({ rule: 'few-periods', reason: 'viewers cannot waive anything' })).status).toBe(403);
    h.user = analyst;
  });

  it('cannot be deleted while something refers to it (409 with a sentence), and can be once that is gone', async () => {
    const db = getDb();
    // A stand-in for fit_runs / assumption versions: a foreign key ON DELETE RESTRICT to datasets.id.
    await db.execute(sql`CREATE TABLE IF NOT EXISTS h4_refs (id INT PRIMARY KEY, dataset_id BIGINT NOT NULL, FOREIGN KEY (dataset_id) REFERENCES datasets(id) ON DELETE RESTRICT)`);
    await db.execute(sql`INSERT INTO h4_refs VALUES (1, ${id})`);
    h.user = otherAnalyst;
    expect((await deleteRoute(new Request('http://x'), paramsOf({ id: String(id) }))).status).toBe(403);
    h.user = analyst;
    const refused = await json(await deleteRoute(new Request('http://x'), paramsOf({ id: String(id) })));
    expect(refused.status).toBe(409);
    expect(refused.body.code).toBe('conflict:dataset-in-use');
    expect(refused.body.message).toMatch(/a fit or an assumption refers to it/);
    expect((await db.select().from(datasets).where(eq(datasets.id, id))).length).toBe(1);
    await db.execute(sql`DROP TABLE h4_refs`);
    expect((await deleteRoute(new Request('http://x'), paramsOf({ id: String(id) }))).status).toBe(204);
    expect((await db.select().from(cohortRows).where(eq(cohortRows.datasetId, id))).length).toBe(0);
    // The report stays, detached, for the record.
    const reports = await db.select().from(uploadReports).where(eq(uploadReports.sha256, createHash('sha256').update(COHORT).digest('hex')));
    expect(reports.some((r) => r.status === 'accepted' && r.datasetId === null)).toBe(true);
  });
});

describe('vintage files are converted to annual cohorts by observation year', () => {
  it('counts January actives and the year\'s defaults, and lists the incomplete year as censored', async () => {
    // One vintage originated 2015-12: month on book 1 is January 2016. 100 loans, one default a month,
    // observed for 18 months (to June 2017). By hand: 2016 = 100 obligors (mob 1), 12 defaults
    // (mob 1-12); 2017 is observed only to June, so it is censored.
    let csv = 'segment,vintage,months_on_book,active,defaults\n';
    for (let m = 1; m <= 18; m++) csv += `Auto V,2015-12,${m},${101 - m},1\n`;
    const { status, body } = await json(await POST(uploadRequest({ kind: 'vintage', name: 'Vintages' }, csv)));
    expect(status, JSON.stringify(body)).toBe(201);
    expect(body.rows).toBe(1);
    const { body: d } = await json(await getRoute(new Request('http://x'), paramsOf({ id: String(body.id) })));
    expect(d.dataset.segments[0].rows).toEqual([{ period: 2016, obligors: 100, defaults: 12, sourceLine: null, defaultDefinition: null }]);
    expect(d.dataset.censored).toEqual([expect.objectContaining({ segment: 'Auto V', vintage: '2015-12', year: 2017 })]);
    expect(d.dataset.conventions.text).toMatch(/observation year/);
    const text = await (await cohortsCsv(new Request('http://x'), paramsOf({ id: String(body.id) }))).text();
    expect(text).toMatch(/# {3}Auto V \| vintage 2015-12 \| year 2017 \| observation ends at month on book 18 \(2017-06\)/);
  });
});

describe('loan tapes are stored at once and converted by the worker job', () => {
  // By hand (cohort method, reference date 1 January, exits stay, as-of 2017-12-31):
  //   2015: L1, L2 performing on 2015-01-01 -> 2 obligors; L2 defaults 2015-07-01 -> 1 default
  //   2016: L1, L3, L4 -> 3 obligors (L3 exits 2016-02-01 but stays); L4 defaults 2016-12-31 -> 1
  //   2017: L1, L5 (started 2016-01-01, not before 2016-01-01, so first counted in 2017) -> 2, 0 defaults
  const TAPE =
    'loan_id,segment,start_date,default_date,exit_date\n' +
    'L1,Auto L,2014-05-01,,\n' +
    'L2,Auto L,2014-06-01,2015-07-01,\n' +
    'L3,Auto L,2015-03-01,,2016-02-01\n' +
    'L4,Auto L,2015-09-09,2016-12-31,\n' +
    'L5,Auto L,2016-01-01,,\n';

  it('answers 202 processing, then the job writes the cohort rows worked out by hand', async () => {
    const before = await tableCounts();
    const { status, body } = await json(await POST(uploadRequest({ kind: 'loans', name: 'Tape', asOf: '2017-12-31' }, TAPE)));
    expect(status, JSON.stringify(body)).toBe(202);
    expect(body.status).toBe('processing');
    const mid = await tableCounts();
    expect(mid.datasets).toBe(before.datasets + 1);
    expect(mid.cohortRows).toBe(before.cohortRows);
    const result = await runConversion(body.jobId);
    expect(result).toMatchObject({ status: 'accepted', rows: 3 });
    const { body: d } = await json(await getRoute(new Request('http://x'), paramsOf({ id: String(body.id) })));
    expect(d.dataset.status).toBe('ready');
    expect(d.dataset.segments[0].rows.map((r: { period: number; obligors: number; defaults: number }) => [r.period, r.obligors, r.defaults])).toEqual([
      [2015, 2, 1],
      [2016, 3, 1],
      [2017, 2, 0],
    ]);
    expect(d.dataset.conventions).toMatchObject({ exitConvention: 'exits-stay', asOf: '2017-12-31', asOfSource: 'given' });
  });

  it('with exits removed, the loan that exits in 2016 leaves that year\'s cohort (same bytes, other convention: a new dataset)', async () => {
    const { status, body } = await json(await POST(uploadRequest({ kind: 'loans', name: 'Tape 2', asOf: '2017-12-31', exitConvention: 'exits-removed' }, TAPE)));
    expect(status, JSON.stringify(body)).toBe(202);
    await runConversion(body.jobId);
    const { body: d } = await json(await getRoute(new Request('http://x'), paramsOf({ id: String(body.id) })));
    expect(d.dataset.segments[0].rows.map((r: { period: number; obligors: number }) => [r.period, r.obligors])).toEqual([
      [2015, 2],
      [2016, 2],
      [2017, 2],
    ]);
  });

  it('a tape with row errors is rejected by the job: the dataset and its file are removed, the report stays', async () => {
    const bad =
      'loan_id,segment,start_date,default_date,exit_date\n' +
      'M1,Auto M,2015-01-10,,\n' +
      'M2,Auto M,2015-02-30,,\n' + // line 3: not a calendar date
      'M3,Auto M,2016-05-01,2016-01-01,\n' + // line 4: default before start
      'M1,Auto M,2015-03-01,,\n'; // line 5: duplicate loan_id
    const before = await tableCounts();
    const { status, body } = await json(await POST(uploadRequest({ kind: 'loans', name: 'Bad tape' }, bad)));
    expect(status).toBe(202);
    const result = await runConversion(body.jobId);
    expect(result).toMatchObject({ status: 'rejected' });
    const after = await tableCounts();
    expect(after.datasets).toBe(before.datasets);
    expect(after.cohortRows).toBe(before.cohortRows);
    expect(after.files).toBe(before.files);
    const { status: rs, body: rep } = await json(await reportRoute(new Request('http://x'), paramsOf({ reportId: String(body.reportId) })));
    expect(rs).toBe(200);
    expect(rep.report.status).toBe('rejected');
    const rules = rep.report.issues.filter((i: { severity: string }) => i.severity === 'error').map((i: { rule: string; row: number }) => [i.rule, i.row]);
    expect(rules).toEqual(
      expect.arrayContaining([
        ['date-unparseable', 3],
        ['default-before-start', 4],
        ['duplicate-loan-id', 5],
      ]),
    );
    // Another analyst may not see a rejected upload's report.
    h.user = otherAnalyst;
    expect((await reportRoute(new Request('http://x'), paramsOf({ reportId: String(body.reportId) }))).status).toBe(404);
    h.user = analyst;
  });
});

describe('supersede', () => {
  it('links an older dataset to a newer one; neither is edited; a second supersede is refused', async () => {
    const a = await json(await POST(uploadRequest({ kind: 'cohort', name: 'v1' }, 'segment,period,obligors,defaults\nS,2015,500,5\nS,2016,510,6\n')));
    const b = await json(
      await POST(uploadRequest({ kind: 'cohort', name: 'v2', supersedes: String(a.body.id) }, 'segment,period,obligors,defaults\nS,2015,500,5\nS,2016,510,7\n')),
    );
    expect(b.status).toBe(201);
    const older = await json(await getRoute(new Request('http://x'), paramsOf({ id: String(a.body.id) })));
    expect(older.body.dataset.supersededBy).toEqual({ id: b.body.id, name: 'v2' });
    expect(older.body.dataset.segments[0].rows[1].defaults).toBe(6);
    const c = await json(await POST(uploadRequest({ kind: 'cohort', name: 'v3' }, 'segment,period,obligors,defaults\nS,2015,500,5\nS,2016,510,8\n')));
    const again = await json(
      await supersedeRoute(new Request('http://x', { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ by: c.body.id }) }), paramsOf({ id: String(a.body.id) })),
    );
    expect(again.status).toBe(422);
    expect(again.body.message).toMatch(/already superseded/);
    const ok = await json(
      await supersedeRoute(new Request('http://x', { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ by: c.body.id }) }), paramsOf({ id: String(b.body.id) })),
    );
    expect(ok.status).toBe(200);
    expect(ok.body.dataset.supersededBy.id).toBe(c.body.id);
  });
});
