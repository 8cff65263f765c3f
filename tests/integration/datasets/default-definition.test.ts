import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { closeDb } from '@/db/connection';
import { todayIso } from '@/lib/assumptions/dates';
import { createDraft, getVersion, transition } from '@/lib/dal/assumptions';
import { getDataset } from '@/lib/dal/datasets';
import { getFit } from '@/lib/dal/fits';
import { createToken } from '@/lib/dal/tokens';
import * as uploadRoute from '@/app/api/datasets/route';
import * as inForceRoute from '@/app/api/v1/assumptions/route';
import * as exportRoute from '@/app/api/v1/assumptions/export/route';
import { makeUser } from '../../support/users';
import { call, draftBody, makeFitRun, type SessionUser } from '../../support/assumptions';
import { uploadRequest } from './support';

vi.mock('@/lib/auth/session', () => import('../../support/mock-session'));
import { session } from '../../support/mock-session';

// DESIGN.md "Cautions": a rho is valid only with the PD and the definition of default it was fitted
// on. The definition travels upload -> dataset page -> fit -> assumption -> API -> CSV.
let analyst: SessionUser;
let validator: SessionUser;
let admin: SessionUser;
const tag = Date.now().toString(36);

beforeAll(async () => {
  analyst = await makeUser('analyst');
  validator = await makeUser('validator');
  admin = await makeUser('admin');
});
afterAll(async () => {
  await closeDb();
});

async function upload(fields: Record<string, string>, csv: string) {
  session.user = analyst;
  try {
    const res = await uploadRoute.POST(uploadRequest({ kind: 'cohort', ...fields }, csv, `definitions-${tag}.csv`));
    return { status: res.status, body: (await res.json()) as Record<string, unknown> };
  } finally {
    session.user = null;
  }
}

const years = (from: number, n: number) => Array.from({ length: n }, (_, i) => from + i);

describe('the definition of default from the upload to the API', () => {
  it('a change across the years is a warning at upload; a fit and an assumption over it carry the mix and say so in their cautions, through the API and the CSV', async () => {
    const seg = `Definition mix ${tag}`;
    const csv =
      'segment,period,obligors,defaults,default_definition\n' +
      years(2010, 8)
        .map((y) => `${seg},${y},${2000 + y},${(y * 7) % 23 + 5},${y < 2013 ? '120 days past due' : '90 days past due'}`)
        .join('\n') +
      '\n';
    const up = await upload({ name: `Definitions ${tag}` }, csv);
    expect(up.status).toBe(201);
    const warnings = up.body.warnings as { rule: string; row: number | null; message: string }[];
    const change = warnings.find((w) => w.rule === 'default-definition-change')!;
    expect(change.row).toBe(5);
    expect(change.message).toContain('120 days past due (2010-2012); 90 days past due (2013-2017)');

    const datasetId = up.body.id as number;
    const page = await getDataset(analyst, datasetId);
    expect(page.segments[0].definitions.map((s) => [s.definition, s.from, s.to])).toEqual([
      ['120 days past due', '2010', '2012'],
      ['90 days past due', '2013', '2017'],
    ]);

    // A fit over 2011-2017 and an assumption drafted from it.
    const fit = await makeFitRun(analyst.id, seg, undefined, { dataset: { id: datasetId, sha256: up.body.sha256 as string }, periods: years(2011, 7).map(String) });
    const f = await getFit(analyst, fit.fitId);
    // The test fit's request has no window: the dataset's years 2010-2017 are read.
    expect(f.defaultDefinitions[0].spans.map((s) => s.definition)).toEqual(['120 days past due', '90 days past due']);

    const v = await createDraft(analyst, draftBody(fit.fitId, seg) as never);
    expect(v.defaultDefinitions!.map((s) => [s.definition, s.from, s.to])).toEqual([
      ['120 days past due', '2011', '2012'],
      ['90 days past due', '2013', '2017'],
    ]);
    await transition(analyst, v.id, { action: 'submit' });
    await transition(validator, v.id, { action: 'start-review' });
    await transition(validator, v.id, { action: 'approve', comment: 'Checked; the change of definition is covered by the data margin.' });
    await transition(validator, v.id, { action: 'publish' });
    expect((await getVersion(analyst, v.id)).status).toBe('published');

    const { token } = await createToken(admin, { name: `Definitions ${tag}`, scopes: ['assumptions:read', 'assumptions:export'] });
    const res = await call(inForceRoute.GET, { url: `http://127.0.0.1/api/v1/assumptions?segment=${encodeURIComponent(seg)}`, headers: { authorization: `Bearer ${token}` } });
    expect(res.status).toBe(200);
    const a = res.body.assumption as { defaultDefinition: { text: string; mixed: boolean }; cautions: string[] };
    expect(a.defaultDefinition).toMatchObject({ text: '120 days past due (2011-2012); 90 days past due (2013-2017)', mixed: true });
    expect(a.cautions[0]).toMatch(/^The data behind this value mix definitions of default across the years/);
    expect(res.body.cautions as string[]).toContain(a.cautions[0]);

    // without the cautions' '# ' lines above the header
    const csvRes = await call(exportRoute.GET, { url: 'http://127.0.0.1/api/v1/assumptions/export?comments=0', headers: { authorization: `Bearer ${token}` } });
    const lines = csvRes.text.replace(/^\ufeff/, '').trim().split('\r\n');
    const header = lines[0].split(',');
    const col = header.indexOf('default_definition');
    expect(col).toBeGreaterThan(0);
    const row = lines.find((l) => l.startsWith(`${seg},`))!;
    expect(row).toContain('"120 days past due (2011-2012); 90 days past due (2013-2017)"');
  });

  it('a file without the column takes the definition given at upload, for every row; one definition is no caution', async () => {
    const seg = `Definition field ${tag}`;
    const csv = 'segment,period,obligors,defaults\n' + years(2015, 6).map((y) => `${seg},${y},1500,${y - 2000}`).join('\n') + '\n';
    const up = await upload({ name: `Definition field ${tag}`, defaultDefinition: '90 days past due or unlikely to pay' }, csv);
    expect(up.status).toBe(201);
    expect((up.body.warnings as { rule: string }[]).filter((w) => w.rule.startsWith('default-definition'))).toEqual([]);
    const page = await getDataset(analyst, up.body.id as number);
    expect(page.defaultDefinition).toBe('90 days past due or unlikely to pay');
    expect(page.segments[0].rows.every((r) => r.defaultDefinition === '90 days past due or unlikely to pay')).toBe(true);
    const fit = await makeFitRun(analyst.id, seg, undefined, { dataset: { id: up.body.id as number, sha256: up.body.sha256 as string }, periods: years(2015, 6).map(String) });
    const v = await createDraft(analyst, draftBody(fit.fitId, seg, { effectiveDate: todayIso() }) as never);
    expect(v.defaultDefinitions).toEqual([{ definition: '90 days past due or unlikely to pay', from: '2015', to: '2020', periods: years(2015, 6).map(String) }]);
  });
});
