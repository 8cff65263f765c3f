/**
 * Bad files through the real route handler (POST /api/datasets), against the test database: each
 * must answer with the right status, name the rule and the physical line (header = line 1), and
 * write no dataset, no cohort row and no stored file (only the rejected upload's report).
 * The rules and line numbers expected here are those of DESIGN.md "Data the user brings"; the
 * lines are counted by hand in each file below.
 */
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import type { SessionUser } from '@/lib/auth/guard';

vi.hoisted(() => {
  // A small limit so that "over the limit" needs only a little more than 1 MB of generated data.
  process.env.UPLOAD_MAX_BYTES = String(1024 * 1024);
});
vi.mock('@/lib/auth/session', () => import('../../support/mock-session'));
import { session as h } from '../../support/mock-session';

import { count } from 'drizzle-orm';
import { closeDb, getDb } from '@/db/connection';
import { jobs } from '@/db/schema';
import { cancelJob } from '@/lib/jobs/queue';
import { POST } from '@/app/api/datasets/route';
import { GET as getReportCsv } from '@/app/api/datasets/reports/[reportId]/report.csv/route';
import { makeUser } from '../../support/users';
import { paramsOf, tableCounts, uploadRequest } from './support';

type Issue = { row: number | null; column: string | null; rule: string; severity: string; value: string | null; message: string };

let analyst: SessionUser;

beforeAll(async () => {
  analyst = await makeUser('analyst');
  h.user = analyst;
});
afterAll(async () => {
  await closeDb();
});

const COHORT_HEADER = 'segment,period,obligors,defaults';

/** Uploads, and checks: status 422 invalid:upload, the rule at the line, nothing but a report written. */
async function expectRejected(kind: string, content: string | Uint8Array, rule: string, row: number | null, column?: string | null) {
  const before = await tableCounts();
  const res = await POST(uploadRequest({ kind, name: `bad ${rule}` }, content));
  const body = await res.json();
  expect(res.status, JSON.stringify(body).slice(0, 500)).toBe(422);
  expect(body.code).toBe('invalid:upload');
  const hit = (body.issues as Issue[]).find((i) => i.rule === rule && i.severity === 'error');
  expect(hit, `no error ${rule} in ${JSON.stringify(body.issues).slice(0, 800)}`).toBeDefined();
  expect(hit!.row).toBe(row);
  if (column !== undefined) expect(hit!.column).toBe(column);
  expect(hit!.message.length).toBeGreaterThan(20);
  const after = await tableCounts();
  expect(after.datasets).toBe(before.datasets);
  expect(after.cohortRows).toBe(before.cohortRows);
  expect(after.files).toBe(before.files);
  expect(after.reports).toBe(before.reports + 1);
  expect(typeof body.reportId).toBe('number');
  return body as { issues: Issue[]; reportId: number; message: string };
}

describe('bad cohort files are refused with the rule and the line, and nothing is stored', () => {
  it('1. an empty file', async () => {
    await expectRejected('cohort', '', 'empty-file', null);
  });
  it('2. a header without rows', async () => {
    await expectRejected('cohort', COHORT_HEADER + '\n', 'no-data-rows', 1);
  });
  it('3. a missing column', async () => {
    await expectRejected('cohort', 'segment,period,obligors\nSME,2015,100\n', 'missing-column', 1, 'defaults');
  });
  it('4. text in a count', async () => {
    await expectRejected('cohort', `${COHORT_HEADER}\nSME,2015,100,3\nSME,2016,about 90,2\n`, 'not-a-number', 3, 'obligors');
  });
  it('5. a negative count', async () => {
    await expectRejected('cohort', `${COHORT_HEADER}\nSME,2015,100,3\nSME,2016,110,-2\n`, 'negative-count', 3, 'defaults');
  });
  it('6. defaults above obligors', async () => {
    await expectRejected('cohort', `${COHORT_HEADER}\nSME,2015,100,3\nSME,2016,110,2\nSME,2017,50,51\n`, 'defaults-exceed-obligors', 4, 'defaults');
  });
  it('7. the same period twice', async () => {
    await expectRejected('cohort', `${COHORT_HEADER}\nSME,2015,100,3\nSME,2016,110,2\nSME,2015,100,3\n`, 'duplicate-period', 4, 'period');
  });
  it('8. a semicolon file with decimal commas', async () => {
    await expectRejected('cohort', 'segment;period;obligors;defaults\nSME;2015;1200;3\nSME;2016;1180,5;2\n', 'non-integer-count', 3, 'obligors');
  });
  it('9. a rate column in place of the defaults count', async () => {
    await expectRejected('cohort', 'segment,period,obligors,default_rate\nSME,2015,100,0.03\n', 'rate-instead-of-count', 1, 'default_rate');
  });
  it('10. rates written into the defaults column', async () => {
    await expectRejected('cohort', `${COHORT_HEADER}\nSME,2015,1000,0.025\n`, 'rate-instead-of-count', 2, 'defaults');
  });
  it('11. a percentage in the defaults column', async () => {
    await expectRejected('cohort', `${COHORT_HEADER}\nSME,2015,1000,12\nSME,2016,1000,2.5%\n`, 'rate-instead-of-count', 3, 'defaults');
  });
  it('12. a ZIP workbook renamed .csv', async () => {
    const zip = new Uint8Array([0x50, 0x4b, 0x03, 0x04, 0x14, 0x00, 0x06, 0x00, 0x08, 0x00, 0x00, 0x00, 0x21, 0x00]);
    await expectRejected('cohort', zip, 'binary-content', 1);
  });
  it('13. binary data with NUL bytes', async () => {
    const bytes = Buffer.concat([Buffer.from(`${COHORT_HEADER}\nSME,2015,100,3\n`), Buffer.from([0x00, 0x01, 0x02, 0xff, 0x00])]);
    await expectRejected('cohort', new Uint8Array(bytes), 'binary-content', 3);
  });
  it('14. a Latin-1 file (not UTF-8)', async () => {
    const bytes = Buffer.concat([Buffer.from(`${COHORT_HEADER}\nSME,2015,100,3\nPr`), Buffer.from([0xea]), Buffer.from('ts,2015,100,3\n')]);
    await expectRejected('cohort', new Uint8Array(bytes), 'invalid-utf8', 3);
  });
  it('15. a UTF-16 file', async () => {
    const utf16 = Buffer.concat([Buffer.from([0xff, 0xfe]), Buffer.from(`${COHORT_HEADER}\n`, 'utf16le')]);
    await expectRejected('cohort', new Uint8Array(utf16), 'unsupported-encoding', 1);
  });
  it('16. mixed line endings with an error after the mixture (line numbers stay right)', async () => {
    const body = await expectRejected(
      'cohort',
      `${COHORT_HEADER}\r\nSME,2015,100,3\r\nSME,2016,110,2\nSME,2017,120,-1\r\n`,
      'negative-count',
      4,
      'defaults',
    );
    const mixed = body.issues.find((i) => i.rule === 'mixed-line-endings');
    expect(mixed?.severity).toBe('warning');
    expect(mixed?.row).toBe(3);
  });
  it('17. a row with too many fields', async () => {
    await expectRejected('cohort', `${COHORT_HEADER}\nSME,2015,100,3\nSME, small,2016,110,2\n`, 'too-many-fields', 3);
  });
  it('18. a row with too few fields', async () => {
    await expectRejected('cohort', `${COHORT_HEADER}\nSME,2015,100\n`, 'too-few-fields', 2);
  });
  it('19. a quote that is never closed', async () => {
    await expectRejected('cohort', `${COHORT_HEADER}\nSME,2015,100,3\n"SME,2016,110,2\n`, 'malformed-quotes', 3);
  });
  it('20. a monthly period in a cohort file', async () => {
    await expectRejected('cohort', `${COHORT_HEADER}\nSME,2015-03,100,3\n`, 'period-not-annual', 2, 'period');
  });
  it('21. a period that is not a year', async () => {
    await expectRejected('cohort', `${COHORT_HEADER}\nSME,last year,100,3\n`, 'period-unparseable', 2, 'period');
  });
  it('22. zero obligors', async () => {
    await expectRejected('cohort', `${COHORT_HEADER}\nSME,2015,0,0\n`, 'obligors-not-positive', 2, 'obligors');
  });
  it('23. an empty segment', async () => {
    await expectRejected('cohort', `${COHORT_HEADER}\nSME,2015,100,3\n,2016,100,3\n`, 'empty-segment', 3, 'segment');
  });
  it('24. counts with thousands separators', async () => {
    await expectRejected('cohort', `${COHORT_HEADER}\nSME,2015,"1,200",3\n`, 'thousands-separator', 2, 'obligors');
  });
  it('25. a tab-separated file', async () => {
    await expectRejected('cohort', 'segment\tperiod\tobligors\tdefaults\nSME\t2015\t100\t3\n', 'unsupported-delimiter', 1);
  });
  it('26. a column named twice', async () => {
    await expectRejected('cohort', 'segment,period,obligors,defaults,defaults\nSME,2015,100,3,3\n', 'duplicate-column', 1);
  });
  it('27. a segment name over 100 characters', async () => {
    await expectRejected('cohort', `${COHORT_HEADER}\n${'S'.repeat(101)},2015,100,3\n`, 'segment-too-long', 2, 'segment');
  });
  it('28. a count beyond any loan book', async () => {
    await expectRejected('cohort', `${COHORT_HEADER}\nSME,2015,99999999999999999999,3\n`, 'count-too-large', 2, 'obligors');
  });
  it('29. two spellings of one segment name (they would be merged by the database)', async () => {
    const body = await expectRejected('cohort', `${COHORT_HEADER}\nSME loans,2015,100,3\nsme LOANS,2016,100,3\n`, 'segment-name-clash', null, 'segment');
    expect(body.message).toMatch(/error/);
  });
});

describe('bad vintage files', () => {
  const V = 'segment,vintage,months_on_book,active,defaults';
  it('30. defaults above the active loans', async () => {
    await expectRejected('vintage', `${V}\nAuto,2016-01,1,100,1\nAuto,2016-01,2,99,120\n`, 'defaults-exceed-active', 3, 'defaults');
  });
  it('31. a vintage that is not a month', async () => {
    await expectRejected('vintage', `${V}\nAuto,2016-13,1,100,1\n`, 'vintage-unparseable', 2, 'vintage');
  });
  it('32. a month on book missing inside a vintage', async () => {
    await expectRejected('vintage', `${V}\nAuto,2016-01,1,100,1\nAuto,2016-01,2,99,0\nAuto,2016-01,4,98,0\n`, 'months-on-book-gap', 4, 'months_on_book');
  });
  it('33. a vintage file without the active column', async () => {
    await expectRejected('vintage', 'segment,vintage,months_on_book,defaults\nAuto,2016-01,1,1\n', 'missing-column', 1, 'active');
  });
  it('34. the same month on book twice', async () => {
    await expectRejected('vintage', `${V}\nAuto,2016-01,1,100,1\nAuto,2016-01,1,100,1\n`, 'duplicate-month', 3, 'months_on_book');
  });
  it('34a. vintages never observed for a full calendar year (found in QA: stored as an empty dataset)', async () => {
    const body = await expectRejected('vintage', `${V}\nAuto,2020-01,1,100,1\nAuto,2020-01,2,99,0\nAuto,2020-01,3,99,1\n`, 'no-complete-cohort', null);
    expect(body.issues.find((i) => i.rule === 'no-complete-cohort')!.message).toMatch(/full calendar year/);
  });
});

describe('bad loan tapes refused at upload (header-level problems; row-level ones go to the conversion job)', () => {
  it('35. a loan tape without the exit_date column', async () => {
    await expectRejected('loans', 'loan_id,segment,start_date,default_date\nL1,Auto,2015-03-01,\n', 'missing-column', 1, 'exit_date');
  });
  it('36. an empty loan tape', async () => {
    await expectRejected('loans', '', 'empty-file', null);
  });
  it('37. a workbook sent as a loan tape', async () => {
    await expectRejected('loans', new Uint8Array([0x50, 0x4b, 0x03, 0x04, 0, 0, 0, 0]), 'binary-content', 1);
  });
  it('37a. a loan tape with a header only (blank lines after it) is refused at upload, no job is queued', async () => {
    const [{ n: jobsBefore }] = await getDb().select({ n: count() }).from(jobs);
    await expectRejected('loans', 'loan_id,segment,start_date,default_date,exit_date\r\n\r\n\r\n', 'no-data-rows', 1);
    const [{ n: jobsAfter }] = await getDb().select({ n: count() }).from(jobs);
    expect(jobsAfter).toBe(jobsBefore);
  });
  it('37b. a valid loan tape of about 0.5 MB (many read chunks) is not refused by the header check (found in QA)', async () => {
    let tape = 'loan_id,segment,start_date,default_date,exit_date\n';
    for (let i = 1; i <= 15_000; i++) tape += `Q${i},Chunked seg,2014-0${1 + (i % 9)}-1${i % 10},,\n`;
    const res = await POST(uploadRequest({ kind: 'loans', name: 'big enough' }, tape));
    const body = await res.json();
    expect(res.status, JSON.stringify(body).slice(0, 400)).toBe(202);
    await cancelJob(getDb(), body.jobId);
  });
});

describe('files over the size limit (UPLOAD_MAX_BYTES = 1 MB here)', () => {
  it('38. a declared 200 MB body is refused with 413 before a byte is read', async () => {
    const before = await tableCounts();
    let pulled = 0;
    const stream = new ReadableStream<Uint8Array>({
      pull(c) {
        pulled += 65536;
        c.enqueue(new Uint8Array(65536));
      },
    });
    const req = new Request('http://127.0.0.1/api/datasets', {
      method: 'POST',
      body: stream,
      headers: { 'content-type': 'multipart/form-data; boundary=x', 'content-length': String(200 * 1024 * 1024) },
      duplex: 'half',
    } as RequestInit);
    const res = await POST(req);
    expect(res.status).toBe(413);
    const body = await res.json();
    expect(body.code).toBe('too_large:upload');
    expect(body.message).toMatch(/limit of 1\.0 MB/);
    // Only what the stream buffered ahead (its high-water mark) may have been pulled: nothing read.
    expect(pulled).toBeLessThanOrEqual(65536);
    expect(await tableCounts()).toEqual(before);
  });

  it('39. a 200 MB file streamed without a Content-Length is cut off just past the limit', async () => {
    const before = await tableCounts();
    const boundary = 'rhobook-test-boundary';
    const head = new TextEncoder().encode(
      `--${boundary}\r\nContent-Disposition: form-data; name="kind"\r\n\r\ncohort\r\n--${boundary}\r\nContent-Disposition: form-data; name="file"; filename="huge.csv"\r\nContent-Type: text/csv\r\n\r\n${COHORT_HEADER}\n`,
    );
    const line = new TextEncoder().encode('SME term loans,2015,100000,2500\n'.repeat(2048));
    const total = 200 * 1024 * 1024;
    let sent = 0;
    let first = true;
    const stream = new ReadableStream<Uint8Array>({
      pull(c) {
        if (first) {
          first = false;
          c.enqueue(head);
          return;
        }
        if (sent >= total) {
          c.enqueue(new TextEncoder().encode(`\r\n--${boundary}--\r\n`));
          c.close();
          return;
        }
        sent += line.byteLength;
        c.enqueue(line);
      },
    });
    const req = new Request('http://127.0.0.1/api/datasets', {
      method: 'POST',
      body: stream,
      headers: { 'content-type': `multipart/form-data; boundary=${boundary}` },
      duplex: 'half',
    } as RequestInit);
    const res = await POST(req);
    const body = await res.json();
    expect(res.status, JSON.stringify(body)).toBe(413);
    expect(body.code).toBe('too_large:upload');
    // Reading stopped soon after the limit: far from the 200 MB offered.
    expect(sent).toBeLessThan(4 * 1024 * 1024);
    expect(await tableCounts()).toEqual(before);
  });
});

describe('rows and headers over the limits (defaults: 65,536 characters a row, 1,000 columns)', () => {
  it('41. a row of 300,000 characters (line breaks lost) is refused naming its line, and nothing else is read', async () => {
    const glued = 'Retail A,2016,1000,12 '.repeat(14_000);
    const body = await expectRejected('cohort', `${COHORT_HEADER}\nRetail A,2015,1000,12\n${glued}\nRetail A,2017,1000,12\n`, 'line-too-long', 3);
    expect(body.issues.filter((i) => i.severity === 'error').map((i) => i.rule)).toEqual(['line-too-long']);
    expect(body.message).toMatch(/line 3, line-too-long/);
  });
  it('42. a quote never closed is refused at the line it opens on, not read to the end of the file', async () => {
    let text = `${COHORT_HEADER},note\nRetail A,2015,1000,12,"a note that never ends\n`;
    for (let y = 0; y < 4000; y++) text += `Retail A,${2016 + (y % 80)},1000,12,fine\n`;
    const body = await expectRejected('cohort', text, 'line-too-long', 2);
    expect(body.issues.find((i) => i.rule === 'line-too-long')!.message).toMatch(/never closed/);
  });
  it('43. a header of 1,200 columns is refused naming its line', async () => {
    const header = Array.from({ length: 1200 }, (_, i) => `c${i}`).join(',');
    await expectRejected('cohort', `${header}\n1,2,3\n`, 'too-many-columns', 1);
  });
  it('44. a loan tape whose header is too wide is refused at upload, before any job', async () => {
    const [{ n: jobsBefore }] = await getDb().select({ n: count() }).from(jobs);
    await expectRejected('loans', `loan_id,segment,start_date,default_date,exit_date${',x'.repeat(1000)}\nL1,A,2015-01-01,,\n`, 'too-many-columns', 1);
    const [{ n: jobsAfter }] = await getDb().select({ n: count() }).from(jobs);
    expect(jobsAfter).toBe(jobsBefore);
  });
});

describe('text from a file is neutralised in CSV exports', () => {
  it('40. a formula in a segment name is accepted with a warning, and neutralised in the report CSV', async () => {
    const res = await POST(
      uploadRequest(
        { kind: 'cohort', name: 'formula in a segment' },
        `${COHORT_HEADER}\n=HYPERLINK("http://evil.example";"x"),2015,100,3\n=HYPERLINK("http://evil.example";"x"),2016,100,-3\n`,
      ),
    );
    const body = await res.json();
    expect(res.status).toBe(422);
    const warn = (body.issues as Issue[]).find((i) => i.rule === 'formula-like-text');
    expect(warn?.row).toBe(2);
    expect(warn?.severity).toBe('warning');
    const csv = await (await getReportCsv(new Request('http://127.0.0.1/x'), paramsOf({ reportId: String(body.reportId) }))).text();
    expect(csv).toContain(`"'=HYPERLINK(""http://evil.example"";""x"")"`);
    expect(csv).not.toMatch(/(^|,)=HYPERLINK/m);
  });
});
