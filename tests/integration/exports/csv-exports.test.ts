/**
 * Every CSV export of the app, fed with text that spreadsheets would run as formulas (dataset and
 * file names, segment names, notes, decision comments), must give no cell a spreadsheet could
 * evaluate, however it splits the file (OWASP, "CSV Injection"). The routes run for real against
 * MariaDB; only the session lookup is replaced.
 */
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import Papa from 'papaparse';
import { closeDb } from '@/db/connection';
import type { SessionUser } from '@/lib/auth/guard';
import { todayIso } from '@/lib/assumptions/dates';
import { createDraft, transition } from '@/lib/dal/assumptions';
import { createToken } from '@/lib/dal/tokens';
import { POST as uploadRoute } from '@/app/api/datasets/route';
import { GET as cohortsCsv } from '@/app/api/datasets/[id]/cohorts.csv/route';
import { GET as datasetReportCsv } from '@/app/api/datasets/[id]/report.csv/route';
import { GET as uploadReportCsv } from '@/app/api/datasets/reports/[reportId]/report.csv/route';
import { GET as libraryCsv } from '@/app/api/assumptions/export/route';
import { GET as consumerCsv } from '@/app/api/v1/assumptions/export/route';
import { GET as auditCsv } from '@/app/api/assumptions/[id]/audit/route';
import { makeUser } from '../../support/users';
import { draftBody, makeFitRun } from '../../support/assumptions';
import { liveCells } from '../../support/csv-cells';
import { paramsOf, uploadRequest } from '../datasets/support';

vi.mock('@/lib/auth/session', () => import('../../support/mock-session'));
import { session } from '../../support/mock-session';

const EVIL_LINK = '=HYPERLINK("http://evil.example/phish","Open")';
const DATASET_NAME = `Q4 book,${EVIL_LINK},@SUM(1+1)`;
const FILE_NAME = 'q4,=HYPERLINK(1);@SUM(2).csv';
const COHORT =
  'segment,period,obligors,defaults,note\n' +
  `"${EVIL_LINK.replace(/"/g, '""')}",2015,1000,12,"ok, -2+3"\n` +
  `"${EVIL_LINK.replace(/"/g, '""')}",2016,1040,20,@SUM(1)\n` +
  `"${EVIL_LINK.replace(/"/g, '""')}",2017,1100,9,+cmd\n`;
const SEGMENT = `-2+3,${EVIL_LINK} ${Date.now().toString(36)}`;

let analyst: SessionUser;
let validator: SessionUser;
let admin: SessionUser;
let datasetId = 0;
let reportId = 0;
let versionId = 0;
let token = '';

/** The status and the text of an answer (Response.text() drops a byte order mark; `bom` says whether there was one). */
async function text(res: Response): Promise<{ status: number; body: string; bom: boolean }> {
  const bytes = new Uint8Array(await res.arrayBuffer());
  const bom = bytes[0] === 0xef && bytes[1] === 0xbb && bytes[2] === 0xbf;
  return { status: res.status, body: new TextDecoder().decode(bytes), bom };
}

beforeAll(async () => {
  analyst = await makeUser('analyst');
  validator = await makeUser('validator');
  admin = await makeUser('admin');
  session.user = analyst;
  const res = await uploadRoute(uploadRequest({ kind: 'cohort', name: DATASET_NAME, description: '@SUM(1)' }, COHORT, FILE_NAME));
  const body = (await res.json()) as { id: number; reportId: number };
  expect(res.status, JSON.stringify(body)).toBe(201);
  datasetId = body.id;
  reportId = body.reportId;

  const { fitId } = await makeFitRun(analyst.id, SEGMENT);
  const today = todayIso();
  const v = await createDraft(analyst, draftBody(fitId, SEGMENT, { effectiveDate: today, limitations: 'Only with the PD; =cmd' }) as never);
  versionId = v.id;
  await transition(analyst, v.id, { action: 'submit', comment: '+1 ready' });
  await transition(validator, v.id, { action: 'start-review' });
  await transition(validator, v.id, { action: 'approve', comment: `Checked; ${EVIL_LINK}\n@SUM(1)` });
  await transition(validator, v.id, { action: 'publish' });
  token = (await createToken(admin, { name: 'Export check', scopes: ['assumptions:read', 'assumptions:export'] })).token;
});
afterAll(async () => {
  session.user = null;
  await closeDb();
});

describe('no export gives a spreadsheet a live cell', () => {
  it('the cohort rows with their comment lines (dataset and file names, conventions)', async () => {
    session.user = analyst;
    const { status, body } = await text(await cohortsCsv(new Request('http://x/cohorts.csv'), paramsOf({ id: String(datasetId) })));
    expect(status).toBe(200);
    // The names are there, neutralised, and the comment lines are still comment lines.
    expect(body).toContain("# Rhobook dataset");
    expect(body).toContain(`Q4 book,'=HYPERLINK`);
    expect(liveCells(body)).toEqual([]);
    const data = Papa.parse<string[]>(body, { comments: '#', newline: '\r\n', skipEmptyLines: true }).data;
    expect(data[0]).toEqual(['segment', 'period', 'obligors', 'defaults']);
    expect(data.slice(1).map((r) => r[0])).toEqual([`'${EVIL_LINK}`, `'${EVIL_LINK}`, `'${EVIL_LINK}`]);
  });

  it('the validation report of the dataset and of the upload', async () => {
    session.user = analyst;
    for (const res of [
      await datasetReportCsv(new Request('http://x/report.csv'), paramsOf({ id: String(datasetId) })),
      await uploadReportCsv(new Request('http://x/report.csv'), paramsOf({ reportId: String(reportId) })),
    ]) {
      const { status, body } = await text(res);
      expect(status).toBe(200);
      expect(body).toContain('formula-like-text');
      expect(liveCells(body)).toEqual([]);
    }
  });

  it('the library for a signed-in user and for an API token', async () => {
    session.user = analyst;
    const signedIn = await text(await libraryCsv(new Request('http://x/export')));
    const signedInPlain = await text(await libraryCsv(new Request('http://x/export?comments=0')));
    session.user = null;
    const auth = { headers: { authorization: `Bearer ${token}` } };
    const byToken = await text(await consumerCsv(new Request('http://x/export', auth)));
    const byTokenPlain = await text(await consumerCsv(new Request('http://x/export?comments=0', auth)));
    for (const { status, body, bom } of [signedIn, byToken]) {
      expect(status).toBe(200);
      expect(bom).toBe(true);
      // The cautions travel with the values, as comment lines a reader skips (comment='#').
      expect(body.startsWith('# Rhobook correlation library. Read these values with care:')).toBe(true);
      expect(body).toContain('# 5. An estimated correlation does not replace the supervisory correlation in Pillar 1 own-funds requirements');
      expect(body).toContain('# 6. Capital K shown beside a correlation is an illustration at the LGD and maturity stated with it, not regulatory capital.');
      expect(body).toContain("the institution's model-risk policy, supervisory requirements or qualified professional judgement.");
      const data = Papa.parse<string[]>(body, { comments: '#', newline: '\r\n', skipEmptyLines: true }).data;
      expect(data[0].slice(0, 3)).toEqual(['segment', 'version', 'value']);
      expect(body).toContain(`'-2+3,'=HYPERLINK`);
      expect(liveCells(body)).toEqual([]);
    }
    for (const { status, body } of [signedInPlain, byTokenPlain]) {
      expect(status).toBe(200);
      expect(body.startsWith('segment,version,value')).toBe(true);
    }
  });

  it('the audit trail with its decision comments', async () => {
    session.user = validator;
    const { status, body } = await text(await auditCsv(new Request('http://x/audit'), paramsOf({ id: String(versionId) })));
    expect(status).toBe(200);
    expect(body).toContain(`Checked;'`);
    expect(body).toContain(`'+1 ready`);
    expect(liveCells(body)).toEqual([]);
  });
});
