import { expect, test } from '@playwright/test';
import { keepScreenshot, signIn } from './helpers';

// Needs the seeded demo data and a running worker (npm test starts both). A fit that challenges the
// Gaussian copula with the t copula only (small B and R), requested through the fits API as a person
// would; its t-copula maximum drafted as a value, approved by a second person, published by the
// scheduler and read from the consumer API with its mixing law and nu. On the demo lender's credit
// cards and unsecured personal loans the t maximum has a finite nu (status ok).

test('a t-copula value: drafted from a fit with the challenge, approved by a second person, published and served with mixing law t and its nu', async ({ browser }, testInfo) => {
  test.setTimeout(360_000);
  const analystCtx = await browser.newContext();
  const analyst = await analystCtx.newPage();
  await signIn(analyst, 'analyst@fenmoor.example');
  const datasets = (await (await analyst.request.get('/api/datasets')).json()).datasets as { id: number; kind: string; status: string; name: string }[];
  const cohort = datasets.find((d) => d.kind === 'cohort' && d.status === 'ready' && d.name === 'Fenmoor Cooperative Bank: annual cohorts by segment');
  expect(cohort, 'the demo data has its cohort dataset').toBeTruthy();
  const library = (await (await analyst.request.get('/api/assumptions')).json()).library as { segment: string; pending: unknown }[];
  const busy = new Set(library.filter((e) => e.pending).map((e) => e.segment));
  const segment = ['Unsecured personal loans', 'Credit cards'].find((s) => !busy.has(s));
  expect(segment, 'a segment with no version on its way').toBeTruthy();
  const res = await analyst.request.post('/api/fits', {
    data: { datasetId: cohort!.id, segments: [segment], mixingLaws: { laws: ['t'], replications: 20, powerReplications: 20, seed: 5 } },
  });
  expect(res.status(), await res.text()).toBe(202);
  const fitId = (await res.json()).id as number;
  await expect
    .poll(async () => (await (await analyst.request.get(`/api/fits/${fitId}`)).json()).status, { timeout: 240_000, intervals: [1000, 2000] })
    .toBe('succeeded');
  const t = (await (await analyst.request.get(`/api/fits/${fitId}`)).json()).results.segments[0].estimates.tCopula as { status: string; nu: number };
  expect(t.status).toBe('ok');
  expect(t.nu).toBeGreaterThan(2);

  // The analyst drafts the t-copula maximum: the form names nu, its interval and what nu means for the tail.
  await analyst.goto(`/library/new?fitId=${fitId}&segment=${encodeURIComponent(segment!)}`);
  const form = analyst.getByRole('form', { name: 'Draft an assumption' });
  await expect(form.getByLabel('Fit and segment')).toHaveValue(`${fitId}|${segment}`);
  await form.getByLabel('Estimator').selectOption('tCopula');
  await expect(form.getByTestId('evidence-nu')).toContainText('mixing law: Student-t copula with nu');
  await expect(form.getByTestId('evidence-nu')).toContainText('A downstream model must use the t copula with this nu');
  await form.getByLabel('Rationale: Data and method deficiencies').fill('Fifteen annual cohorts only.');
  await form.getByLabel('Rationale: Changes in lending or recovery practice').fill('No change in underwriting over the window.');
  await form.getByLabel('Rationale: General estimation error').fill('nu is weakly identified by yearly counts.');
  await form.getByLabel('Intended uses').fill('Stress testing with the t copula.');
  await form.getByLabel('Limitations').fill('Valid only with the fitted PD, the t copula and this nu.');
  await keepScreenshot(analyst, testInfo, 'draft-t-copula');
  await form.getByRole('button', { name: 'Save draft' }).click();
  await expect(analyst).toHaveURL(/\/library\/versions\/\d+$/, { timeout: 60_000 });
  const versionUrl = analyst.url();
  await expect(analyst.getByTestId('mixing-law')).toContainText('Student-t copula (t) with nu');
  await expect(analyst.getByTestId('version-cautions')).toContainText('lower tail dependence of two obligors');
  await analyst.getByRole('button', { name: 'Submit for review', exact: true }).click();
  await expect(analyst.getByRole('heading', { level: 1 }).getByTestId('status-badge')).toHaveText('submitted', { timeout: 30_000 });

  // A second person, the validator, approves it; the scheduler publishes it on its effective date (today).
  const validatorCtx = await browser.newContext();
  const validator = await validatorCtx.newPage();
  await signIn(validator, 'validator@fenmoor.example');
  await validator.goto(versionUrl);
  await validator.getByRole('button', { name: 'Start review', exact: true }).click();
  await expect(validator.getByRole('heading', { level: 1 }).getByTestId('status-badge')).toHaveText('in review', { timeout: 30_000 });
  await validator.getByLabel(/^Comment/).fill('The t copula with this nu is recorded with the value; approved for stress testing.');
  await validator.getByRole('button', { name: 'Approve', exact: true }).click();
  const dialog = validator.getByRole('dialog', { name: new RegExp(`Approve ${segment} version`) });
  await expect(dialog.getByTestId('decision-facts')).toContainText('Student-t copula, nu');
  await dialog.getByRole('button', { name: 'Approve now' }).click();
  await expect(validator.getByRole('status').filter({ hasText: 'now approved' })).toBeVisible({ timeout: 30_000 });
  await expect
    .poll(
      async () => {
        await validator.reload();
        return validator.getByRole('heading', { level: 1 }).getByTestId('status-badge').textContent();
      },
      { timeout: 60_000, intervals: [2000] },
    )
    .toBe('published');
  await keepScreenshot(validator, testInfo, 'version-t-copula', { narrow: true });

  // A downstream model reads it with its law and nu.
  const adminCtx = await browser.newContext();
  const admin = await adminCtx.newPage();
  await signIn(admin, 'admin@fenmoor.example');
  const created = await admin.request.post('/api/admin/tokens', { data: { name: `t-copula reader ${Date.now()}`, scopes: ['assumptions:read'] } });
  expect(created.status(), await created.text()).toBe(201);
  const token = (await created.json()).token as string;
  const answer = await admin.request.get(`/api/v1/assumptions?segment=${encodeURIComponent(segment!)}`, { headers: { authorization: `Bearer ${token}` } });
  expect(answer.status()).toBe(200);
  const a = (await answer.json()).assumption;
  expect(a).toMatchObject({ estimator: 'tCopula', mixingLaw: 't', model: { copula: 't' }, nu: { value: t.nu } });
  expect(a.lineage.fitRunId).toBe(fitId);
  await Promise.all([analystCtx.close(), validatorCtx.close(), adminCtx.close()]);
});
